using SpinSim.Core.Model;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>One fitted parameter as reported: value and standard error (NaN when fixed or undetermined).</summary>
public sealed record FittedParameter(string Name, ParameterKind Kind, IReadOnlyList<string> Nuclei, int Dataset, double Value, double StdError,
    bool Varied, bool AtBound, string? TiedWith)
{
    public string Unit => ParameterKindInfo.Of(Kind).Unit;
}

/// <summary>A measured trace over the fitted points with the model and the residual, in the trace's own units.</summary>
public sealed record FittedTrace(SpectrumTrace Measured, double[] Model, double[] Residual);

/// <summary>Everything a caller needs from a spectrum fit.</summary>
public sealed record SpectrumFitResult
{
    public required IReadOnlyList<FittedParameter> Parameters { get; init; }

    /// <summary>Names of the free values (tied parameters joined by '='), in the order of <see cref="Correlation"/>.</summary>
    public required IReadOnlyList<string> FreeNames { get; init; }
    public required double[,] Correlation { get; init; }
    public required bool Converged { get; init; }
    public required bool Stopped { get; init; }
    public required string StopReason { get; init; }

    /// <summary>Root-mean-square residual in units of the tallest fitted point of each trace.</summary>
    public required double Rms { get; init; }

    /// <summary>R = sqrt(sum of squared residuals / sum of squared data), over all fitted points.</summary>
    public required double RFactor { get; init; }
    public required int Points { get; init; }
    public required int Iterations { get; init; }
    public required int Starts { get; init; }
    public required int StartsAtBest { get; init; }

    /// <summary>Block-bootstrap standard errors, when asked for (<see cref="SpectrumBootstrap"/>).</summary>
    public BootstrapResult? Bootstrap { get; init; }

    /// <summary>
    /// The result with <paramref name="bootstrap"/> attached, and a warning for every varied shift or coupling whose
    /// bootstrap error exceeds its covariance error by more than <paramref name="factor"/>.
    /// </summary>
    public SpectrumFitResult WithBootstrap(BootstrapResult bootstrap, double factor = 2)
    {
        var warnings = Warnings.ToList();
        var understated = Parameters.Select((p, i) => (p, b: bootstrap.StdErrors[i]))
            .Where(t => t.p.Varied && ParameterKindInfo.Of(t.p.Kind).IsSpin && t.b > factor * t.p.StdError)
            .Select(t => $"{t.p.Name} ({t.b / t.p.StdError:0.#} x)").ToList();
        if (understated.Count > 0)
            warnings.Add($"the block bootstrap scatters more than the covariance standard errors say for {string.Join(", ", understated)}: " +
                         "quote the bootstrap errors");
        if (bootstrap.Converged < bootstrap.Replicates)
            warnings.Add($"{bootstrap.Replicates - bootstrap.Converged} of {bootstrap.Replicates} bootstrap refits did not converge and were left out");
        return this with { Bootstrap = bootstrap, Warnings = warnings };
    }

    /// <summary>The relative-sign search and alternative solutions (null when the search was off or the fit was stopped).</summary>
    public SolutionSearch? Solutions { get; init; }

    /// <summary>Starts that came onto another start's path during a broadened stage and share its outcome (counted in <see cref="StartsAtBest"/> with it).</summary>
    public int StartsJoined { get; init; }
    public required IReadOnlyList<string> Warnings { get; init; }
    public required SpinSystem FittedSystem { get; init; }
    public required WidthHz? FittedWidth { get; init; }
    public required IReadOnlyList<FittedTrace> Traces { get; init; }

    /// <summary>Root-mean-square residual of each trace, in units of its tallest fitted point.</summary>
    public required IReadOnlyList<double> RmsPerTrace { get; init; }

    /// <summary>The rms residual of the start as given (same units as <see cref="Rms"/>).</summary>
    public double StartRms { get; init; }

    /// <summary>The search ended worse than the start, so the result is the start refined by itself.</summary>
    public bool StartWasBest { get; init; }

    /// <summary>Nothing was varied: the simulation at the given values compared with the data.</summary>
    public bool Overlay { get; init; }

    /// <summary>Everything needed to run the fit again (the reports are written from it).</summary>
    public FitSetupRecord? Setup { get; init; }

    /// <summary>1H-1H couplings larger than this in magnitude are implausible (common practice, no source: geminal sp3 up to about 16 Hz, trans vinyl up to about 18 Hz).</summary>
    public const double PlausibleProtonCouplingHz = 20;

    /// <summary>The result with the sentence that the start was best (and what the search reached) among its warnings.</summary>
    internal SpectrumFitResult SayingStartWasBest(double searchRms) => this with
    {
        StartWasBest = true,
        Warnings = [$"the given start (rms {StartRms:G4}) fitted better than anything the search reached from it (rms {searchRms:G4}); " +
                    "the result is the start, refined on its own: check the start and the regions", .. Warnings],
    };

    internal static SpectrumFitResult Build(SpectrumFitProblem problem, ParameterLayout layout, SpectralModel model, double[] free,
        LeastSquaresResult result, int starts, int reached, bool stopped)
    {
        var full = layout.Expand(free);
        var names = Enumerable.Range(0, layout.FreeCount)
            .Select(f => string.Join("=", layout.MembersOf(f).Select(i => layout.Parameters[i].Name))).ToArray();
        var parameters = new List<FittedParameter>();
        for (var i = 0; i < layout.Parameters.Count; i++)
        {
            var p = layout.Parameters[i];
            var f = layout.FreeIndexOf(i);
            var tied = f >= 0 ? layout.MembersOf(f).Where(m => m != i).Select(m => layout.Parameters[m].Name).ToArray() : [];
            parameters.Add(new FittedParameter(p.Name, p.Kind, p.Nuclei, p.Dataset, full[i], f >= 0 ? result.StandardErrors[f] : double.NaN,
                f >= 0, f >= 0 && result.AtBound[f], tied.Length > 0 ? string.Join(", ", tied) : null));
        }

        var warnings = new List<string>();
        if (stopped) warnings.Add("the fit was stopped before it finished; the values are the best point found so far");
        else if (!result.Converged) warnings.Add($"the fit did not converge: {result.Message}");
        for (var a = 0; a < layout.FreeCount; a++)
            for (var b = a + 1; b < layout.FreeCount; b++)
                if (Math.Abs(result.Correlation[a, b]) > 0.98)
                    warnings.Add($"{names[a]} and {names[b]} are highly correlated (r = {result.Correlation[a, b]:0.000}): this spectrum cannot tell them apart well");
        foreach (var direction in result.NullSpace)
        {
            var involved = Enumerable.Range(0, direction.Length).Where(k => Math.Abs(direction[k]) > 0.1).Select(k => names[k]);
            warnings.Add($"the spectrum does not change along a combination of {string.Join(", ", involved)}: these cannot be determined from it");
        }
        for (var f = 0; f < layout.FreeCount; f++)
            if (result.AtBound[f]) warnings.Add($"{names[f]} ended at a bound ({free[f]:G6}); widen the bound or check the start");
        warnings.AddRange(Identifiability.Check(layout, model, full));
        foreach (var p in parameters.Where(p => p.Kind == ParameterKind.JHz && p.Varied && Math.Abs(p.Value) > PlausibleProtonCouplingHz))
            if (p.Nuclei.All(id => problem.System.Nuclei[problem.System.IndexOf(id)].Isotope == Model.Isotope.H1))
                warnings.Add($"{p.Name} = {p.Value:0.##} Hz is larger than any usual 1H-1H coupling (|J| above {PlausibleProtonCouplingHz:0} Hz): " +
                             "check the start, the regions and whether a nucleus has lines outside them");
        if (!problem.SymmetriesTied) warnings.AddRange(SymmetryDrift(problem, parameters));
        warnings.InsertRange(0, problem.Notes);

        var traces = new List<FittedTrace>();
        var rmsPerTrace = new List<double>();
        double rss = 0, sumSquares = 0;
        var points = 0;
        for (var d = 0; d < model.Data.Count; d++)
        {
            var data = model.Data[d];
            var fitted = model.Model(full, d);
            var measured = problem.Data[d].Trace;
            var y = data.Y.Select(v => v * data.Normalisation).ToArray();
            var m = fitted.Select(v => v * data.Normalisation).ToArray();
            traces.Add(new FittedTrace(
                new SpectrumTrace(data.Ppm.ToArray(), y, measured.ObserveMHz, measured.Nucleus, measured.Origin),
                m, m.Zip(y, (a, b) => a - b).ToArray()));
            double traceRss = 0;
            for (var i = 0; i < data.Count; i++)
            {
                var r = fitted[i] - data.Y[i];
                traceRss += r * r;
                sumSquares += data.Y[i] * data.Y[i];
            }
            rss += traceRss;
            rmsPerTrace.Add(Math.Sqrt(traceRss / Math.Max(1, data.Count)));
            points += data.Count;
        }

        var system = layout.ApplySpin(problem.System, full);
        WidthHz? width = null;
        var nuclei = system.Nuclei.ToArray();
        for (var i = 0; i < layout.Parameters.Count; i++)
        {
            var p = layout.Parameters[i];
            if (p.Kind != ParameterKind.LinewidthHz || p.Dataset > 0) continue;
            if (p.Index < 0) width = new WidthHz(full[i]);
            else nuclei[p.Index] = nuclei[p.Index] with { Width = new WidthHz(full[i]) };
        }
        // The field is the data's (the first trace's), whatever the start file said: that is the field the values were fitted at.
        system = system.WithNuclei(nuclei).WithField(new FieldMHz(problem.Data[0].ObserveMHz * 100 / system.Observed.FrequencyRatioPercent));

        return new SpectrumFitResult
        {
            Parameters = parameters,
            FreeNames = names,
            Correlation = result.Correlation,
            Converged = result.Converged && !stopped,
            Stopped = stopped,
            StopReason = stopped ? "stopped by the user" : result.Message,
            Rms = Math.Sqrt(rss / points),
            RFactor = Math.Sqrt(rss / Math.Max(sumSquares, double.Epsilon)),
            Points = points,
            Iterations = result.Iterations,
            Starts = starts,
            StartsAtBest = reached,
            Warnings = warnings,
            FittedSystem = system,
            FittedWidth = width,
            Traces = traces,
            RmsPerTrace = rmsPerTrace,
        };
    }

    /// <summary>
    /// For declared symmetries left untied: a warning for each shift or coupling that ended more than three combined
    /// standard errors (and more than 0.01 Hz) away from its mirror partner, which the symmetry says it equals.
    /// </summary>
    private static IEnumerable<string> SymmetryDrift(SpectrumFitProblem problem, IReadOnlyList<FittedParameter> parameters)
    {
        var fitParameters = problem.Parameters;
        var byName = parameters.ToDictionary(p => p.Name, StringComparer.Ordinal);
        foreach (var symmetry in problem.Symmetries)
            foreach (var pair in FitSetup.SymmetryTies(symmetry, fitParameters))
            {
                var (a, b) = (byName[pair[0]], byName[pair[1]]);
                if (!a.Varied && !b.Varied) continue;
                var hz = a.Kind == ParameterKind.ShiftPpm ? problem.Data[0].ObserveMHz : 1.0;
                var gap = Math.Abs(a.Value - b.Value);
                var error = Math.Sqrt(Square(a.StdError) + Square(b.StdError));
                if (gap * hz > 0.01 && !(gap <= 3 * error))
                    yield return $"{a.Name} and {b.Name} drifted apart ({a.Value:G6} and {b.Value:G6} {a.Unit}) although the declared symmetry " +
                                 "makes them equal: tie them (the default), or check the symmetry declaration";
            }
    }

    private static double Square(double v) => double.IsFinite(v) ? v * v : 0;
}
