using BenchmarkDotNet.Attributes;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;

namespace SpinSim.Benchmarks;

/// <summary>
/// Issue 14's target: 100,000 lines on 65,536 points, drawn whole (<see cref="TraceSynthesizer"/>), against the windowed
/// drawing it replaced (<see cref="WindowedSynthesisBaseline"/>, each line within +-200 widths), in the same run.
/// </summary>
/// <remarks>
/// Run from a Release build: <c>dotnet run -c Release --project src/SpinSim.Benchmarks -- --filter '*Synthesis*' --job short</c>.
/// </remarks>
[MemoryDiagnoser]
public class SynthesisBenchmarks
{
    private RenderLine[] _lines = [];
    private SpectrumGrid _grid = null!;
    private Lineshape _shape = null!;

    [Params(LineshapeKind.Lorentzian, LineshapeKind.Gaussian, LineshapeKind.Voigt)]
    public LineshapeKind Shape { get; set; }

    /// <summary>"one": every line 1 Hz wide (widths from the file); "each": every line its own width (widths per nucleus).</summary>
    [Params("one", "each")]
    public string Widths { get; set; } = "one";

    [GlobalSetup]
    public void Setup()
    {
        // A crowded 400 MHz 1H spectrum: lines over 0.5 to 9.5 ppm (invented), 1 Hz or 0.5 to 2 Hz wide.
        const double observeMHz = 400;
        var random = new Random(12345);
        _lines = Enumerable.Range(0, 100_000)
            .Select(_ => new RenderLine((0.5 + 9 * random.NextDouble()) * observeMHz, 0.1 + random.NextDouble(), Widths == "one" ? 1.0 : 0.5 + 1.5 * random.NextDouble()))
            .ToArray();
        _grid = SpectrumGrid.Covering(_lines, 65_536, observeMHz);
        _shape = Lineshape.FromKind(Shape);
    }

    [Benchmark(Baseline = true)]
    public double[] Windowed() => WindowedSynthesisBaseline.Render(_lines, _grid, _shape);

    [Benchmark]
    public double[] Whole() => TraceSynthesizer.Render(_lines, _grid, _shape);
}

/// <summary>
/// The default <c>simulate</c> in process (engine, then the trace on 65,536 points with 1 Hz Lorentzian lines) of fully
/// coupled systems, every pair coupled, shifts within 0.3 ppm at 400 MHz (invented values).
/// </summary>
[MemoryDiagnoser]
public class DefaultSimulateBenchmarks
{
    [Params(10, 12)]
    public int Spins { get; set; }

    private SpinSystem _system = null!;

    [GlobalSetup]
    public void Setup() => _system = Systems.FullyCoupled(Spins);

    [Benchmark]
    public int Engine() => SpectrumEngine.Compute(_system).Lines.Count;

    [Benchmark]
    public int EngineAndTrace()
    {
        var lines = SpectrumEngine.Compute(_system);
        return SpectrumSimulator.Simulate(_system, lines, new SimulationSettings(new WidthHz(1.0), Lineshape.Lorentzian)).Grid.Points;
    }
}

/// <summary>The drawing that <see cref="TraceSynthesizer"/> replaced, kept as the benchmark's baseline: each line within +-200 widths of its centre, its tails beyond left out.</summary>
public static class WindowedSynthesisBaseline
{
    public static double[] Render(RenderLine[] lines, SpectrumGrid grid, Lineshape shape)
    {
        var trace = new double[grid.Points];
        double first = grid.HzAt(0), step = grid.StepHz;
        Parallel.ForEach(System.Collections.Concurrent.Partitioner.Create(0, lines.Length), () => new double[trace.Length], (range, _, buffer) =>
        {
            for (var l = range.Item1; l < range.Item2; l++)
            {
                var line = lines[l];
                var profile = shape.Profile(line.FwhmHz, tabulated: true);
                var reach = (shape.Kind == LineshapeKind.Gaussian ? 5 : 200) * line.FwhmHz;
                double a = (line.CentreHz - reach - first) / step, b = (line.CentreHz + reach - first) / step;
                var low = (int)Math.Max(Math.Ceiling(Math.Min(a, b)), 0);
                var high = (int)Math.Min(Math.Floor(Math.Max(a, b)), grid.Points - 1);
                for (var i = low; i <= high; i++) buffer[i] += line.Area * profile.Absorption(first + i * step - line.CentreHz);
            }
            return buffer;
        }, buffer => { lock (trace) for (var i = 0; i < trace.Length; i++) trace[i] += buffer[i]; });
        return trace;
    }
}
