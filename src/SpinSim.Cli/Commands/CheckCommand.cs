using System.CommandLine;
using SpinSim.Core.Engine;
using SpinSim.Core.LinearAlgebra;
using SpinSim.Core.Model;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli.Commands;

/// <summary><c>spinsim check SYSTEM</c>: what the file holds and what simulating it will cost.</summary>
public static class CheckCommand
{
    public static Command Build(CommandIo io)
    {
        var file = SystemInput.FileArgument("Spin-system file (.toml in SpinSim's schema, or .json)");
        var json = new Option<bool>("--json") { Description = "Print the system as JSON for other programs instead of the summary" };
        var engine = new EngineChoice();
        var command = new Command("check",
            "Read a spin system, report its nuclei, equivalent sets and couplings, how it would be split into clusters, and estimate time and memory")
        {
            file, json,
        };
        engine.AddTo(command);
        command.SetAction(parse =>
        {
            var options = engine.Read(parse);
            var (document, _) = SystemInput.Load(io, parse.GetValue(file)!);
            if (parse.GetValue(json))
            {
                io.Out.WriteLine(SpinSystemJson.Write(document.System, document.DefaultWidth));
                return ExitCodes.Success;
            }
            Print(io, document, options);
            return ExitCodes.Success;
        });
        return command;
    }

    private static void Print(CommandIo io, SpinSystemDocument document, EngineOptions options)
    {
        var o = io.Out;
        var s = document.System;
        o.WriteLine($"{document.Path}: {(string.IsNullOrEmpty(s.Title) ? "(no title)" : s.Title)}");
        o.WriteLine($"field            {s.Field.Value:0.###} MHz (1H), {s.Field.Tesla:0.####} T; observed nucleus {s.Observed}");
        o.WriteLine($"nuclei           {s.Nuclei.Count} entries, {s.Nuclei.Sum(n => n.Count)} nuclei, {s.ObservedNucleusCount} observed");
        foreach (var n in s.Nuclei)
            o.WriteLine($"  {n.Id,-10} {n.Shift.Value,9:0.0000} ppm  {n.Isotope,-4} x{n.Count}{(n.Count > 1 ? "  (equivalent set)" : "")}" +
                        $"{(n.Width is { } w ? $"  linewidth {w.Value:0.###} Hz" : "")}");
        o.WriteLine($"couplings        {s.Couplings.Count}");
        foreach (var c in s.Couplings)
        {
            var (a, b) = (s.IndexOf(c.A), s.IndexOf(c.B));
            var dnu = Math.Abs(s.FrequencyHz(a) - s.FrequencyHz(b));
            var ratio = s.Nuclei[a].Isotope == s.Nuclei[b].Isotope && c.J.Value != 0 ? $"|dnu/J| = {dnu / Math.Abs(c.J.Value):0.##}" : "heteronuclear";
            o.WriteLine($"  {c.A,-10} {c.B,-10} {c.J.Value,8:0.###} Hz   {ratio}");
        }
        var plan = SpectrumEngine.PlanFor(s, options);
        PrintPlan(o, s, plan, options);
        var estimate = ResourceEstimate.For(s, plan);
        o.WriteLine($"cost             {estimate.Describe()}");
        o.WriteLine($"backend          {DenseBackends.Default.Name}");
        o.WriteLine($"fourier          {Fft.Name}");
        var warnings = new List<string>();
        var seconds = estimate.SecondsWith(DenseBackends.Default);
        if (estimate.WorkingBytes > options.MemoryBudgetBytes)
            warnings.Add($"simulate will refuse this plan: it needs about {estimate.WorkingBytes / (1L << 30):0.##} GiB, more than the budget of {options.MemoryBudgetBytes / (double)(1L << 30):0.##} GiB");
        else if (seconds > options.TimeBudgetSeconds)
            warnings.Add($"simulate will refuse this plan: it would take about {seconds:G3} s, more than the budget of {options.TimeBudgetSeconds:0} s");
        else if (seconds > 10) warnings.Add($"this system will be slow to simulate (about {seconds:0} s); merge equivalent nuclei into sets where they are equivalent");
        foreach (var w in warnings) io.Warn(w);
    }

    private static string Count(long n, string one, string many) => $"{n} {(n == 1 ? one : many)}";

    /// <summary>The clusters the engine will diagonalise, the largest block, and the error the splitting may cause.</summary>
    private static void PrintPlan(TextWriter o, SpinSystem s, ClusterPlan plan, EngineOptions options)
    {
        var whole = ResourceEstimate.For(s).LargestBlock;
        var why = options.Splitting switch
        {
            ClusterSplitting.Exact => "--exact",
            ClusterSplitting.Split => $"--split-threshold {options.WeakCouplingRatio:0.####}",
            _ => plan.IsExact
                ? $"auto: the whole system's largest block has {whole} states, at most {options.AutoExactLargestBlock}"
                : $"auto: the whole system's largest block would have {whole} states, more than {options.AutoExactLargestBlock}",
        };
        o.WriteLine(plan.IsExact
            ? $"plan             exact, the whole system as one cluster ({why})"
            : $"plan             split into {Count(plan.Clusters.Count, "cluster", "clusters")} joined by |J/dnu| > {plan.Threshold:0.####} ({why})");

        var largest = (Block: 0, Cluster: 0);
        o.WriteLine($"clusters         {plan.Clusters.Count}");
        for (var k = 0; k < plan.Clusters.Count; k++)
        {
            var cluster = plan.Clusters[k];
            var block = ResourceEstimate.For(s, cluster.Entries).LargestBlock;
            if (block > largest.Block) largest = (block, k + 1);
            var nuclei = cluster.Entries.Sum(e => s.Nuclei[e].Count);
            var configurations = ClusterPartition.SpectatorConfigurationCount(s, cluster);
            o.WriteLine($"  cluster {k + 1}: {Count(nuclei, "nucleus", "nuclei")}, largest block {Count(block, "state", "states")}, " +
                        $"{Count(configurations, "spectator configuration", "spectator configurations")}: " +
                        string.Join(" ", cluster.Entries.Select(e => s.Nuclei[e].Id)));
        }
        o.WriteLine($"largest block    {largest.Block} states (cluster {largest.Cluster})");

        if (plan.StrongestCut is not { } strongest)
        {
            o.WriteLine($"splitting error  none: no coupling between observed nuclei is cut{(plan.IsExact ? " (exact)" : "")}");
            return;
        }
        o.WriteLine($"splitting error  largest cut |J/dnu| = {strongest.Ratio:0.####} ({s.Nuclei[strongest.A].Id}-{s.Nuclei[strongest.B].Id}: " +
                    $"J = {strongest.CouplingHz:0.###} Hz, dnu = {strongest.SeparationHz:0.#} Hz); {Count(plan.Cut.Count, "coupling", "couplings")} cut");
        var (hz, entry) = plan.LargestDisplacementEstimate();
        o.WriteLine($"                 largest line displacement, estimated: about {hz:0.###} Hz, lines of {s.Nuclei[entry].Id} " +
                    "(second order, J^2 g_A g_B / (2 |dnu|) summed over its cut couplings, g = 1 for a single nucleus, 4 for a methyl; an estimate, not a bound)");
    }
}
