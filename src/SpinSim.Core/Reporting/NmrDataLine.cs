// Multiplicity by the n + 1 rule and spin-system letters (A, B ... close shifts; X far; primes for chemically equivalent,
// magnetically inequivalent nuclei): common practice, no source; the letter convention follows J. A. Pople, W. G. Schneider,
// H. J. Bernstein, High-resolution Nuclear Magnetic Resonance, McGraw-Hill 1959.
using System.Globalization;
using System.Text;
using SpinSim.Core.Model;

namespace SpinSim.Core.Reporting;

/// <summary>One resonance of a data line: its shift, its multiplicity or spin-system part, its couplings and its nuclei.</summary>
/// <param name="Ids">Entries of the spin system that resonate here (chemically equivalent ones together, "HA", "HA'").</param>
/// <param name="Multiplicity">"s", "d", "t", "dd", "sept", "m", or a spin-system part such as "AA′BB′ part".</param>
/// <param name="FirstOrder">True when the n + 1 rule describes the pattern.</param>
/// <param name="Couplings">|J| in Hz of a first-order multiplet, largest first; for a spin-system part, the signed J
/// values of the whole system on its first resonance and none on the others.</param>
public sealed record DataLineGroup(IReadOnlyList<string> Ids, double ShiftPpm, string Multiplicity, bool FirstOrder,
    IReadOnlyList<double> Couplings, int Nuclei, int ShiftDecimals, int CouplingDecimals);

/// <summary>Optional facts for a data line: solvent, the fields stated, and uncertainties that limit the digits.</summary>
public sealed record DataLineOptions
{
    /// <summary>Solvent as the paper should name it ("CDCl3"); omitted when null or empty.</summary>
    public string? Solvent { get; init; }

    /// <summary>Fields in MHz for the header; the system's field when empty (a joint fit names every trace's field).</summary>
    public IReadOnlyList<double> FieldsMHz { get; init; } = [];

    /// <summary>Standard uncertainty of a fitted value by its fit-parameter name ("shift:HA", "j:HA-HB"); null when unknown.</summary>
    public Func<string, double?>? Uncertainty { get; init; }
}

/// <summary>
/// The line an experimental section quotes, in the usual form: "¹H NMR (400 MHz, CDCl3): δ 4.120 (q, 2H, J = 7.10 Hz),
/// 1.260 (t, 3H, J = 7.10 Hz)." Each resonance is a group of chemically equivalent nuclei (equal shift). Where every
/// coupling of a group is weak (|Δν/J| at least <see cref="FirstOrderRatio"/>) and its nuclei couple alike to every
/// partner, the multiplicity follows the n + 1 rule; otherwise the group is named as part of its spin system
/// ("AA′BB′ part", "ABX part"), and that system's couplings are listed once, on its first resonance.
/// </summary>
/// <remarks>
/// Digits: shifts get 3 decimals and couplings 2 (common practice for ¹H), or fewer when a fitted uncertainty says the
/// last digits are noise (rounded to the uncertainty's decimal place, <see cref="UncertainValue"/>). Couplings that
/// differ by less than <see cref="SameCouplingHz"/> count as one partner set ("sept" for two methyls, not "qq").
/// </remarks>
public static class NmrDataLine
{
    /// <summary>Below this |Δν/J| a pair is strongly coupled and the n + 1 rule fails (common practice, no source).</summary>
    public const double FirstOrderRatio = 10;

    /// <summary>Couplings closer than this are read as one splitting (common practice, no source).</summary>
    public const double SameCouplingHz = 0.05;

    /// <summary>More partner sets than this, or more groups than <see cref="MaxSystemGroups"/> in a system, are written "m".</summary>
    public const int MaxMultiplicityLetters = 3, MaxSystemGroups = 5;

    public const int DefaultShiftDecimals = 3, DefaultCouplingDecimals = 2;

    private static readonly string[] Names = ["s", "d", "t", "q", "quint", "sext", "sept"];

    /// <summary>The resonances of <paramref name="system"/>'s observed isotope, highest shift first.</summary>
    public static IReadOnlyList<DataLineGroup> Groups(SpinSystem system, DataLineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(system);
        options ??= new DataLineOptions();
        var j = system.CouplingMatrixHz();
        var n = system.Nuclei.Count;
        var observed = Enumerable.Range(0, n).Where(i => system.Nuclei[i].Isotope == system.Observed).ToArray();

        // Chemically equivalent: same isotope, same shift.
        var groups = observed.GroupBy(i => system.Nuclei[i].Shift.Value).Select(g => g.ToArray())
            .OrderByDescending(g => system.Nuclei[g[0]].Shift.Value).ToList();
        var groupOf = new int[n];
        Array.Fill(groupOf, -1);
        for (var g = 0; g < groups.Count; g++) foreach (var i in groups[g]) groupOf[i] = g;

        // Magnetically inequivalent members: they couple differently to some nucleus outside their group.
        var inequivalentTo = groups.Select(g => Enumerable.Range(0, n)
            .Where(k => !g.Contains(k) && g.Any(i => Math.Abs(j[i, k] - j[g[0], k]) > 1e-9)).ToArray()).ToArray();

        var root = Enumerable.Range(0, groups.Count).ToArray();
        int Find(int x) => root[x] == x ? x : root[x] = Find(root[x]);
        void Join(int a, int b) => root[Find(a)] = Find(b);
        var strong = new bool[groups.Count, groups.Count];
        for (var a = 0; a < groups.Count; a++)
            for (var b = a + 1; b < groups.Count; b++)
                if (groups[a].Any(i => groups[b].Any(k => IsStrong(system, j, i, k)))) { strong[a, b] = strong[b, a] = true; Join(a, b); }
        for (var a = 0; a < groups.Count; a++)
            foreach (var k in inequivalentTo[a])
                if (groupOf[k] >= 0) Join(a, groupOf[k]);

        // A system: strongly coupled or magnetically inequivalent groups, plus the weakly coupled groups attached to it
        // (the X of ABX), whose pattern the strong coupling also distorts.
        var core = Enumerable.Range(0, groups.Count).GroupBy(Find).Select(c => c.ToArray())
            .Where(c => c.Length > 1 || inequivalentTo[c[0]].Length > 0).ToList();
        var systemOf = new int[groups.Count];
        Array.Fill(systemOf, -1);
        var members = new List<(List<int> Core, List<int> Attached)>();
        foreach (var c in core)
        {
            foreach (var g in c) systemOf[g] = members.Count;
            members.Add((c.ToList(), []));
        }
        for (var g = 0; g < groups.Count; g++)
        {
            if (systemOf[g] >= 0) continue;
            var partnerSystems = Enumerable.Range(0, groups.Count)
                .Where(h => systemOf[h] >= 0 && members[systemOf[h]].Core.Contains(h) && Couples(j, groups[g], groups[h]))
                .Select(h => systemOf[h]).Distinct().ToArray();
            if (partnerSystems.Length == 0) continue;
            systemOf[g] = partnerSystems[0];
            members[partnerSystems[0]].Attached.Add(g);
        }

        var result = new DataLineGroup[groups.Count];
        for (var g = 0; g < groups.Count; g++)
        {
            var shift = system.Nuclei[groups[g][0]].Shift.Value;
            var shiftDecimals = Decimals(options, groups[g].Select(i => $"shift:{system.Nuclei[i].Id}"), DefaultShiftDecimals);
            var nuclei = groups[g].Sum(i => system.Nuclei[i].Count);
            var ids = groups[g].Select(i => system.Nuclei[i].Id).ToArray();
            if (systemOf[g] < 0)
            {
                var (multiplicity, js) = FirstOrderPattern(system, j, groups[g][0], groups[g]);
                var jDecimals = Decimals(options, CouplingNames(system, groups[g]), DefaultCouplingDecimals);
                result[g] = new DataLineGroup(ids, shift, multiplicity, true, js, nuclei, shiftDecimals, jDecimals);
            }
            else
            {
                var (coreGroups, attached) = members[systemOf[g]];
                var all = coreGroups.Concat(attached).ToList();
                var first = all.Min() == g;
                var entries = all.SelectMany(h => groups[h]).ToArray();
                var js = first ? SystemCouplings(j, entries) : [];
                var label = all.Count > MaxSystemGroups ? "m" : SystemLabel(system, groups, strong, coreGroups, attached);
                var jDecimals = Decimals(options, CouplingNames(system, entries), DefaultCouplingDecimals);
                result[g] = new DataLineGroup(ids, shift, label, false, js, nuclei, shiftDecimals, jDecimals);
            }
        }
        return result;
    }

    /// <summary>The whole line, "¹H NMR (400 MHz, CDCl3): δ 7.352 (AA′BB′ part, 2H, J = 8.45, 2.05 Hz), …", true minus signs.</summary>
    public static string Format(SpinSystem system, DataLineOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(system);
        options ??= new DataLineOptions();
        var inv = CultureInfo.InvariantCulture;
        var fields = (options.FieldsMHz.Count > 0 ? options.FieldsMHz : [system.Observed.ObserveMHz(system.Field)]).Select(Nominal).Distinct().ToArray();
        var fieldText = fields.Length == 1
            ? fields[0].ToString("0.#", inv) + " MHz"
            : string.Join(", ", fields.Take(fields.Length - 1).Select(f => f.ToString("0.#", inv))) + " and " + fields[^1].ToString("0.#", inv) + " MHz";
        var header = string.IsNullOrWhiteSpace(options.Solvent) ? fieldText : $"{fieldText}, {options.Solvent.Trim()}";
        var text = new StringBuilder($"{Typography.Isotope(system.Observed.Symbol)} NMR ({header}): δ ");
        var parts = Groups(system, options).Select(g =>
        {
            var detail = $"{g.Multiplicity}, {g.Nuclei}{NucleusLetter(system.Observed.Symbol)}";
            if (g.Couplings.Count > 0)
                detail += ", J = " + string.Join(", ", g.Couplings.Select(x => Typography.TrueMinus(UncertainValue.Round(x, g.CouplingDecimals)))) + " Hz";
            return $"{Typography.TrueMinus(UncertainValue.Round(g.ShiftPpm, g.ShiftDecimals))} ({detail})";
        });
        text.Append(string.Join(", ", parts)).Append('.');
        return text.ToString(); // true minus signs in the numbers only: a solvent such as DMSO-d6 keeps its hyphen
    }

    /// <summary>
    /// The spectrometer's nominal frequency as papers quote it: 399.78 MHz is a "400 MHz" instrument. To the nearest 10 MHz
    /// from 100 MHz up, to the nearest 1 MHz below (benchtop 43, 60, 80 MHz) (common practice, no source).
    /// </summary>
    public static double Nominal(double observeMHz) =>
        observeMHz >= 100 ? Math.Round(observeMHz / 10, MidpointRounding.AwayFromZero) * 10 : Math.Round(observeMHz, MidpointRounding.AwayFromZero);

    /// <summary>"d", "t", "q", "quint", "sext", "sept" for n equivalent partners, "m" beyond.</summary>
    public static string SplittingName(int partners) => partners >= 0 && partners < Names.Length ? Names[partners] : "m";

    /// <summary>
    /// Multiplicity of a first-order pattern from its partner sets (n nuclei each, splitting |J|), largest J first:
    /// "s" with none, "dd", "dt", … and "m" for more than <see cref="MaxMultiplicityLetters"/> sets or a set beyond "sept".
    /// </summary>
    public static string Multiplicity(IReadOnlyList<(double JHz, int Count)> partnerSets)
    {
        var sets = partnerSets.Where(s => s.JHz != 0 && s.Count > 0).OrderByDescending(s => Math.Abs(s.JHz)).ToList();
        if (sets.Count == 0) return "s";
        if (sets.Count > MaxMultiplicityLetters || sets.Any(s => s.Count >= Names.Length)) return "m";
        return string.Concat(sets.Select(s => Names[s.Count]));
    }

    private static bool IsStrong(SpinSystem system, double[,] j, int a, int b)
    {
        if (j[a, b] == 0) return false;
        return Math.Abs(system.FrequencyHz(a) - system.FrequencyHz(b)) / Math.Abs(j[a, b]) < FirstOrderRatio;
    }

    private static bool Couples(double[,] j, int[] a, int[] b) => a.Any(i => b.Any(k => j[i, k] != 0));

    // Partners of one representative entry (all members couple alike, or the group would not be first order), merged by |J|.
    private static (string Multiplicity, double[] Couplings) FirstOrderPattern(SpinSystem system, double[,] j, int entry, int[] group)
    {
        var sets = new List<(double JHz, int Count)>();
        for (var p = 0; p < system.Nuclei.Count; p++)
        {
            if (group.Contains(p) || j[entry, p] == 0) continue;
            var magnitude = Math.Abs(j[entry, p]);
            var same = sets.FindIndex(s => Math.Abs(s.JHz - magnitude) < SameCouplingHz);
            if (same >= 0) sets[same] = (sets[same].JHz, sets[same].Count + system.Nuclei[p].Count);
            else sets.Add((magnitude, system.Nuclei[p].Count));
        }
        var multiplicity = Multiplicity(sets);
        return (multiplicity, sets.Select(s => s.JHz).OrderByDescending(x => x).ToArray());
    }

    // Distinct signed couplings among the entries of a system (and to nuclei of other isotopes, which split it too).
    private static double[] SystemCouplings(double[,] j, int[] entries)
    {
        var values = new List<double>();
        foreach (var a in entries)
            for (var b = 0; b < j.GetLength(0); b++)
                if ((b > a || !entries.Contains(b)) && j[a, b] != 0 && !values.Any(v => Math.Abs(v - j[a, b]) < 1e-9))
                    values.Add(j[a, b]);
        return values.OrderByDescending(Math.Abs).ToArray();
    }

    // Letters: the strongly coupled core in blocks of mutually strong groups, A, B, C... for the first block, then M or
    // X for further blocks; attached weakly coupled groups X, Y, Z. Primes for magnetically inequivalent members,
    // subscripts for counts. The result names the whole system, "ABX part".
    private static string SystemLabel(SpinSystem system, List<int[]> groups, bool[,] strong, List<int> core, List<int> attached)
    {
        var blocks = new List<List<int>>();
        foreach (var g in core.OrderByDescending(g => system.Nuclei[groups[g][0]].Shift.Value))
        {
            var block = blocks.FirstOrDefault(b => b.Any(h => strong[g, h]));
            if (block is null) blocks.Add([g]);
            else block.Add(g);
        }
        var text = new StringBuilder();
        char[] starts = attached.Count > 0
            ? blocks.Count switch { 1 => ['A'], 2 => ['A', 'M'], _ => ['A', 'K', 'M', 'P'] }
            : blocks.Count switch { 1 => ['A'], 2 => ['A', 'X'], 3 => ['A', 'M', 'X'], _ => ['A', 'K', 'M', 'X'] };
        var next = 0;
        foreach (var block in blocks)
        {
            var letter = starts[Math.Min(next++, starts.Length - 1)];
            foreach (var g in block) text.Append(Letters(system, groups[g], letter++));
        }
        if (attached.Count > 0)
        {
            var letter = 'X';
            foreach (var g in attached.OrderByDescending(g => system.Nuclei[groups[g][0]].Shift.Value))
                text.Append(Letters(system, groups[g], letter++));
        }
        return text + " part";
    }

    private static string Letters(SpinSystem system, int[] group, char letter)
    {
        var counts = group.Select(i => system.Nuclei[i].Count).ToArray();
        var text = new StringBuilder();
        for (var m = 0; m < counts.Length; m++)
        {
            text.Append(letter).Append(new string(Typography.Prime, m));
            if (counts[m] > 1) text.Append(Typography.Subscript(counts[m]));
        }
        return text.ToString();
    }

    private static IEnumerable<string> CouplingNames(SpinSystem system, int[] entries) =>
        system.Couplings.Where(c => entries.Contains(system.IndexOf(c.A)) || entries.Contains(system.IndexOf(c.B))).Select(c => $"j:{c.A}-{c.B}");

    // The coarsest decimal place any of the named values supports, but never finer than the usual default.
    private static int Decimals(DataLineOptions options, IEnumerable<string> names, int usual)
    {
        if (options.Uncertainty is null) return usual;
        var decimals = usual;
        foreach (var name in names)
            if (options.Uncertainty(name) is { } u && new UncertainValue(0, u).Decimals is { } d)
                decimals = Math.Min(decimals, Math.Max(d, 0));
        return decimals;
    }

    private static string NucleusLetter(string isotope) => isotope.TrimStart("0123456789".ToCharArray());
}
