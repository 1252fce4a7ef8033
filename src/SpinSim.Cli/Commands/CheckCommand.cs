using System.CommandLine;
using SpinSim.Core.Engine;
using SpinSim.Core.LinearAlgebra;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli.Commands;

/// <summary><c>spinsim check SYSTEM</c>: what the file holds and what simulating it will cost.</summary>
public static class CheckCommand
{
    public static Command Build(CommandIo io)
    {
        var file = new Argument<string>("system") { Description = "Spin-system file (.toml in SpinSim's schema, or .json)" };
        var json = new Option<bool>("--json") { Description = "Print the system as JSON for other programs instead of the summary" };
        var command = new Command("check", "Read a spin system, report its nuclei, equivalent sets and couplings, and estimate time and memory") { file, json };
        command.SetAction(parse =>
        {
            var document = SpinSystemFiles.Read(parse.GetValue(file)!);
            if (parse.GetValue(json))
            {
                io.Out.WriteLine(SpinSystemJson.Write(document.System, document.DefaultWidth));
                return 0;
            }
            Print(io.Out, document);
            return 0;
        });
        return command;
    }

    private static void Print(TextWriter o, SpinSystemDocument document)
    {
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
        var estimate = ResourceEstimate.For(s);
        o.WriteLine($"cost             {estimate.Describe()}");
        o.WriteLine($"backend          {DenseBackends.Default.Name}");
        var warnings = document.Warnings.ToList();
        var seconds = DenseBackends.NativeAvailable ? estimate.NativeSeconds : estimate.ManagedSeconds;
        if (seconds > 10) warnings.Add($"this system will be slow to simulate (about {seconds:0} s); merge equivalent nuclei into sets where they are equivalent");
        foreach (var w in warnings) o.WriteLine($"warning: {w}");
    }
}
