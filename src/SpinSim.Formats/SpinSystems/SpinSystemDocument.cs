using SpinSim.Core.Errors;
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Formats.SpinSystems;

/// <summary>What a spin-system file holds: the system, the default linewidth and where things were written.</summary>
/// <param name="DefaultWidth">Global FWHM for lines whose nuclei state no width of their own, when the file gives one.</param>
/// <param name="Lines">The file line of the field, of each nucleus entry and of each coupling, for located messages.</param>
/// <param name="Fit">The optional [fit] section, as read (interpreted by the fitting setup reader).</param>
public sealed record SpinSystemDocument(
    string Path,
    SpinSystem System,
    WidthHz? DefaultWidth,
    SourceLines Lines,
    FitSection? Fit = null)
{
    /// <summary>Symmetries declared with [[symmetry]] tables (checked against the system).</summary>
    public IReadOnlyList<MirrorSymmetry> Symmetries { get; init; } = [];

    /// <summary>The system's plausibility warnings, each naming the file and line of the value it is about.</summary>
    public IReadOnlyList<string> Warnings => Describe(System.Warnings);

    /// <summary>Findings about this file's system as "FILE, line N: PROBLEM. FIX".</summary>
    public IReadOnlyList<string> Describe(IEnumerable<SpinSystemProblem> problems) =>
        problems.Select(p => InputException.Compose(Path, Lines.Of(p), p.Message, p.Fix)).ToList();

    /// <summary>
    /// The document of a file whose values have been read: the system is checked by <see cref="SpinSystemRules"/> and
    /// the first problem refused with its line (the count of the others in brackets).
    /// </summary>
    /// <exception cref="SpinSystemFileException">The values do not make a consistent system.</exception>
    public static SpinSystemDocument Build(string path, FieldMHz field, IReadOnlyList<Nucleus> nuclei, IReadOnlyList<Coupling> couplings,
        string title, Isotope observed, WidthHz? defaultWidth, SourceLines lines, FitSection? fit = null)
    {
        var problems = SpinSystemRules.Check(field, nuclei, couplings);
        if (problems.Count > 0)
        {
            var p = problems[0];
            throw new SpinSystemFileException(path, lines.Of(p), p.Message + (problems.Count > 1 ? $" (and {problems.Count - 1} more problem(s))" : ""), p.Fix);
        }
        if (defaultWidth is { } w && !(w.Value > 0 && w.Value <= SpinSystemRules.MaxLinewidthHz))
            throw new SpinSystemFileException(path, lines.DefaultWidth, $"linewidth_hz is {w.Value}, must be above 0 and at most {SpinSystemRules.MaxLinewidthHz:G3} Hz",
                "Give the full width at half maximum in Hz, for example 0.8");
        return new SpinSystemDocument(path, SpinSystem.Create(field, nuclei, couplings, title, observed), defaultWidth, lines, fit);
    }
}

/// <summary>Where the values of a spin-system file were written: 1-based lines, null where not known.</summary>
public sealed record SourceLines(int? Field, IReadOnlyList<int?> Nuclei, IReadOnlyList<int?> Couplings, int? DefaultWidth = null)
{
    /// <summary>The line of the value a problem or warning is about.</summary>
    public int? Of(SpinSystemProblem problem) => problem.Site switch
    {
        ProblemSite.Field => Field,
        ProblemSite.Nucleus => problem.Index < Nuclei.Count ? Nuclei[problem.Index] : null,
        ProblemSite.Coupling => problem.Index < Couplings.Count ? Couplings[problem.Index] : null,
        _ => null,
    };
}

/// <summary>The raw [fit] section of a spin-system or fit file: key/value pairs with their line numbers.</summary>
public sealed record FitSection(string Path, IReadOnlyList<FitEntry> Entries);

/// <summary>One value of a [fit] section. Value is a double, long, string, bool, or an object[] of those.</summary>
public sealed record FitEntry(string Table, string Key, object Value, int Line);
