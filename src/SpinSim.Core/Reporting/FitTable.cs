using SpinSim.Core.Fitting.Spectral;

namespace SpinSim.Core.Reporting;

/// <summary>
/// One row of a fitted-parameter table as a reader sees it: the label with its unit ("δ(HA)/ppm"), the value rounded
/// to its standard error in the concise form ("2.762000(8)"), the bootstrap error when there is one ("±0.000007"),
/// and the group the row is listed in.
/// </summary>
/// <param name="Sign">For a coupling the sign search judged: "determined" or "undetermined" (its relative sign); otherwise empty.</param>
public sealed record ParameterRow(string Label, string Value, string Bootstrap, ParameterGroup Group, string Sign = "");

/// <summary>The fitted-parameter table shared by the text output, the HTML report and the figure.</summary>
public static class FitTable
{
    /// <summary>
    /// Rows of <paramref name="result"/>, spin parameters first, then widths, then nuisance terms; a tied group is one row,
    /// on its first member, naming the others. With <paramref name="trueMinus"/> negative values get U+2212 (figures, HTML).
    /// </summary>
    public static IReadOnlyList<ParameterRow> Rows(SpectrumFitResult result, bool trueMinus = false)
    {
        ArgumentNullException.ThrowIfNull(result);
        var traces = Math.Max(1, result.Traces.Count);
        var byName = result.Parameters.ToDictionary(p => p.Name, StringComparer.Ordinal);
        var signs = (result.Solutions?.Signs ?? []).ToDictionary(s => s.Parameter, StringComparer.Ordinal);
        return result.Parameters.Select((p, i) => (p, i))
            .Where(t => t.p.TiedWith is null || !result.Parameters.Take(t.i).Any(q => t.p.TiedWith.Split(", ").Contains(q.Name)))
            .Select(t =>
            {
                var label = ParameterDisplay.Label(t.p, traces);
                if (t.p.TiedWith is { } others)
                    label += " (= " + string.Join(", ", others.Split(", ").Select(n => byName.TryGetValue(n, out var q)
                        ? WithoutUnit(ParameterDisplay.Label(q, traces)) : n)) + ")";
                var value = t.p.Varied && !double.IsFinite(t.p.StdError)
                    ? new UncertainValue(t.p.Value, double.NaN).Concise(ParameterDisplay.FallbackDecimals(t.p.Kind), trueMinus) + " (undetermined)"
                    : t.p.Varied ? ParameterDisplay.ValueText(t.p, trueMinus)
                    : new UncertainValue(t.p.Value, double.NaN).Concise(ParameterDisplay.FallbackDecimals(t.p.Kind), trueMinus)
                      // "held": the fit chose not to vary it (the warnings say why); "fixed": the setup did.
                      + (result.Setup?.Parameters[t.i].HeldBecause is not null ? " (held)" : " (fixed)");
                var boot = result.Bootstrap?.StdErrors[t.i] is { } b && double.IsFinite(b) && t.p.Varied
                    ? "±" + new UncertainValue(0, b).RoundedUncertainty() : "";
                var sign = signs.TryGetValue(t.p.Name, out var verdict) ? (verdict.Determined ? "determined" : "undetermined") : "";
                return (Row: new ParameterRow(label, value, boot, ParameterDisplay.GroupOf(t.p.Kind), sign), Order: (int)ParameterDisplay.GroupOf(t.p.Kind));
            })
            .OrderBy(t => t.Order) // stable: file order within a group
            .Select(t => t.Row).ToList();
    }

    /// <summary>The one-line key under every table: what the brackets and the ± mean.</summary>
    public static string Key(bool bootstrap) =>
        "Digits in parentheses: the standard error in the last digits (\"7.3520(1)\" is 7.3520 ± 0.0001), from the covariance matrix, " +
        "which assumes independent points and is therefore optimistic for a spectrum" +
        (bootstrap ? "; ±: the block-bootstrap standard error, which allows for correlated neighbouring points." : ".");

    /// <summary>
    /// A free value's name ("shift:HA=shift:HA'", as in <see cref="SpectrumFitResult.FreeNames"/>) as short labels without
    /// units, "δ(HA) = δ(HA′)", for the headings of a correlation table.
    /// </summary>
    public static string ShortLabel(SpectrumFitResult result, string freeName)
    {
        ArgumentNullException.ThrowIfNull(result);
        var traces = Math.Max(1, result.Traces.Count);
        return string.Join(" = ", (freeName ?? "").Split('=').Select(n =>
            result.Parameters.FirstOrDefault(p => p.Name == n) is { } p ? WithoutUnit(ParameterDisplay.Label(p, traces)) : n));
    }

    private static string WithoutUnit(string label)
    {
        var slash = label.LastIndexOf('/');
        var bracket = label.IndexOf(" [", StringComparison.Ordinal);
        if (slash < 0) return label;
        return bracket > slash ? label[..slash] + label[bracket..] : label[..slash];
    }
}
