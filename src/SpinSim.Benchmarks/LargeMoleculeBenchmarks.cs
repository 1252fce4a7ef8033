using System.Runtime.CompilerServices;
using BenchmarkDotNet.Attributes;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Benchmarks;

/// <summary>
/// Issue 8's whole-molecule target: the invented 40-proton example (spin-systems/large-molecule-40h.toml) at 400 MHz,
/// split into weak-coupling clusters as the default options do, as a 65,536-point Lorentzian trace.
/// </summary>
[MemoryDiagnoser]
public class LargeMoleculeBenchmarks
{
    private SpinSystem _system = null!;
    private SimulationSettings _settings = null!;

    [GlobalSetup]
    public void Setup()
    {
        var document = SpinSystemFiles.Read(RepositoryFiles.Find("spin-systems/large-molecule-40h.toml"));
        _system = document.System;
        _settings = new SimulationSettings(document.DefaultWidth ?? new WidthHz(1.0), Lineshape.Lorentzian, Points: 65_536);
    }

    [Benchmark]
    public int LineList() => SpectrumEngine.Compute(_system).Lines.Count;

    [Benchmark]
    public double[] WholeSpectrum() => SpectrumSimulator.Simulate(_system, SpectrumEngine.Compute(_system), _settings).Trace.Intensity.ToArray();
}

/// <summary>Finds a file of the repository from wherever BenchmarkDotNet runs the benchmark process.</summary>
internal static class RepositoryFiles
{
    public static string Find(string relative, [CallerFilePath] string thisFile = "")
    {
        // The benchmark process runs from a build folder inside or outside the repository; the compile-time path of
        // this source file is the fallback for builds with --artifacts-path.
        foreach (var start in new[] { AppContext.BaseDirectory, Environment.CurrentDirectory, Path.GetDirectoryName(thisFile) ?? "" })
            for (var dir = new DirectoryInfo(start); dir is not null; dir = dir.Parent)
            {
                var candidate = Path.Combine(dir.FullName, relative);
                if (File.Exists(candidate)) return candidate;
            }
        throw new FileNotFoundException($"{relative} not found above {AppContext.BaseDirectory} or {Environment.CurrentDirectory}");
    }
}
