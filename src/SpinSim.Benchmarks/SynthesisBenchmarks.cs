using BenchmarkDotNet.Attributes;
using SpinSim.Core.Spectrum;

namespace SpinSim.Benchmarks;

/// <summary>The target: 10,000 lines on 65,536 points, at the default 200-FWHM cut-off.</summary>
/// <remarks>
/// Run from a Release build: <c>dotnet SpinSim.Benchmarks.dll --job short --filter *Synthesis*</c>. Built with
/// --artifacts-path outside the repository the default toolchain cannot find the project file; add
/// <c>--inProcess</c> there.
/// </remarks>
[MemoryDiagnoser]
public class SynthesisBenchmarks
{
    private RenderLine[] _lines = [];
    private SpectrumGrid _grid = null!;

    [Params(LineshapeKind.Lorentzian, LineshapeKind.Gaussian, LineshapeKind.Voigt)]
    public LineshapeKind Shape { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        // A crowded 400 MHz 1H spectrum: lines over 0.5 to 9.5 ppm, 0.5 to 2 Hz wide.
        const double observeMHz = 400;
        var random = new Random(12345);
        _lines = Enumerable.Range(0, 10_000)
            .Select(_ => new RenderLine((0.5 + 9 * random.NextDouble()) * observeMHz, 0.1 + random.NextDouble(), 0.5 + 1.5 * random.NextDouble()))
            .ToArray();
        _grid = SpectrumGrid.Covering(_lines, 65_536, observeMHz);
    }

    [Benchmark]
    public double[] Render() => TraceSynthesizer.Render(_lines, _grid, Shape);
}
