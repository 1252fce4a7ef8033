using System.Globalization;
using SpinSim.Benchmarks;
using SpinSim.Core.LinearAlgebra;

// Quick loops for a profiler (dotnet-trace) or a first look; the figures in DEVELOPERS.md come from BenchmarkDotNet.
//   peak N               one fully coupled N-spin run: time, peak working set, managed allocations
//   repeat N R           the engine on a fully coupled N-spin system, R times
//   synth SHAPE WIDTHS R the synthesis benchmark's 100,000 lines, R times (SHAPE Lorentzian|Gaussian|Voigt, WIDTHS one|each)
//   fid R                the FID benchmark's FID processed with the defaults, R times
//   fft N                20 forward transforms of N points, managed (MathNet) and native (FFTW, when it loads)
//   fit CASE STARTS SIGNS R  the fit benchmark (CASE aabb|abx|eight-spins, SIGNS search|given), R times
// Anything else goes to BenchmarkDotNet.
static int Count(string s) => int.Parse(s, CultureInfo.InvariantCulture);

static void Repeat(string name, int times, Action run)
{
    var watch = System.Diagnostics.Stopwatch.StartNew();
    Console.Write($"{name}: ");
    for (var i = 0; i < times; i++)
    {
        watch.Restart();
        run();
        Console.Write($"{watch.Elapsed.TotalMilliseconds:F2} ");
    }
    Console.WriteLine("ms");
}

switch (args)
{
    case ["peak", var spins]:
        return PeakMemory.Run(Count(spins));
    case ["repeat", var n, var times]:
        var system = Systems.FullyCoupled(Count(n));
        Repeat($"engine, {n} spins", Count(times), () => SpinSim.Core.Engine.SpectrumEngine.Compute(system));
        return 0;
    case ["synth", var shape, var widths, var times]:
        var synthesis = new SynthesisBenchmarks { Shape = Enum.Parse<SpinSim.Core.Spectrum.LineshapeKind>(shape), Widths = widths };
        synthesis.Setup();
        Repeat($"synthesis, {shape}, {widths}", Count(times), () => synthesis.Whole());
        return 0;
    case ["fid", var times]:
        var fid = new FidProcessingBenchmarks();
        fid.Setup();
        Repeat("FID processing", Count(times), () => fid.Automatic());
        return 0;
    case ["fft", var size]:
        var z = new System.Numerics.Complex[Count(size)];
        Repeat("managed", 20, () => Fft.Managed(z, -1));
        if (Fft.NativeAvailable) Repeat("native", 20, () => Fft.Native(z, -1));
        return 0;
    case ["fit", var fitCase, var starts, var signs, var times]:
        FitBenchmarkBase fit = fitCase == "eight-spins"
            ? new LargeFitBenchmarks { Starts = Count(starts), SignSearch = signs == "search" }
            : new FitBenchmarks { Case = fitCase, Starts = Count(starts), SignSearch = signs == "search" };
        fit.Setup();
        Repeat($"fit, {fitCase}, {starts} starts, signs {signs}", Count(times), () => fit.Fit());
        return 0;
    default:
        BenchmarkDotNet.Running.BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
        return 0;
}
