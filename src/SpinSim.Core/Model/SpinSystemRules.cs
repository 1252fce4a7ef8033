using SpinSim.Core.Errors;
using SpinSim.Core.Units;

namespace SpinSim.Core.Model;

/// <summary>Where a problem sits in a spin system: the field, a nucleus entry (by index), a coupling (by index) or the system as a whole.</summary>
public enum ProblemSite { Field, Nucleus, Coupling, System }

/// <summary>One thing wrong with a spin system, with the fix in words. Readers map the site to a file line.</summary>
public sealed record SpinSystemProblem(ProblemSite Site, int Index, string Message, string Fix)
{
    public override string ToString() => $"{Message}. {Fix}";
}

/// <summary>
/// The one place that decides whether a spin system is consistent (<see cref="Check"/>: refusals) and whether it is
/// plausible (<see cref="Warnings"/>: legal values that look like a unit slip). File readers reuse both for their messages.
/// </summary>
public static class SpinSystemRules
{
    /// <summary>Above this |J| a 1H-1H coupling is unusual (common practice, no source; the largest, geminal in strained rings, stay below it): warn, do not refuse.</summary>
    public const double UnusualProtonCouplingHz = 30.0;

    /// <summary>1H shifts outside this range (ppm) are unusual for diamagnetic compounds (common practice, no source): warn.</summary>
    public const double UsualProtonShiftLowPpm = -5, UsualProtonShiftHighPpm = 20;

    /// <summary>
    /// Spectrometer 1H frequencies outside this range (MHz) are unusual: the weakest benchtop magnets run at about 40 MHz,
    /// the strongest high-field magnets at about 1.2 GHz (common practice, no source). Below it, the value is often a
    /// field in tesla typed as MHz: warn.
    /// </summary>
    public const double UsualFieldLowMHz = 20, UsualFieldHighMHz = 1300;

    /// <summary>
    /// Hard limits of the field, in MHz of 1H. Far outside any spectrometer (the field planner looks up to the top one
    /// for the high-field limit); inside them, with shifts within <see cref="MaxAbsShiftPpm"/>, frequencies stay below
    /// 1e11 Hz and the eigenvalues keep their couplings to better than 1e-4 Hz in double precision.
    /// </summary>
    public const double MinFieldMHz = 1e-3, MaxFieldMHz = 1e7;

    /// <summary>Hard limit of |shift| in ppm: beyond the shift range of every isotope SpinSim knows; a larger value is a slip.</summary>
    public const double MaxAbsShiftPpm = 1e4;

    /// <summary>Hard limit of |J| in Hz: about a hundred times the largest one-bond couplings.</summary>
    public const double MaxAbsCouplingHz = 1e5;

    /// <summary>Hard limit of a linewidth in Hz.</summary>
    public const double MaxLinewidthHz = 1e6;

    /// <summary>
    /// Hard limit of the number of nuclei, counting every member of an equivalent set: the total intensity N 2^(N-1)
    /// (the sum rule every result is checked against) must stay a finite double, which it does up to about 1015.
    /// </summary>
    public const int MaxNuclei = 1000;

    /// <summary>
    /// Hard limit of the count of one set of equivalent nuclei. Its total spins reach F = 32 (65 states) and its
    /// multiplicities C(64, 32) - C(64, 31), past 2^63, are computed exactly; tests run at this limit.
    /// </summary>
    public const int MaxCount = 64;

    public static IReadOnlyList<SpinSystemProblem> Check(FieldMHz field, IReadOnlyList<Nucleus> nuclei, IReadOnlyList<Coupling> couplings)
    {
        var problems = new List<SpinSystemProblem>();
        if (!double.IsFinite(field.Value) || field.Value <= 0)
            problems.Add(new(ProblemSite.Field, 0, $"field must be a finite 1H frequency above 0 MHz, got {field.Value}",
                "Give the spectrometer's 1H frequency, for example field_mhz = 400"));
        else if (field.Value < MinFieldMHz || field.Value > MaxFieldMHz)
            problems.Add(new(ProblemSite.Field, 0, $"field of {field.Value:G6} MHz is outside the {MinFieldMHz:G3} to {MaxFieldMHz:G3} MHz that SpinSim accepts",
                field.Value / 1e6 is >= UsualFieldLowMHz and <= UsualFieldHighMHz
                    ? $"Give the 1H frequency in MHz, not Hz: field_mhz = {field.Value / 1e6:G6} if {field.Value:G6} is in Hz"
                    : "Give the spectrometer's 1H frequency in MHz, for example field_mhz = 400, or the field in tesla as field_tesla = 9.4"));

        var seen = new Dictionary<string, int>(StringComparer.Ordinal);
        long total = 0;
        for (var i = 0; i < nuclei.Count; i++)
        {
            var n = nuclei[i];
            if (string.IsNullOrWhiteSpace(n.Id))
                problems.Add(new(ProblemSite.Nucleus, i, "a nucleus has an empty id", "Give every nucleus a short unique id such as \"H1\" or \"Me\""));
            else if (!seen.TryAdd(n.Id, i))
                problems.Add(new(ProblemSite.Nucleus, i, $"duplicate nucleus id \"{n.Id}\" (first used by entry {seen[n.Id] + 1})",
                    "Give each nucleus its own id; for magnetically equivalent nuclei use one entry with count = n"));
            if (!double.IsFinite(n.Shift.Value))
                problems.Add(new(ProblemSite.Nucleus, i, $"shift of \"{n.Id}\" is not a finite number", "Give shift_ppm as a plain number such as 7.26"));
            else if (Math.Abs(n.Shift.Value) > MaxAbsShiftPpm)
                problems.Add(new(ProblemSite.Nucleus, i, $"shift of \"{n.Id}\" is {n.Shift.Value:G6} ppm, beyond the +-{MaxAbsShiftPpm:G3} ppm that SpinSim accepts",
                    "Give shift_ppm in ppm from the reference, such as 7.26"));
            if (n.Count < 1)
                problems.Add(new(ProblemSite.Nucleus, i, $"count of \"{n.Id}\" is {n.Count}, must be at least 1",
                    "Use count = 1 for a single nucleus, 2 or more for a set of magnetically equivalent nuclei"));
            else if (n.Count > MaxCount)
                problems.Add(new(ProblemSite.Nucleus, i, $"count of \"{n.Id}\" is {n.Count}; sets of more than {MaxCount} equivalent nuclei are not supported",
                    "Check the value; a tert-butyl group has count = 9"));
            else total += n.Count;
            if (n.Width is { } w && (!double.IsFinite(w.Value) || w.Value <= 0 || w.Value > MaxLinewidthHz))
                problems.Add(new(ProblemSite.Nucleus, i, $"linewidth of \"{n.Id}\" must be a width above 0 and at most {MaxLinewidthHz:G3} Hz, got {w.Value}",
                    "Give linewidth_hz as the full width at half maximum, for example 0.8"));
        }
        if (total > MaxNuclei)
        {
            var largest = Enumerable.Range(0, nuclei.Count).MaxBy(i => nuclei[i].Count);
            problems.Add(new(ProblemSite.Nucleus, largest, $"the system has {total} nuclei in all, more than the {MaxNuclei} SpinSim can simulate " +
                "(its total intensity N 2^(N-1) would leave double precision)",
                $"Lower the counts; the largest entry, \"{nuclei[largest].Id}\", has count = {nuclei[largest].Count}"));
        }

        var pairs = new Dictionary<(string, string), int>();
        for (var k = 0; k < couplings.Count; k++)
        {
            var c = couplings[k];
            var aKnown = seen.ContainsKey(c.A);
            var bKnown = seen.ContainsKey(c.B);
            if (!aKnown) problems.Add(UnknownId(k, c.A, seen.Keys));
            if (!bKnown) problems.Add(UnknownId(k, c.B, seen.Keys));
            if (c.A == c.B)
            {
                problems.Add(new(ProblemSite.Coupling, k, $"coupling of \"{c.A}\" with itself",
                    "Couplings inside a set of equivalent nuclei do not change the spectrum; remove this coupling, or split the set into separate nuclei if they are not equivalent"));
                continue;
            }
            if (!double.IsFinite(c.J.Value))
                problems.Add(new(ProblemSite.Coupling, k, $"coupling {c.A}-{c.B} is not a finite number", "Give j_hz as a plain number such as 7.5"));
            else if (Math.Abs(c.J.Value) > MaxAbsCouplingHz)
                problems.Add(new(ProblemSite.Coupling, k, $"coupling {c.A}-{c.B} is {c.J.Value:G6} Hz, beyond the +-{MaxAbsCouplingHz:G3} Hz that SpinSim accepts",
                    "Give j_hz in Hz, such as 7.5"));
            var key = string.CompareOrdinal(c.A, c.B) < 0 ? (c.A, c.B) : (c.B, c.A);
            if (!pairs.TryAdd(key, k))
                problems.Add(new(ProblemSite.Coupling, k, $"coupling {c.A}-{c.B} is given twice (also coupling {pairs[key] + 1})",
                    "Keep one value for each pair of nuclei"));
        }
        return problems;
    }

    /// <summary>
    /// Values that are legal but likely a slip (a field in tesla typed as MHz, a 1H shift or 1H-1H coupling far outside
    /// the usual range) and a system with nothing to observe: warnings, with the site so a reader can name the line.
    /// </summary>
    public static IReadOnlyList<SpinSystemProblem> Warnings(SpinSystem system)
    {
        var list = new List<SpinSystemProblem>();
        var field = system.Field.Value;
        if (field < UsualFieldLowMHz)
            list.Add(new(ProblemSite.Field, 0, $"the field is {field:G6} MHz, below the {UsualFieldLowMHz:G3} MHz of any benchtop spectrometer",
                $"If {field:G6} is the field in tesla, write field_tesla = {field:G6} (a {FieldMHz.FromTesla(field).Value:0.#} MHz instrument)"));
        else if (field > UsualFieldHighMHz)
            list.Add(new(ProblemSite.Field, 0, $"the field is {field:G6} MHz, above the {UsualFieldHighMHz:G4} MHz of the strongest spectrometers",
                "Give the 1H frequency in MHz (field_mhz = 400) or the field in tesla (field_tesla = 9.4)"));
        for (var i = 0; i < system.Nuclei.Count; i++)
        {
            var n = system.Nuclei[i];
            if (n.Isotope == Isotope.H1 && (n.Shift.Value < UsualProtonShiftLowPpm || n.Shift.Value > UsualProtonShiftHighPpm))
                list.Add(new(ProblemSite.Nucleus, i, $"the 1H shift of \"{n.Id}\" is {n.Shift.Value:G6} ppm, outside the usual {UsualProtonShiftLowPpm} to {UsualProtonShiftHighPpm} ppm",
                    "Check the value and its unit (ppm, not Hz)"));
        }
        for (var k = 0; k < system.Couplings.Count; k++)
        {
            var c = system.Couplings[k];
            var a = system.Nuclei[system.IndexOf(c.A)];
            var b = system.Nuclei[system.IndexOf(c.B)];
            if (a.Isotope == Isotope.H1 && b.Isotope == Isotope.H1 && Math.Abs(c.J.Value) > UnusualProtonCouplingHz)
                list.Add(new(ProblemSite.Coupling, k, $"coupling {c.A}-{c.B} = {c.J.Value:G6} Hz is larger than the usual 1H-1H range (|J| <= {UnusualProtonCouplingHz} Hz)",
                    "Check the value and its unit (Hz, not ppm)"));
        }
        if (system.ObservedNucleusCount == 0)
            list.Add(new(ProblemSite.System, 0, $"the system has no {system.Observed} nuclei, so its {system.Observed} spectrum is empty",
                $"Add {system.Observed} nuclei, or observe an isotope the system has"));
        return list;
    }

    private static SpinSystemProblem UnknownId(int k, string id, IEnumerable<string> known) =>
        new(ProblemSite.Coupling, k, $"coupling refers to unknown nucleus id \"{id}\"",
            $"Use one of the ids defined under nuclei: {string.Join(", ", known.Take(12))}");
}

/// <summary>An inconsistent spin system; carries every problem found, not only the first.</summary>
public sealed class SpinSystemException(IReadOnlyList<SpinSystemProblem> problems)
    : InputException(null, null, string.Join("; ", problems.Select(p => p.ToString())))
{
    public IReadOnlyList<SpinSystemProblem> Problems { get; } = problems;
}
