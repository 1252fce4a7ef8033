using System.CommandLine;
using System.Globalization;
using System.Security.Cryptography;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Reporting;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;
using SpinSim.Figures;
using SpinSim.Figures.Plots;
using SpinSim.Figures.Report;
using SpinSim.Formats;
using SpinSim.Formats.Fitting;
using SpinSim.Formats.Output;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli.Commands;

/// <summary><c>spinsim fit SYSTEM --data MEASURED</c>: shifts and couplings from a measured trace by least squares.</summary>
public static class FitCommand
{
    public static Command Build(CommandIo io)
    {
        var file = SystemInput.FileArgument("Spin-system file with the starting values (.toml or .json); its [fit] table, if any, is the fit setup");
        var dataFiles = new Option<string[]>("--data")
        {
            Description = "Measured spectrum (.jdx, .dx, .csv, .tsv, .txt); give it more than once for a joint fit of traces at different fields",
            Required = true,
            AllowMultipleArgumentsPerToken = false,
            HelpName = "FILE",
        };
        var setupFile = new Option<string?>("--setup") { Description = "Fit file with a [fit] table; replaces the [fit] table of the system file", HelpName = "FILE" };
        var linewidth = new Option<double?>("--linewidth") { Description = "Starting linewidth (FWHM) in Hz (default: the file's linewidth_hz or 1 Hz)", HelpName = "HZ" };
        var shape = TraceChoice.ShapeOption(required: false);
        var starts = new Option<int?>("--starts") { Description = "Number of starts (the given values plus random perturbations), 1 to 64; default 8", HelpName = "N" };
        var seed = new Option<int>("--seed") { Description = "Seed for the perturbed starts", DefaultValueFactory = _ => 1, HelpName = "N" };
        var report = new Option<string?>("--report") { Description = "Write the fit report as JSON", HelpName = "FILE" };
        var writeSystem = new Option<string?>("--write-system") { Description = "Write the best-fit system as a TOML file that simulate accepts", HelpName = "FILE" };
        var html = new Option<string?>("--html") { Description = "Write a self-contained HTML report with the figure, parameters, warnings and input hashes", HelpName = "FILE" };
        var bootstrap = new Option<int>("--bootstrap")
        {
            Description = "After the fit, refit this many block-bootstrap replicates (model plus resampled blocks of neighbouring residuals) " +
                          "and report their scatter as a second standard error that does not assume independent points; 0 (default) for none",
            DefaultValueFactory = _ => 0,
            HelpName = "N",
        };
        var solvent = new Option<string?>("--solvent") { Description = "Solvent named in the data line (default: the JCAMP-DX file's .SOLVENT NAME, if any)", HelpName = "NAME" };
        var noTable = new Option<bool>("--no-table") { Description = "Leave the parameter table out of the figure" };
        var signsAsGiven = new Option<bool>("--signs-as-given")
        {
            Description = "Skip the search over relative signs of the couplings: keep the signs of the start (hold_sign in the [fit] table holds single couplings)",
        };
        var data = new DataFileOptions();
        var figure = new FigureChoice();
        var engine = new EngineChoice();
        var command = new Command("fit", "Fit shifts, couplings, linewidth, scale and baseline to a measured spectrum by nonlinear least squares")
        {
            file, dataFiles, setupFile, linewidth, shape, starts, seed, bootstrap, report, writeSystem, html, solvent, noTable, signsAsGiven,
        };
        data.AddTo(command);
        figure.AddTo(command);
        engine.AddTo(command);

        command.SetAction(parse =>
        {
            // Every option, input and output target is checked before the fit, so that a bad one never costs a fit
            // or leaves some outputs written.
            var systemPath = parse.GetValue(file)!;
            var (document, system) = SystemInput.Load(io, systemPath);
            var paths = parse.GetValue(dataFiles)!;
            var setupPath = parse.GetValue(setupFile);
            var replicates = parse.GetValue(bootstrap);
            if (replicates is < 0 or 1 or > 10000) throw new UserInputException("--bootstrap", $"must be 0 (none) or from 2 to 10000, got {replicates}");
            if (parse.GetValue(starts) is { } n && n is < 1 or > 64) throw new UserInputException("--starts", $"must be from 1 to 64, got {n}");
            var width = parse.GetValue(linewidth) ?? document.DefaultWidth?.Value ?? SimulateCommand.FallbackLinewidthHz;
            if (!(width > 0 && width <= SpinSim.Core.Model.SpinSystemRules.MaxLinewidthHz))
                throw new UserInputException("--linewidth", $"must be above 0 and at most {SpinSim.Core.Model.SpinSystemRules.MaxLinewidthHz:G3} Hz, got {width}");
            var engineOptions = engine.Read(parse);
            var inputs = new[] { systemPath }.Concat(paths).Concat(setupPath is null ? [] : [setupPath]).ToArray();
            using var outputs = new StagedOutputs(inputs);
            var (reportPath, outSystem, figurePath, htmlPath) = (parse.GetValue(report), parse.GetValue(writeSystem), parse.GetValue(figure.Path), parse.GetValue(html));
            foreach (var target in new[] { reportPath, outSystem, figurePath, htmlPath }) if (target is not null) outputs.Check(target);
            if (figurePath is not null) FigureChoice.FormatOf(figurePath);
            var figureOptions = figure.Options(parse, $"Fit of {Path.GetFileName(systemPath)}");

            var delimited = data.Read(parse);
            var section = setupPath is not null ? SpinSystemToml.ReadFitFile(setupPath) : document.Fit;
            // FID processing and re-referencing: the fit setup's values, each replaced by one given on the command line.
            var measured = FitSetupReader.ReadMeasuredData(section).OverriddenBy(data.Processing.Read(parse));
            var traces = new List<SpectrumTrace>();
            foreach (var p in paths)
            {
                var t = ProcessingChoice.ReadTrace(p, delimited, measured);
                foreach (var w in t.Origin.Warnings) io.Warn($"{p}: {w}");
                if (t.Nucleus != system.Observed.Symbol)
                    throw new UserInputException(p, $"the trace is a {t.Nucleus} spectrum but the system observes {system.Observed}");
                if (t.ObserveMHz is null)
                {
                    var mhz = system.Observed.ObserveMHz(system.Field);
                    io.Warn($"{p}: no observe frequency in the file; using the system's {mhz:0.###} MHz (give --observe-mhz to set it)");
                    t = new SpectrumTrace(t.ShiftPpm.ToArray(), t.Intensity.ToArray(), mhz, t.Nucleus, t.Origin);
                }
                traces.Add(t);
            }

            var settings = FitSetupReader.Read(section, system, traces.Count, document.Symmetries);
            var setup = settings.Setup;
            if (parse.GetValue(starts) is { } count) setup = setup with { Starts = count };
            var lineshape = parse.GetValue(shape) is { } named ? TraceChoice.ShapeFrom(named, 0.5) : settings.Shape ?? Lineshape.Lorentzian;

            // The data's field wins: each trace is simulated at its own observe frequency.
            var startMHz = system.Observed.ObserveMHz(system.Field);
            for (var d = 0; d < traces.Count; d++)
                if (Math.Abs(traces[d].ObserveMHz!.Value - startMHz) > 1e-4 * startMHz)
                    io.Error.WriteLine($"note: {paths[d]} was measured at {traces[d].ObserveMHz:0.###} MHz and {Path.GetFileName(systemPath)} says " +
                                       $"{startMHz:0.###} MHz: the fit uses the data's field");
            var problem = setup.Problem(system, traces, width, lineshape);
            for (var d = 0; d < traces.Count; d++)
            {
                var regions = problem.Data[d].Regions;
                var covered = traces[d].ShiftPpm.Count(x => regions.Any(r => r.Contains(x)) && !setup.Exclude.Any(r => r.Contains(x)));
                if (covered < 10)
                    throw new UserInputException(paths[d], $"only {covered} points of the trace lie in the fitted regions ({string.Join("; ", regions)})",
                        "Check the file's ppm axis or give regions_ppm in the [fit] table");
            }

            var progress = io.Verbosity == Verbosity.Quiet ? null : new ThrottledProgress(io.Error);
            var options = new SpectrumFitOptions(Starts: setup.Starts, Seed: parse.GetValue(seed), SignSearch: !parse.GetValue(signsAsGiven),
                Progress: progress, Cancel: io.Cancel, Engine: engineOptions);
            if (setup.MaxIterations is { } most) options = options with { MaxIterationsPerStage = most };
            var result = SpectrumFitter.Fit(problem, options);
            progress?.Finish();
            if (replicates > 0 && !result.Stopped)
            {
                io.Status($"  bootstrap: {replicates} refits (Ctrl+C skips them)");
                try
                {
                    result = result.WithBootstrap(SpectrumBootstrap.Run(problem, result, new BootstrapOptions(replicates, Seed: parse.GetValue(seed),
                        Cancel: io.Cancel, Engine: engineOptions)));
                }
                catch (OperationCanceledException)
                {
                    io.Warn("the bootstrap was stopped; no bootstrap standard errors are reported");
                }
            }

            result = result with { Setup = result.Setup! with { CommandLine = CommandLine(parse), Version = Versions.Current } };
            var reportLine = NmrDataLine.Format(result.FittedSystem, new DataLineOptions
            {
                Solvent = parse.GetValue(solvent) ?? traces.Select(SolventOf).FirstOrDefault(x => x is not null),
                FieldsMHz = traces.Select(t => t.ObserveMHz!.Value).Distinct().ToArray(),
                Uncertainty = name => QuotedError(result, name),
            });
            PrintReport(io.Out, result, systemPath, paths, reportLine);
            foreach (var w in result.Warnings) io.Warn(w);

            var hashes = inputs.Select(p => (Path.GetFileName(p), Sha256(p))).ToArray();
            var created = DateTimeOffset.UtcNow;
            if (reportPath is not null)
                outputs.Add(reportPath, w => w.Write(FitReportJson.Write(result, hashes, Versions.Current, created, reportLine)));
            if (outSystem is not null)
            {
                var header = new[]
                {
                    $"Best-fit system from SpinSim {Versions.Current}, {created:yyyy-MM-dd HH:mm} UTC",
                    $"fitted to {string.Join(", ", paths.Select(Path.GetFileName))}; start values from {Path.GetFileName(systemPath)}",
                    $"converged: {result.Converged}; rms {result.Rms:G4} of the tallest point; see the fit report for standard errors",
                };
                outputs.Add(outSystem, w => w.Write(SpinSystemToml.Write(result.FittedSystem, result.FittedWidth ?? document.DefaultWidth, header, document.Symmetries)));
            }
            var figureData = FigureData(result, problem.Data, $"Fit of {Path.GetFileName(systemPath)}");
            if (figurePath is not null)
            {
                var (model, layout) = FitFigure.Build(figureData with { ShowTable = !parse.GetValue(noTable) }, figureOptions);
                if (layout.RowsLeftOut > 0) io.Warn($"{figurePath}: {layout.Note}");
                FigureChoice.Write(outputs, figurePath, model, figureOptions);
            }
            if (htmlPath is not null)
            {
                // Full column width in the page, and no table in the figure: the page has its own.
                var pageFigure = figureOptions with { WidthMm = 170, HeightMm = 95 + 35 * (result.Traces.Count - 1), WidthPx = null, HeightPx = null, Title = "" };
                var svg = System.Text.Encoding.UTF8.GetString(FigureRenderer.Render(FitFigure.Create(figureData with { ShowTable = false }, pageFigure), FigureFormat.Svg, pageFigure));
                var record = System.Text.Json.Nodes.JsonNode.Parse(FitReportJson.Write(result, hashes, Versions.Current, created, reportLine));
                var page = HtmlFitReport.Render(new FitReportData(
                    $"SpinSim fit of {Path.GetFileName(systemPath)}", svg, FitTable.Rows(result, trueMinus: true), result.Warnings, hashes, Versions.Current, created,
                    Statistics(result), new ParameterCorrelation(result.FreeNames.Select(n => FitTable.ShortLabel(result, n)).ToArray(), result.Correlation))
                {
                    TableKey = FitTable.Key(result.Bootstrap is not null),
                    ReportLine = reportLine,
                    // The setup record in readable rows (the JSON's "setup" is written from the same record).
                    Setup = result.Setup?.Rows().Select(r => (r.Label, r.Value)).ToArray() ?? SetupTable.Flatten(record?["setup"]),
                    SolutionLines = [.. SolutionSummary.Tried(result.Solutions) is { } tried ? [tried] : Array.Empty<string>(),
                        .. SolutionSummary.SignLines(result.Solutions), .. SolutionSummary.AlternativeLines(result.Solutions)],
                    Banner = result.Stopped ? "The fit was stopped before it finished: the values are the best point found so far, not a converged optimum."
                        : !result.Converged ? $"The fit did not converge ({result.StopReason}): the values are the last point reached, not a minimum; do not quote them."
                        : null,
                });
                outputs.Add(htmlPath, w => w.Write(page));
            }
            foreach (var written in outputs.Commit()) io.Status($"written: {written}");
            // A fit stopped by the user keeps its best point and writes it, but says by its exit code that it did not finish;
            // one that ran to its end without converging says so too (its own code, distinct from bad input).
            return result.Stopped ? ExitCodes.Interrupted : result.Converged ? ExitCodes.Success : ExitCodes.FitNotConverged;
        });
        return command;
    }

    /// <summary>Every fitted trace with its field, the fitted regions and the excluded ranges, and the table rows.</summary>
    internal static FitFigureData FigureData(SpectrumFitResult result, IReadOnlyList<FitDataset> datasets, string title) =>
        new(result.Traces.Select(t => new FitFigureTrace(t.Measured, t.Model, t.Residual,
                t.Measured.ObserveMHz is { } mhz ? string.Create(CultureInfo.InvariantCulture, $"{NmrDataLine.Nominal(mhz):0.#} MHz") : "")).ToArray(),
            FitTable.Rows(result, trueMinus: true), title)
        {
            Regions = datasets.SelectMany(d => d.Regions).ToArray(),
            Excluded = datasets.SelectMany(d => d.Exclude).Distinct().ToArray(),
        };

    // The error the data line's digits follow: the larger of the covariance and the bootstrap error, null when not fitted.
    private static double? QuotedError(SpectrumFitResult result, string name)
    {
        var i = result.Parameters.ToList().FindIndex(p => p.Name == name);
        if (i < 0 || !result.Parameters[i].Varied || !double.IsFinite(result.Parameters[i].StdError)) return null;
        var bootstrap = result.Bootstrap?.StdErrors[i] is { } b && double.IsFinite(b) ? b : 0;
        return Math.Max(result.Parameters[i].StdError, bootstrap);
    }

    // JCAMP-DX names the solvent in ##.SOLVENT NAME (a data-dictionary label); other formats do not say.
    private static string? SolventOf(SpectrumTrace trace) =>
        trace.Origin.HeaderLabels.FirstOrDefault(kv => kv.Key.Replace(" ", "").Replace("_", "").Trim('.', '#')
            .Equals("SOLVENTNAME", StringComparison.OrdinalIgnoreCase)).Value is { Length: > 0 } name ? name.Trim() : null;

    /// <summary>The command as typed (each argument quoted where it needs it), for the report.</summary>
    private static string CommandLine(ParseResult parse) =>
        "spinsim " + string.Join(" ", parse.Tokens.Select(t => t.Value.Length == 0 || t.Value.Any(c => char.IsWhiteSpace(c) || c is '"' or '\'' or '$')
            ? "'" + t.Value.Replace("'", "'\\''") + "'" : t.Value));

    private static IReadOnlyList<(string Label, string Value)> Statistics(SpectrumFitResult r) =>
    [
        ("converged", r.Overlay ? "nothing varied (overlay)" : r.Converged ? "yes" : "no"),
        ("stopped because", r.StopReason),
        ("RMS residual (fraction of tallest point)", r.Rms.ToString("G4", CultureInfo.InvariantCulture)),
        .. r.RmsPerTrace.Count > 1
            ? r.RmsPerTrace.Select((v, d) => ($"RMS residual, trace {d + 1}", v.ToString("G4", CultureInfo.InvariantCulture)))
            : [],
        ("RMS residual at the start", r.StartRms.ToString("G4", CultureInfo.InvariantCulture)),
        ("R-factor", r.RFactor.ToString("G4", CultureInfo.InvariantCulture)),
        ("points", r.Points.ToString(CultureInfo.InvariantCulture)),
        ("iterations (final run)", r.Iterations.ToString(CultureInfo.InvariantCulture)),
        ("starts reaching the best optimum", $"{r.StartsAtBest} of {r.Starts}"),
        ("starts that joined another's path", r.StartsJoined.ToString(CultureInfo.InvariantCulture)),
        ("block bootstrap", r.Bootstrap is { } b ? $"{b.Converged} of {b.Replicates} refits, blocks of {b.BlockPoints} points (the ± column)" : "not run"),
        .. r.Traces.Where(t => t.Measured.Origin.Processing is not null).Select(t => (
            $"processing of {Path.GetFileName(t.Measured.Origin.Source)}", string.Join("; ", t.Measured.Origin.Processing!.Describe()))),
    ];

    private static void PrintReport(TextWriter o, SpectrumFitResult r, string systemPath, IReadOnlyList<string> data, string reportLine)
    {
        o.WriteLine($"fit of {systemPath} to {string.Join(", ", data)}");
        foreach (var t in r.Traces)
            if (t.Measured.Origin.Processing is { } record)
                o.WriteLine($"{Path.GetFileName(t.Measured.Origin.Source)} ({record.Kind}): {string.Join("; ", record.Describe())}");
        if (r.Overlay)
        {
            o.WriteLine("nothing varied: the simulation at the given values compared with the data");
            o.WriteLine($"rms residual {r.Rms:G4} (fraction of the tallest point), R-factor {r.RFactor:G4}, {r.Points} points");
        }
        else
        {
            o.WriteLine($"{(r.Converged ? "converged" : "NOT converged")}: {r.StopReason}");
            o.WriteLine($"rms residual {r.Rms:G4} (fraction of the tallest point; {r.StartRms:G4} at the start), R-factor {r.RFactor:G4}, {r.Points} points, " +
                        $"{r.Iterations} iterations in the final run, " +
                        (r.StartWasBest ? "the given start was the best point seen"
                            : SolutionSummary.Tried(r.Solutions) ?? $"{r.StartsAtBest} of {r.Starts} starts reached the best optimum") +
                        (r.StartsJoined > 0 ? $" ({r.StartsJoined} joined another start's path on the way)" : ""));
        }
        if (r.RmsPerTrace.Count > 1)
            o.WriteLine("rms per trace: " + string.Join(", ", r.RmsPerTrace.Select((v, d) => $"{v:G4} ({Path.GetFileName(data[d])})")));
        if (r.Setup is { } setup)
            o.WriteLine($"regions: {string.Join(" | ", setup.Traces.Select(t => string.Join("; ", t.Regions) + (t.RegionsAutomatic ? " (automatic)" : "")))}; " +
                        $"shifts kept within {setup.ShiftWindowPpm:0.###} ppm of their start unless bounded (shift_window_ppm widens it)");
        foreach (var (t, d) in (r.Setup?.Traces ?? []).Select((t, d) => (t, d)))
            if (t.PhaseSlopeNote is { } note) o.WriteLine((r.Setup!.Traces.Count > 1 ? $"trace {d + 1}: " : "") + note);
        var rows = FitTable.Rows(r);
        var labelWidth = Math.Max(24, rows.Max(x => x.Label.Length) + 2);
        var valueWidth = Math.Max(14, rows.Max(x => x.Value.Length));
        foreach (var group in rows.GroupBy(x => x.Group))
        {
            o.WriteLine();
            o.WriteLine($"  {ParameterDisplay.GroupHeading(group.Key)}");
            foreach (var row in group)
                o.WriteLine($"    {row.Label.PadRight(labelWidth)} {row.Value.PadLeft(valueWidth)}  {row.Bootstrap}".TrimEnd());
        }
        o.WriteLine();
        foreach (var line in SolutionSummary.SignLines(r.Solutions).Concat(SolutionSummary.AlternativeLines(r.Solutions))) o.WriteLine(line);
        o.WriteLine();
        o.WriteLine(FitTable.Key(r.Bootstrap is not null));
        if (r.Bootstrap is { } b)
            o.WriteLine($"Bootstrap: scatter of {b.Converged} refits to the model plus residuals resampled in blocks of {b.BlockPoints} points.");
        else
            o.WriteLine("Give --bootstrap N for errors that allow for the correlation (a block bootstrap of N refits).");
        o.WriteLine();
        o.WriteLine($"data line: {reportLine}");
    }

    private static string Sha256(string path)
    {
        using var stream = File.OpenRead(path);
        return Convert.ToHexStringLower(SHA256.HashData(stream));
    }

    /// <summary>Progress on stderr at most twice a second.</summary>
    private sealed class ThrottledProgress(TextWriter error) : IProgress<FitProgress>
    {
        private readonly System.Diagnostics.Stopwatch _clock = System.Diagnostics.Stopwatch.StartNew();
        private long _last = -1000;
        private readonly object _gate = new();

        public void Report(FitProgress p)
        {
            lock (_gate)
            {
                if (_clock.ElapsedMilliseconds - _last < 500) return;
                _last = _clock.ElapsedMilliseconds;
                var start = p.Start < 0 ? "final run" : $"start {p.Start + 1}";
                error.WriteLine($"  {start}, stage {p.Stage}/{p.Stages} (added width {p.BroadeningHz:0.#} Hz), iteration {p.Iteration}, sum of squares {p.ResidualSumOfSquares:G4}  (Ctrl+C stops and keeps the best point)");
            }
        }

        public void Finish() => error.WriteLine($"  done in {_clock.Elapsed.TotalSeconds:0.0} s");
    }
}
