using System.CommandLine;
using System.Globalization;
using SpinSim.Core.Model;
using SpinSim.Core.Planning;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;
using SpinSim.Figures;
using SpinSim.Figures.Plots;
using SpinSim.Formats.Output;
using SpinSim.Formats.Planning;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli.Commands;

/// <summary>
/// <c>spinsim fields SYSTEM --at 60,80,400</c>: the system at several fields, and per coupled cluster how far it is from
/// first order, how many lines one resolves, and from which field on it is first order within a tolerance.
/// </summary>
public static class FieldsCommand
{
    /// <summary>More fields than this is a typing slip rather than a plan, and would only make the run long.</summary>
    public const int MaxFields = 100;

    /// <summary>Points of each stacked trace per linewidth at the highest field: enough to draw every resolved line.</summary>
    private const int FigurePointsPerFwhm = 4;

    public static Command Build(CommandIo io)
    {
        var file = SystemInput.FileArgument("Spin-system file (.toml or .json); its own field is not used");
        var at = new Option<string?>("--at")
        {
            Description = "Comma-separated 1H frequencies in MHz (default " +
                          string.Join(",", FieldPlanSettings.DefaultFields.Select(f => f.Value.ToString(CultureInfo.InvariantCulture))) + ")",
            HelpName = "MHZ,MHZ,...",
        };
        var linewidth = new Option<double?>("--linewidth") { Description = "Full width at half maximum in Hz (default: the file's linewidth_hz, else 1 Hz); nuclei with their own keep it", HelpName = "HZ" };
        var tolerance = new Option<double>("--tolerance")
        {
            Description = "Largest first-order deviation sqrt(sum (exact - first)^2 / sum exact^2) counted as first order",
            DefaultValueFactory = _ => FieldPlanSettings.DefaultTolerance,
            HelpName = "FRACTION",
        };
        var shape = TraceChoice.ShapeOption(required: true);
        var share = new Option<double>("--gaussian-share") { Description = "For --shape voigt: Gaussian share f_G / (f_L + f_G) of the width, 0 to 1", DefaultValueFactory = _ => 0.5, HelpName = "FRACTION" };
        var json = new Option<bool>("--json") { Description = "Print a JSON list with one entry per field instead of the table" };
        var figure = new FigureChoice();
        figure.Path.Description = "Draw the spectra at every field, stacked on one ppm axis: .png, .svg or .pdf";
        var command = new Command("fields", "Compare a spin system at several fields: distance from first order, resolved lines and the lowest first-order field per cluster")
        {
            file, at, linewidth, tolerance, shape, share, json,
        };
        figure.AddTo(command);
        command.SetAction(parse =>
        {
            var path = parse.GetValue(file)!;
            var fields = ParseFields(parse.GetValue(at));
            var (document, _) = SystemInput.Load(io, path);

            var width = parse.GetValue(linewidth) ?? document.DefaultWidth?.Value ?? SimulateCommand.FallbackLinewidthHz;
            if (!(width > 0 && width <= SpinSystemRules.MaxLinewidthHz)) throw new UserInputException("--linewidth", $"must be above 0 and at most {SpinSystemRules.MaxLinewidthHz:G3} Hz, got {width}");
            var tol = parse.GetValue(tolerance);
            if (!(tol > 0 && double.IsFinite(tol))) throw new UserInputException("--tolerance", $"must be above 0, got {tol}");
            var gaussianShare = parse.GetValue(share);
            if (!(gaussianShare >= 0 && gaussianShare <= 1)) throw new UserInputException("--gaussian-share", $"must be between 0 and 1, got {gaussianShare}");
            using var outputs = new StagedOutputs([path]);
            var figurePath = parse.GetValue(figure.Path);
            var figureOptions = figurePath is null ? null : figure.Options(parse);
            if (figurePath is not null) FigureChoice.FormatOf(figurePath);
            if (figurePath is not null) outputs.Check(figurePath);
            foreach (var f in fields)
                if (SpinSystemRules.Check(f, [], []).FirstOrDefault() is { } problem)
                    throw new UserInputException("--at", problem.Message, problem.Fix.Replace("field_mhz = ", "--at "));
            if (document.System.ObservedNucleusCount == 0)
                throw new UserInputException(path, $"the system has no {document.System.Observed} nuclei, so there is no spectrum to compare across fields",
                    $"Add {document.System.Observed} nuclei, or set observe to an isotope the system has");

            var settings = new FieldPlanSettings(new WidthHz(width), TraceChoice.ShapeFrom(parse.GetValue(shape)!, gaussianShare), tol);
            var plan = FieldPlanner.Plan(document.System, fields, settings, io.Cancel);

            if (parse.GetValue(json)) io.Out.WriteLine(FieldPlanJson.Write(plan));
            else PrintTable(io.Out, document, plan);

            if (figurePath is not null)
            {
                var traces = StackedTraces(document, plan);
                FigureChoice.Write(outputs, figurePath, StackedFieldsFigure.Create(traces, figureOptions!), figureOptions!);
            }
            foreach (var written in outputs.Commit()) io.Status($"written: {written}");
            return ExitCodes.Success;
        });
        return command;
    }

    /// <summary>Fields from a comma-separated list of MHz values, or the default range when none is given.</summary>
    /// <exception cref="UserInputException">An empty item, a value that is not a number, not finite or not above 0, or too many fields.</exception>
    internal static IReadOnlyList<FieldMHz> ParseFields(string? list)
    {
        if (list is null) return FieldPlanSettings.DefaultFields;
        var items = list.Split(',', StringSplitOptions.TrimEntries);
        var fields = new List<FieldMHz>();
        foreach (var item in items)
        {
            if (item.Length == 0)
                throw new UserInputException($"--at {list}", "an empty value between commas", "Give 1H frequencies in MHz such as --at 60,80,400");
            if (!double.TryParse(item, NumberStyles.Float, CultureInfo.InvariantCulture, out var mhz))
                throw new UserInputException($"--at {list}", $"\"{item}\" is not a number of MHz", "Give 1H frequencies such as --at 60,80,400 (decimal point, comma between fields)");
            if (!(mhz > 0) || !double.IsFinite(mhz))
                throw new UserInputException($"--at {list}", $"{item} MHz is not a field; every field must be a finite 1H frequency above 0 MHz");
            fields.Add(new FieldMHz(mhz));
        }
        if (fields.Count > MaxFields)
            throw new UserInputException("--at", $"gives {fields.Count} fields", $"Give at most {MaxFields}");
        return fields;
    }

    private static void PrintTable(TextWriter o, SpinSystemDocument document, FieldPlan plan)
    {
        var s = plan.Settings;
        o.WriteLine($"{SimulateCommand.Title(document.System)}: {plan.Fields.Count} field(s), {s.Shape} lines {s.DefaultWidth.Value:0.###} Hz wide, " +
                    $"first order within a deviation of {s.Tolerance:0.###}");
        if (plan.Clusters.Count == 0)
        {
            o.WriteLine("no two observed nuclei are coupled: the spectrum is first order at every field");
            return;
        }
        foreach (var c in plan.Clusters) o.WriteLine($"cluster {c.Number}: {c.Label}");
        o.WriteLine();
        o.WriteLine($"{"field/MHz",9}  {"cluster",7}  {"min |dnu|/|J|",13}  {"closest pair",-16}  {"deviation",9}  {"resolved lines",14}");
        foreach (var point in plan.Fields)
            foreach (var c in point.Clusters)
            {
                var ratio = c.MinDeltaNuOverJ is { } r ? r.ToString("0.00", CultureInfo.InvariantCulture) : "-";
                var pair = c.ClosestPair is { } p ? $"{p.A}-{p.B}" : "-";
                o.WriteLine(string.Create(CultureInfo.InvariantCulture,
                    $"{point.Field.Value,9:0.###}  {c.Cluster.Number,7}  {ratio,13}  {pair,-16}  {c.FirstOrderDeviation,9:0.0000}  {c.ResolvedLines,14}"));
            }
        o.WriteLine();
        o.WriteLine($"lowest field within {s.Tolerance:0.###} of first order (assuming the deviation falls with field between the fields listed):");
        foreach (var l in plan.LowestFields) o.WriteLine($"  cluster {l.Cluster.Number} ({l.Cluster.Label}): {Describe(l, plan.Fields[^1])}");
    }

    internal static string Describe(LowestFirstOrderField l, FieldPoint largest) => l.Reach switch
    {
        FirstOrderReach.Bracketed => string.Create(CultureInfo.InvariantCulture,
            $"{l.Within!.Value.Value:0} MHz (deviation {l.DeviationWithin:0.0000}; {l.Outside!.Value.Value:0} MHz gives {l.DeviationOutside:0.0000})"),
        FirstOrderReach.AtOrBelowLowestField => string.Create(CultureInfo.InvariantCulture,
            $"at or below {l.Within!.Value.Value:0.###} MHz, the lowest field tried (deviation {l.DeviationWithin:0.0000})"),
        FirstOrderReach.AboveLargestField => string.Create(CultureInfo.InvariantCulture,
            $"above {largest.Field.Value:0.###} MHz, the largest field tried (deviation there {largest.Clusters.First(c => c.Cluster == l.Cluster).FirstOrderDeviation:0.0000}); " +
            $"searching on: {l.Within!.Value.Value:0} MHz (deviation {l.DeviationWithin:0.0000}; high-field limit {l.HighFieldLimitDeviation:0.0000})"),
        _ => string.Create(CultureInfo.InvariantCulture,
            $"at no field: even the high-field limit deviates by {l.HighFieldLimitDeviation:0.0000} ({l.Outside!.Value.Value:0.###} MHz, the largest field tried, gives {l.DeviationOutside:0.0000})"),
    };

    /// <summary>The whole system's trace at every field, on one ppm window, highest field at the top.</summary>
    private static IReadOnlyList<(string Label, SpectrumTrace Trace)> StackedTraces(SpinSystemDocument document, FieldPlan plan)
    {
        var width = plan.Settings.DefaultWidth;
        double from = double.NegativeInfinity, to = double.PositiveInfinity, narrowest = double.PositiveInfinity;
        foreach (var point in plan.Fields)
        {
            var render = SpectrumSimulator.RenderLines(document.System.WithField(point.Field), point.Lines, width);
            if (render.Length == 0) continue;
            var tallest = render.Max(l => l.Area / l.FwhmHz);
            var visible = render.Where(l => l.Area / l.FwhmHz >= SpectrumSimulator.VisibleFraction * tallest).ToArray();
            var (high, low) = SpectrumGrid.WindowFor(visible, point.Lines.ObserveMHz);
            (from, to) = (Math.Max(from, high), Math.Min(to, low));
            narrowest = Math.Min(narrowest, render.Min(l => l.FwhmHz));
        }
        if (double.IsInfinity(from))
            throw new UserInputException(document.Path, $"the system has no {document.System.Observed} lines to draw");
        var spanHz = (from - to) * plan.Fields.Max(p => p.Lines.ObserveMHz);
        var points = (int)Math.Clamp(spanHz / narrowest * FigurePointsPerFwhm, 4096, 1 << 20);
        var settings = new SimulationSettings(width, plan.Settings.Shape, from, to, points);
        return plan.Fields.Reverse().Select(point =>
        {
            var simulated = SpectrumSimulator.Simulate(document.System.WithField(point.Field), point.Lines, settings);
            return (string.Create(CultureInfo.InvariantCulture, $"{point.Field.Value:0.###} MHz"), simulated.Trace);
        }).ToArray();
    }
}
