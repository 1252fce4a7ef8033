using SpinSim.Core.Units;

namespace SpinSim.Core.Model;

/// <summary>
/// One entry of a spin system: a single nucleus, or a set of <see cref="Count"/> magnetically equivalent
/// nuclei (a methyl is one entry with count 3). Width, when given, is the FWHM of this entry's lines.
/// </summary>
public sealed record Nucleus(string Id, ShiftPpm Shift, int Count, Isotope Isotope, WidthHz? Width = null)
{
    public Nucleus(string id, double shiftPpm, int count = 1, Isotope? isotope = null)
        : this(id, new ShiftPpm(shiftPpm), count, isotope ?? Isotope.H1) { }
}

/// <summary>A scalar coupling between two entries, signed, in Hz. Between sets it is the coupling of any member pair.</summary>
public sealed record Coupling(string A, string B, CouplingHz J)
{
    public Coupling(string a, string b, double jHz) : this(a, b, new CouplingHz(jHz)) { }
}

/// <summary>
/// An isotropic-liquid spin system at a spectrometer field. Immutable; construct through
/// <see cref="Create"/>, which refuses an inconsistent system with <see cref="SpinSystemException"/>.
/// </summary>
public sealed record SpinSystem
{
    public string Title { get; }
    public FieldMHz Field { get; }
    public Isotope Observed { get; }
    public IReadOnlyList<Nucleus> Nuclei { get; }
    public IReadOnlyList<Coupling> Couplings { get; }

    /// <summary>Legal but implausible values (see <see cref="SpinSystemRules.Warnings"/>), found when the system was made.</summary>
    public IReadOnlyList<SpinSystemProblem> Warnings { get; }

    private readonly Dictionary<string, int> _index;

    private SpinSystem(string title, FieldMHz field, Isotope observed, IReadOnlyList<Nucleus> nuclei, IReadOnlyList<Coupling> couplings)
    {
        Title = title;
        Field = field;
        Observed = observed;
        Nuclei = nuclei;
        Couplings = couplings;
        _index = nuclei.Select((n, i) => (n.Id, i)).ToDictionary(t => t.Id, t => t.i, StringComparer.Ordinal);
        Warnings = SpinSystemRules.Warnings(this);
    }

    public static SpinSystem Create(FieldMHz field, IEnumerable<Nucleus> nuclei, IEnumerable<Coupling> couplings,
        string title = "", Isotope? observed = null)
    {
        var n = nuclei.ToArray();
        var c = couplings.ToArray();
        var problems = SpinSystemRules.Check(field, n, c);
        if (problems.Count > 0) throw new SpinSystemException(problems);
        return new SpinSystem(title, field, observed ?? Isotope.H1, n, c);
    }

    public int IndexOf(string id) => _index.TryGetValue(id, out var i) ? i : -1;

    /// <summary>Symmetric matrix of couplings in Hz between entries (zero diagonal).</summary>
    public double[,] CouplingMatrixHz()
    {
        var m = new double[Nuclei.Count, Nuclei.Count];
        foreach (var c in Couplings)
        {
            var (i, j) = (IndexOf(c.A), IndexOf(c.B));
            m[i, j] = m[j, i] = c.J.Value;
        }
        return m;
    }

    /// <summary>Rotating-frame frequency of entry <paramref name="i"/> in Hz: delta x SF of its own isotope.</summary>
    public double FrequencyHz(int i) => Nuclei[i].Shift.Value * Nuclei[i].Isotope.ObserveMHz(Field);

    public int ObservedNucleusCount => Nuclei.Where(n => n.Isotope == Observed).Sum(n => n.Count);

    public SpinSystem WithField(FieldMHz field) => Create(field, Nuclei, Couplings, Title, Observed);

    public SpinSystem WithNuclei(IEnumerable<Nucleus> nuclei) => Create(Field, nuclei, Couplings, Title, Observed);

    public SpinSystem WithCouplings(IEnumerable<Coupling> couplings) => Create(Field, Nuclei, couplings, Title, Observed);

    public SpinSystem WithTitle(string title) => new(title, Field, Observed, Nuclei, Couplings);
}
