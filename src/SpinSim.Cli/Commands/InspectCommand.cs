using System.CommandLine;
using SpinSim.Formats;

namespace SpinSim.Cli.Commands;

/// <summary><c>spinsim inspect FILE</c>: what was read from a measured spectrum, so an import can be checked before a fit.</summary>
public static class InspectCommand
{
    public static Command Build(CommandIo io)
    {
        var file = new Argument<string>("spectrum") { Description = "Measured spectrum: JCAMP-DX (.jdx, .dx) or delimited text (.csv, .tsv, .txt)", HelpName = "FILE" };
        var json = new Option<bool>("--json") { Description = "Print the summary as JSON (keys points, ppm_first, ppm_last, observe_mhz, warnings, ...)" };
        var data = new DataFileOptions();
        var command = new Command("inspect", "Show what SpinSim reads from a spectrum file: format, points, axis in ppm and Hz, field, intensity range and warnings")
        {
            file, json,
        };
        data.AddTo(command);
        command.SetAction(parse =>
        {
            var trace = SpectrumFiles.Read(parse.GetValue(file)!, data.Read(parse));
            foreach (var w in trace.Origin.Warnings) io.Warn($"{parse.GetValue(file)}: {w}");
            var summary = TraceSummary.From(trace);
            io.Out.WriteLine(parse.GetValue(json) ? summary.ToJson() : summary.ToText());
            return ExitCodes.Success;
        });
        return command;
    }
}
