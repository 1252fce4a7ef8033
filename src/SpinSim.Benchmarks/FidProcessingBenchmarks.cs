using System.Numerics;
using BenchmarkDotNet.Attributes;
using SpinSim.Core.Processing;
using SpinSim.Core.Traces;

namespace SpinSim.Benchmarks;

/// <summary>
/// Processing a 32,768-point FID (invented lines with a 40-degree phase error and a 68.4-point filter delay, on noise)
/// into a 65,536-point spectrum with the defaults: delay found from the data, exponential window, automatic phase.
/// The variant with a given phase and delay shows what the automatic steps cost.
/// </summary>
[MemoryDiagnoser]
public class FidProcessingBenchmarks
{
    private FreeInductionDecay _fid = null!;

    [GlobalSetup]
    public void Setup()
    {
        const int n = 32768;
        const double sw = 8000, delay = 68.4;
        var random = new Random(1);
        var points = new Complex[n];
        // Invented lines: offsets from the carrier in Hz and amplitudes, 0.8 Hz wide.
        (double Hz, double Amplitude)[] lines = [(-2500, 1), (-1210, 2), (-1203, 2), (310, 3), (1800, 1.5), (2950, 0.5)];
        for (var k = 0; k < n; k++)
        {
            var t = (k - delay) / sw;
            if (t < 0) continue;
            foreach (var (hz, a) in lines)
                points[k] += a * Complex.FromPolarCoordinates(Math.Exp(-Math.PI * 0.8 * t), 2 * Math.PI * hz * t + 0.7);
        }
        for (var k = 0; k < n; k++) points[k] += new Complex(0.01 * (random.NextDouble() - 0.5), 0.01 * (random.NextDouble() - 0.5));
        _fid = new FreeInductionDecay(points, 1 / sw, 400.13, "1H", 12, null, TraceOrigin.Describe("benchmark FID (invented lines)"));
    }

    [Benchmark(Baseline = true)]
    public int Automatic() => FidProcessor.Process(_fid).Count;

    [Benchmark]
    public int GivenPhaseAndDelay() =>
        FidProcessor.Process(_fid, new ProcessingOptions { ZeroOrderPhaseDeg = -40, FirstOrderPhaseDeg = 0, FilterDelayPoints = 68.4 }).Count;
}
