using SpinSim.Benchmarks;

// "peak N" measures one fully coupled N-spin run in this process (time, peak working set, managed allocations),
// which BenchmarkDotNet does not report; everything else goes to BenchmarkDotNet.
if (args is ["peak", var spins]) return PeakMemory.Run(int.Parse(spins, System.Globalization.CultureInfo.InvariantCulture));
// "repeat N R" runs the engine on a fully coupled N-spin system R times, for a profiler to attach to (dotnet-trace).
if (args is ["repeat", var n, var r])
{
    var system = Systems.FullyCoupled(int.Parse(n, System.Globalization.CultureInfo.InvariantCulture));
    for (var i = 0; i < int.Parse(r, System.Globalization.CultureInfo.InvariantCulture); i++) SpinSim.Core.Engine.SpectrumEngine.Compute(system);
    return 0;
}
BenchmarkDotNet.Running.BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
return 0;
