using SpinSim.Core.Model;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>One fitted parameter as reported: value and standard error (NaN when fixed or undetermined).</summary>
public sealed record FittedParameter(string Name, ParameterKind Kind, IReadOnlyList<string> Nuclei, int Dataset, double Value, double StdError,
    bool Varied, bool AtBound, string? TiedWith)
{
    public string Unit => FitParameter.UnitOf(Kind);
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
            .Where(t => t.p.Varied && t.p.Kind is ParameterKind.ShiftPpm or ParameterKind.JHz && t.b > factor * t.p.StdError)
            .Select(t => $"{t.p.Name} ({t.b / t.p.StdError:0.#} x)").ToList();
        if (understated.Count > 0)
            warnings.Add($"the block bootstrap scatters more than the covariance standard errors say for {string.Join(", ", understated)}: " +
                         "quote the bootstrap errors");
        if (bootstrap.Converged < bootstrap.Replicates)
            warnings.Add($"{bootstrap.Replicates - bootstrap.Converged} of {bootstrap.Replicates} bootstrap refits did not converge and were left out");
        return this with { Bootstrap = bootstrap, Warnings = warnings };
    }

    /// <summary>Starts that came onto another start's path during a broadened stage and share its outcome (counted in <see cref="StartsAtBest"/> with it).</summary>
    public int StartsJoined { get; init; }
    public required IReadOnlyList<string> Warnings { get; init; }
    public required SpinSystem FittedSystem { get; init; }
    public required WidthHz? FittedWidth { get; init; }
    public required IReadOnlyList<FittedTrace> Traces { get; init; }

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

        var traces = new List<FittedTrace>();
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
            for (var i = 0; i < data.Count; i++)
            {
                var r = fitted[i] - data.Y[i];
                rss += r * r;
                sumSquares += data.Y[i] * data.Y[i];
            }
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
        system = system.WithNuclei(nuclei);

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
        };
    }
}
