using System.Diagnostics;
using SpinSim.Core.Engine;

namespace SpinSim.Benchmarks;

/// <summary>One engine run on a fully coupled system in a fresh process: wall time, peak working set, managed allocations.</summary>
internal static class PeakMemory
{
    public static int Run(int spins)
    {
        var system = Systems.FullyCoupled(spins);
        var before = Process.GetCurrentProcess().PeakWorkingSet64;
        var started = Stopwatch.StartNew();
        var lines = SpectrumEngine.Compute(system);
        var seconds = started.Elapsed.TotalSeconds;
        var process = Process.GetCurrentProcess();
        process.Refresh();
        Console.WriteLine($"fully coupled {spins} spins: {seconds:0.00} s, {lines.Lines.Count} lines ({lines.PooledLines} pools), largest block {lines.LargestBlock}");
        Console.WriteLine($"peak working set {process.PeakWorkingSet64 / (double)(1 << 20):0} MiB (before the run {before / (double)(1 << 20):0} MiB); " +
                          $"managed allocations {GC.GetTotalAllocatedBytes(true) / (double)(1 << 20):0} MiB; backend {lines.Backend}");
        return 0;
    }
}
