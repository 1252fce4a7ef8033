using SpinSim.Benchmarks;

// "peak N" measures one fully coupled N-spin run in this process (time, peak working set, managed allocations),
// which BenchmarkDotNet does not report; everything else goes to BenchmarkDotNet.
if (args is ["peak", var spins]) return PeakMemory.Run(int.Parse(spins, System.Globalization.CultureInfo.InvariantCulture));
BenchmarkDotNet.Running.BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
return 0;
