using System.CommandLine;
using SpinSim.Figures.Plots;
using SpinSim.Formats;
using SpinSim.Formats.Jcamp;
using SpinSim.Formats.Output;

namespace SpinSim.Cli.Commands;

/// <summary><c>spinsim inspect FILE</c>: what was read from a measured spectrum or FID, so an import can be checked before a fit.</summary>
public static class InspectCommand
{
    public static Command Build(CommandIo io)
    {
        var file = new Argument<string>("spectrum")
        {
            Description = "Measured spectrum or time-domain FID: JCAMP-DX (.jdx, .dx) or delimited text (.csv, .tsv, .txt)",
            HelpName = "FILE",
        };
        var json = new Option<bool>("--json") { Description = "Print the summary as JSON (keys kind, points, ppm_first, ppm_last, observe_mhz, processing, reference_ppm_shift, warnings, ...)" };
        var from = new Option<double?>("--from") { Description = "Figure: shift at one end of the drawn range (default: the whole trace)", HelpName = "PPM" };
        var to = new Option<double?>("--to") { Description = "Figure: shift at the other end of the drawn range", HelpName = "PPM" };
        var spectrum = new Option<string?>("--spectrum") { Description = "Write the trace as read or processed: .csv (shift_ppm, intensity) or .jdx/.dx (JCAMP-DX 5.01)", HelpName = "FILE" };
        var data = new DataFileOptions();
        var figure = new FigureChoice();
        var command = new Command("inspect",
            "Show what SpinSim reads from a spectrum or FID file: kind, format, points, axis in ppm and Hz, field, processing, warnings; draw or write the trace")
        {
            file, json, from, to, spectrum,
        };
        data.AddTo(command);
        figure.AddTo(command);
        command.SetAction(parse =>
        {
            var path = parse.GetValue(file)!;
            using var outputs = new StagedOutputs([path]);
            var (figurePath, spectrumPath) = (parse.GetValue(figure.Path), parse.GetValue(spectrum));
            if (figurePath is not null)
            {
                FigureChoice.FormatOf(figurePath);
                outputs.Check(figurePath);
            }
            if (spectrumPath is not null)
            {
                SimulateCommand.WriteTraceCheck(spectrumPath);
                outputs.Check(spectrumPath);
            }
            var delimited = data.Read(parse);
            var settings = data.Processing.Read(parse);

            var trace = ProcessingChoice.ReadTrace(path, delimited, settings);
            foreach (var w in trace.Origin.Warnings) io.Warn($"{path}: {w}");
            var summary = TraceSummary.From(trace);
            io.Out.WriteLine(parse.GetValue(json) ? summary.ToJson() : summary.ToText());
            if (figurePath is not null)
            {
                var options = figure.Options(parse);
                OxyPlot.PlotModel model;
                try { model = MeasuredFigure.Create(trace, parse.GetValue(from), parse.GetValue(to), options); }
                catch (ArgumentException e) { throw new UserInputException("--from/--to", e.Message); }
                FigureChoice.Write(outputs, figurePath, model, options);
            }
            if (spectrumPath is not null)
            {
                var comments = new List<string> { $"SpinSim {Versions.Current}: {summary.Kind} read from {Path.GetFileName(path)}" };
                if (trace.Origin.Processing is { } record) comments.AddRange(record.Describe().Select(s => $"processing: {s}"));
                SimulateCommand.WriteTrace(outputs, spectrumPath, trace, JcampForm.Affn, comments);
            }
            foreach (var written in outputs.Commit()) io.Status($"written: {written}");
            return ExitCodes.Success;
        });
        return command;
    }
}
