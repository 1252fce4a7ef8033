using SpinSim.Benchmarks;

// "peak N" measures one fully coupled N-spin run in this process (time, peak working set, managed allocations),
// which BenchmarkDotNet does not report; everything else goes to BenchmarkDotNet.
if (args is ["peak", var spins]) return PeakMemory.Run(int.Parse(spins, System.Globalization.CultureInfo.InvariantCulture));
// "synth SHAPE WIDTHS R" draws the synthesis benchmark's 100,000 lines R times (SHAPE Lorentzian|Gaussian|Voigt, WIDTHS one|each).
if (args is ["synth", var shape, var widths, var times])
{
    var bench = new SynthesisBenchmarks { Shape = Enum.Parse<SpinSim.Core.Spectrum.LineshapeKind>(shape), Widths = widths };
    bench.Setup();
    var watch = System.Diagnostics.Stopwatch.StartNew();
    for (var i = 0; i < int.Parse(times, System.Globalization.CultureInfo.InvariantCulture); i++)
    {
        watch.Restart();
        bench.Whole();
        Console.WriteLine($"{watch.Elapsed.TotalMilliseconds:F1} ms");
    }
    return 0;
}
// "fft N" times 20 forward transforms of N points, managed (MathNet) and then native (FFTW, when it loads).
if (args is ["fft", var size])
{
    var z = new System.Numerics.Complex[int.Parse(size, System.Globalization.CultureInfo.InvariantCulture)];
    var watch = System.Diagnostics.Stopwatch.StartNew();
    foreach (var (name, run) in new (string, Action)[] { ("managed", () => SpinSim.Core.LinearAlgebra.Fft.Managed(z, -1)), ("native", () => SpinSim.Core.LinearAlgebra.Fft.Native(z, -1)) })
    {
        if (name == "native" && !SpinSim.Core.LinearAlgebra.Fft.NativeAvailable) continue;
        Console.Write($"{name}: ");
        for (var i = 0; i < 20; i++) { watch.Restart(); run(); Console.Write($"{watch.Elapsed.TotalMilliseconds:F2} "); }
        Console.WriteLine("ms");
    }
    return 0;
}
// "fid R" processes the FID benchmark's FID R times with the defaults, printing each time.
if (args is ["fid", var fidTimes])
{
    var bench = new FidProcessingBenchmarks();
    bench.Setup();
    var watch = System.Diagnostics.Stopwatch.StartNew();
    for (var i = 0; i < int.Parse(fidTimes, System.Globalization.CultureInfo.InvariantCulture); i++)
    {
        watch.Restart();
        bench.Automatic();
        Console.Write($"{watch.Elapsed.TotalMilliseconds:F1} ");
    }
    Console.WriteLine("ms");
    return 0;
}
// "repeat N R" runs the engine on a fully coupled N-spin system R times, for a profiler to attach to (dotnet-trace).
if (args is ["repeat", var n, var r])
{
    var system = Systems.FullyCoupled(int.Parse(n, System.Globalization.CultureInfo.InvariantCulture));
    for (var i = 0; i < int.Parse(r, System.Globalization.CultureInfo.InvariantCulture); i++) SpinSim.Core.Engine.SpectrumEngine.Compute(system);
    return 0;
}
BenchmarkDotNet.Running.BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
return 0;
