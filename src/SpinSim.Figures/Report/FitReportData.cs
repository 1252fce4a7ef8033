using SpinSim.Core.Reporting;

namespace SpinSim.Figures.Report;

/// <summary>
/// Correlation coefficients between fitted parameters: <see cref="Matrix"/>[i, j] between
/// <see cref="Names"/>[i] and <see cref="Names"/>[j], in [-1, 1], square with one row per name.
/// </summary>
public sealed record ParameterCorrelation(IReadOnlyList<string> Names, double[,] Matrix);

/// <summary>
/// Everything a fit report shows. <see cref="SvgFigure"/> is SVG markup (for instance the fit figure rendered
/// as SVG, without its table), embedded in the page; empty for none. <see cref="Inputs"/> names each input file with the
/// SHA-256 of its bytes in hex, so that a reader can check the report belongs to the files at hand.
/// </summary>
public sealed record FitReportData(
    string Title,
    string SvgFigure,
    IReadOnlyList<ParameterRow> Parameters,
    IReadOnlyList<string> Warnings,
    IReadOnlyList<(string Name, string Sha256)> Inputs,
    string Version,
    DateTimeOffset Created,
    IReadOnlyList<(string Label, string Value)> Statistics,
    ParameterCorrelation? Correlation = null)
{
    /// <summary>Heading of the error column (say what a second value in brackets is).</summary>
    public string ErrorHeading { get; init; } = "std. error";

    /// <summary>The one-line key saying what the brackets and the ± of the table mean (<see cref="FitTable.Key"/>).</summary>
    public string TableKey { get; init; } = "";

    /// <summary>The data line for a paper (<see cref="NmrDataLine"/>); empty for none.</summary>
    public string ReportLine { get; init; } = "";

    /// <summary>
    /// The fit's setup as the JSON report records it, flattened to key and value (<see cref="SetupTable.Flatten"/>), so
    /// whatever the record holds appears here without a change to the page.
    /// </summary>
    public IReadOnlyList<(string Key, string Value)> Setup { get; init; } = [];

    /// <summary>Shown at the top in a banner when set: the fit did not converge, or was stopped.</summary>
    public string? Banner { get; init; }

    /// <summary>What the sign search tried, each coupling's relative sign and the alternative solutions, in words (one line each).</summary>
    public IReadOnlyList<string> SolutionLines { get; init; } = [];
}
