using System.CommandLine;
using SpinSim.Core.Engine;
using SpinSim.Core.LinearAlgebra;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;
using SpinSim.Formats.Delimited;
using SpinSim.Formats.Jcamp;
using SpinSim.Formats.Lines;
using SpinSim.Formats.Output;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli.Commands;

/// <summary><c>spinsim simulate SYSTEM</c>: the exact line list, the trace and the integrals.</summary>
public static class SimulateCommand
{
    /// <summary>Linewidth used when neither the file nor --linewidth gives one (a well-shimmed high-field magnet).</summary>
    private static SpinSim.Figures.Plots.VerticalExpansion ParseExpansion(string text)
    {
        var parts = text.Split(':');
        if (parts.Length == 2 && double.TryParse(parts[0], System.Globalization.NumberStyles.Float, System.Globalization.CultureInfo.InvariantCulture, out var a)
            && double.TryParse(parts[1], System.Globalization.NumberStyles.Float, System.Globalization.CultureInfo.InvariantCulture, out var b)
            && double.IsFinite(a) && double.IsFinite(b) && a != b)
            return new SpinSim.Figures.Plots.VerticalExpansion(a, b);
        throw new UserInputException("--expand", $"expected a ppm range HIGH:LOW such as 7.45:7.36, got \"{text}\"");
    }

    public const double FallbackLinewidthHz = 1.0;

    public static Command Build(CommandIo io)
    {
        var file = SystemInput.FileArgument();
        var field = SystemInput.FieldOption();
        var lines = new Option<string?>("--lines") { Description = "Write the transition table (frequency_hz, shift_ppm, intensity, origin) to this CSV file", HelpName = "FILE" };
        var spectrum = new Option<string?>("--spectrum") { Description = "Write the trace: .csv (shift_ppm, intensity) or .jdx/.dx (JCAMP-DX 5.01)", HelpName = "FILE" };
        var engine = new EngineChoice();
        var shape = new TraceChoice();
        var jcampForm = new Option<string>("--jcamp-form") { Description = "JCAMP-DX data form: affn (plain numbers) or difdup (compressed)", DefaultValueFactory = _ => "affn" };
        jcampForm.AcceptOnlyFromAmong("affn", "difdup");
        var noise = new Option<double>("--noise") { Description = "Add Gaussian noise with this standard deviation, as a fraction of the tallest point (synthetic data for demos and tests)", HelpName = "FRACTION" };
        var seed = new Option<int>("--seed") { Description = "Seed of the noise generator", DefaultValueFactory = _ => 1, HelpName = "N" };
        var phaseError = new Option<double>("--phase-error") { Description = "Mix in dispersion as a zero-order phase error of this many degrees, -180 to 180 (synthetic data for demos and tests)", HelpName = "DEG" };
        var sticks = new Option<bool>("--sticks") { Description = "In the figure, draw the transitions as sticks below the trace" };
        var labels = new Option<bool>("--labels") { Description = "In the figure, label the nuclei at their shifts" };
        var solvent = new Option<string?>("--solvent") { Description = "Solvent named in the data line, e.g. CDCl3", HelpName = "NAME" };
        var expand = new Option<string[]>("--expand")
        {
            Description = "In the figure, draw this ppm range again above the trace, scaled up and labelled ×N (HIGH:LOW, e.g. 7.45:7.36); give it more than once for several",
            HelpName = "PPM:PPM",
            AllowMultipleArgumentsPerToken = false,
        };
        var figure = new FigureChoice();
        var command = new Command("simulate", "Simulate the spectrum of a spin system at a field: exact transitions, trace and integrals")
        {
            file, field, lines, spectrum, jcampForm, noise, seed, phaseError, sticks, labels, solvent, expand,
        };
        figure.AddTo(command);
        engine.AddTo(command);
        shape.AddTo(command);
        command.SetAction(parse =>
        {
            // Everything is checked before any work, so that a bad option never leaves half the outputs behind.
            var path = parse.GetValue(file)!;
            var (document, system) = SystemInput.Load(io, path, parse.GetValue(field));
            var sigmaFraction = parse.GetValue(noise);
            if (!(sigmaFraction >= 0 && double.IsFinite(sigmaFraction))) throw new UserInputException("--noise", $"must be 0 or above, got {sigmaFraction}");
            var phase = parse.GetValue(phaseError);
            if (!(Math.Abs(phase) <= 180)) throw new UserInputException("--phase-error", $"must be between -180 and 180 degrees, got {phase}");
            var options = engine.Read(parse);
            var settings = shape.Read(parse, document);
            var inputs = new[] { path };
            using var outputs = new StagedOutputs(inputs);
            var figurePath = parse.GetValue(figure.Path);
            var figureOptions = figurePath is null ? null : figure.Options(parse, $"{Title(system)}, {system.Field.Value:0.###} MHz");
            if (figurePath is not null)
            {
                FigureChoice.FormatOf(figurePath);
                outputs.Check(figurePath);
            }
            var linesPath = parse.GetValue(lines);
            if (linesPath is not null) outputs.Check(linesPath);
            var spectrumPath = parse.GetValue(spectrum);
            if (spectrumPath is not null)
            {
                TraceFormatOf(spectrumPath);
                outputs.Check(spectrumPath);
            }
            if (system.ObservedNucleusCount == 0)
                throw new UserInputException(path, $"the system has no {system.Observed} nuclei, so there is no {system.Observed} spectrum to simulate",
                    $"Add {system.Observed} nuclei, or set observe to an isotope the system has");

            var started = System.Diagnostics.Stopwatch.StartNew();
            var result = SpectrumEngine.Compute(system, options, io.Cancel);
            var elapsed = started.Elapsed;
            var simulated = SpectrumSimulator.Simulate(system, result, settings);

            io.Out.WriteLine($"{Title(system)} at {system.Field.Value:0.###} MHz: {result.Lines.Count} lines, " +
                             $"{simulated.Grid.Points} points from {simulated.Grid.FromPpm:0.####} to {simulated.Grid.ToPpm:0.####} ppm, " +
                             $"{settings.Shape} lines, default width {settings.DefaultWidth.Value:0.###} Hz");
            io.Out.WriteLine("integrals (normalised to the number of observed nuclei):");
            foreach (var integral in simulated.Integrals)
                io.Out.WriteLine($"  {integral.Id,-10} {integral.ShiftPpm,8:0.000} ppm  {integral.Value,7:0.000}  (nuclei: {integral.Count})");
            io.Detail($"backend: {result.Backend}; Fourier transforms: {Fft.Name}");
            foreach (var note in result.Notes) io.Detail($"engine: {note}");
            io.Detail($"blocks: {result.Blocks}, largest {result.LargestBlock} states; {elapsed.TotalMilliseconds:0} ms");
            io.Detail($"total intensity {result.TotalIntensity:G10} of Tr(F+F-) = {result.ExpectedTotalIntensity:G10}; missing (numerical zeros): {result.DroppedIntensity:G3}");

            io.Out.WriteLine($"data line: {SpinSim.Core.Reporting.NmrDataLine.Format(system, new SpinSim.Core.Reporting.DataLineOptions { Solvent = parse.GetValue(solvent) })}");
            if (figurePath is not null)
            {
                var model = SpinSim.Figures.Plots.SpectrumFigure.Simulated(simulated.Trace,
                    parse.GetValue(sticks) ? SpinSim.Figures.Plots.SpectrumFigure.SticksFrom(result) : null,
                    parse.GetValue(labels) ? SpinSim.Figures.Plots.SpectrumFigure.LabelsFrom(system) : null, figureOptions!,
                    (parse.GetValue(expand) ?? []).Select(ParseExpansion).ToArray());
                FigureChoice.Write(outputs, figurePath, model, figureOptions!);
            }
            if (linesPath is not null) outputs.Add(linesPath, w => LineListCsv.Write(w, result, system));
            if (spectrumPath is not null)
            {
                var trace = simulated.Trace;
                var comments = new List<string>
                {
                    $"SpinSim {Versions.Current}: simulated {system.Observed} spectrum of {Path.GetFileName(path)} at {system.Field.Value:0.###} MHz",
                    "synthetic: computed from a spin Hamiltonian, not measured",
                };
                if (phase != 0)
                {
                    var mixed = TraceSynthesizer.Render(SpectrumSimulator.RenderLines(system, result, settings.DefaultWidth), simulated.Grid, settings.Shape, PhaseRotation.FromDegrees(phase));
                    trace = new SpectrumTrace(trace.ShiftPpm.ToArray(), mixed, trace.ObserveMHz, trace.Nucleus,
                        TraceOrigin.Describe(trace.Origin.Source + " with a synthetic phase error", "simulated", trace.Origin.Form));
                    comments.Add($"synthetic zero-order phase error of {phase:G4} degrees mixed in");
                }
                if (sigmaFraction > 0)
                {
                    var noisy = trace.Intensity.ToArray();
                    var sigma = sigmaFraction * noisy.Max();
                    NoiseGenerator.AddGaussian(noisy, sigma, parse.GetValue(seed));
                    trace = new SpectrumTrace(trace.ShiftPpm.ToArray(), noisy, trace.ObserveMHz, trace.Nucleus,
                        TraceOrigin.Describe(trace.Origin.Source + " with synthetic noise", "simulated", trace.Origin.Form));
                    comments.Add($"synthetic Gaussian noise added: standard deviation {sigma:G4} ({sigmaFraction:G3} of the tallest point), seed {parse.GetValue(seed)}");
                }
                WriteTrace(outputs, spectrumPath, trace, parse.GetValue(jcampForm) == "difdup" ? JcampForm.DifDup : JcampForm.Affn, comments);
            }
            foreach (var written in outputs.Commit()) io.Status($"written: {written}");
            return ExitCodes.Success;
        });
        return command;
    }

    internal static string Title(SpinSystem system) => string.IsNullOrEmpty(system.Title) ? "spin system" : system.Title;

    private enum TraceFormat { Csv, Jcamp }

    /// <summary>The trace format a path names by its extension.</summary>
    /// <exception cref="UserInputException">An extension that is not .csv, .jdx, .dx or .jcamp.</exception>
    private static TraceFormat TraceFormatOf(string path) => Path.GetExtension(path).ToLowerInvariant() switch
    {
        ".csv" => TraceFormat.Csv,
        ".jdx" or ".dx" or ".jcamp" => TraceFormat.Jcamp,
        var ext => throw new UserInputException(path, $"unknown spectrum file type \"{ext}\"", "Use .csv, .jdx or .dx"),
    };

    /// <summary>Refuses a trace path whose extension names no trace format, before any work.</summary>
    internal static void WriteTraceCheck(string path) => TraceFormatOf(path);

    /// <summary>Stages a trace in the format its extension names.</summary>
    internal static void WriteTrace(StagedOutputs outputs, string path, SpectrumTrace trace, JcampForm form, IReadOnlyList<string> comments)
    {
        if (TraceFormatOf(path) == TraceFormat.Csv) outputs.Add(path, w => SpectrumCsvWriter.Write(trace, w, comments));
        else outputs.Add(path, w => JcampWriter.Write(trace, w, form, comments));
    }
}

/// <summary>Options that choose exact or split simulation; shared by the commands that run the engine.</summary>
public sealed class EngineChoice
{
    public Option<bool> Exact { get; } = new("--exact") { Description = "Diagonalise the whole system as one, never splitting weakly coupled parts" };
    public Option<double?> SplitThreshold { get; } = new("--split-threshold")
    {
        Description = "Always split at this |J / delta nu| (default: exact while the system is small, else split at 0.05)",
        HelpName = "RATIO",
    };

    public void AddTo(Command command)
    {
        command.Options.Add(Exact);
        command.Options.Add(SplitThreshold);
    }

    public EngineOptions Read(ParseResult parse)
    {
        var threshold = parse.GetValue(SplitThreshold);
        if (parse.GetValue(Exact) && threshold is not null) throw new UserInputException("--exact and --split-threshold", "exclude each other", "Give one of them");
        if (threshold is { } t && !(t > 0 && double.IsFinite(t))) throw new UserInputException("--split-threshold", $"must be above 0, got {t}");
        if (parse.GetValue(Exact)) return EngineOptions.Default with { Splitting = ClusterSplitting.Exact };
        return threshold is { } s ? EngineOptions.Default with { Splitting = ClusterSplitting.Split, WeakCouplingRatio = s } : EngineOptions.Default;
    }
}

/// <summary>Options that shape the trace: window, points, widths and lineshape.</summary>
public sealed class TraceChoice
{
    public Option<double?> From { get; } = new("--from") { Description = "High-ppm (left) end of the window (default: all lines plus a margin)", HelpName = "PPM" };
    public Option<double?> To { get; } = new("--to") { Description = "Low-ppm (right) end of the window", HelpName = "PPM" };
    public Option<int> Points { get; } = new("--points") { Description = "Points of the trace", DefaultValueFactory = _ => 65536, HelpName = "N" };
    public Option<double?> Linewidth { get; } = new("--linewidth") { Description = "Default full width at half maximum in Hz (nuclei with their own linewidth_hz keep it)", HelpName = "HZ" };
    public Option<string> Shape { get; } = ShapeOption(required: true);
    public Option<double> GaussianShare { get; } = new("--gaussian-share")
    {
        Description = "For --shape voigt: Gaussian share f_G / (f_L + f_G) of the width, 0 to 1",
        DefaultValueFactory = _ => 0.5,
        HelpName = "FRACTION",
    };
    public Option<double> ReferenceOffset { get; } = new("--reference-offset") { Description = "Shift the whole axis by this many ppm (imitates a referencing error)", HelpName = "PPM" };

    /// <summary>A --shape option accepting <see cref="Lineshape.Names"/>; with a default (the first name) unless the caller has its own.</summary>
    internal static Option<string> ShapeOption(bool required)
    {
        var option = new Option<string>("--shape") { Description = $"Lineshape: {Lineshape.NameList} (default {Lineshape.Names[0]})" };
        if (required) option.DefaultValueFactory = _ => Lineshape.Names[0];
        option.AcceptOnlyFromAmong([.. Lineshape.Names]);
        return option;
    }

    public void AddTo(Command command)
    {
        foreach (var o in new Option[] { From, To, Points, Linewidth, Shape, GaussianShare, ReferenceOffset }) command.Options.Add(o);
    }

    public SimulationSettings Read(ParseResult parse, SpinSystemDocument document)
    {
        var width = parse.GetValue(Linewidth) ?? document.DefaultWidth?.Value ?? SimulateCommand.FallbackLinewidthHz;
        if (!(width > 0 && width <= SpinSystemRules.MaxLinewidthHz)) throw new UserInputException("--linewidth", $"must be above 0 and at most {SpinSystemRules.MaxLinewidthHz:G3} Hz, got {width}");
        var points = parse.GetValue(Points);
        if (points < 2 || points > 16_777_216) throw new UserInputException("--points", $"must be between 2 and 16777216, got {points}");
        var share = parse.GetValue(GaussianShare);
        if (!(share >= 0 && share <= 1)) throw new UserInputException("--gaussian-share", $"must be between 0 and 1, got {share}");
        var shape = ShapeFrom(parse.GetValue(Shape)!, share);
        var (from, to) = (parse.GetValue(From), parse.GetValue(To));
        foreach (var (name, value) in new[] { ("--from", from), ("--to", to), ("--reference-offset", (double?)parse.GetValue(ReferenceOffset)) })
            if (value is { } v && !(Math.Abs(v) <= SpinSystemRules.MaxAbsShiftPpm))
                throw new UserInputException(name, $"must be a shift within +-{SpinSystemRules.MaxAbsShiftPpm:G3} ppm, got {v}");
        if (from is { } f && to is { } t && f == t) throw new UserInputException("--from and --to", "must differ");
        return new SimulationSettings(new WidthHz(width), shape, from, to, points, parse.GetValue(ReferenceOffset));
    }

    /// <summary>The lineshape named by a --shape value (one of <see cref="Lineshape.Names"/>), with the Voigt's Gaussian share.</summary>
    internal static Lineshape ShapeFrom(string name, double gaussianShare) =>
        Lineshape.TryParse(name, gaussianShare, out var shape) ? shape : throw new UserInputException($"--shape must be {Lineshape.NameList}, got {name}");
}
