using SpinSim.Core.Units;

namespace SpinSim.Core.Model;

/// <summary>Where a problem sits in a spin system: the field, a nucleus entry (by index) or a coupling (by index).</summary>
public enum ProblemSite { Field, Nucleus, Coupling }

/// <summary>One thing wrong with a spin system, with the fix in words. Readers map the site to a file line.</summary>
public sealed record SpinSystemProblem(ProblemSite Site, int Index, string Message, string Fix)
{
    public override string ToString() => $"{Message}. {Fix}";
}

/// <summary>The one place that decides whether a spin system is consistent; file readers reuse it for their messages.</summary>
public static class SpinSystemRules
{
    /// <summary>Above this |J| a 1H-1H coupling is unusual (common practice, no source): warn, do not refuse.</summary>
    public const double UnusualProtonCouplingHz = 25.0;

    public static IReadOnlyList<SpinSystemProblem> Check(FieldMHz field, IReadOnlyList<Nucleus> nuclei, IReadOnlyList<Coupling> couplings)
    {
        var problems = new List<SpinSystemProblem>();
        if (!double.IsFinite(field.Value) || field.Value <= 0)
            problems.Add(new(ProblemSite.Field, 0, $"field must be a finite 1H frequency above 0 MHz, got {field.Value}",
                "Give the spectrometer's 1H frequency, for example field_mhz = 400"));

        var seen = new Dictionary<string, int>(StringComparer.Ordinal);
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
            if (n.Count < 1)
                problems.Add(new(ProblemSite.Nucleus, i, $"count of \"{n.Id}\" is {n.Count}, must be at least 1",
                    "Use count = 1 for a single nucleus, 2 or more for a set of magnetically equivalent nuclei"));
            if (n.Width is { } w && (!double.IsFinite(w.Value) || w.Value <= 0))
                problems.Add(new(ProblemSite.Nucleus, i, $"linewidth of \"{n.Id}\" must be a finite width above 0 Hz, got {w.Value}",
                    "Give linewidth_hz as the full width at half maximum, for example 0.8"));
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
            var key = string.CompareOrdinal(c.A, c.B) < 0 ? (c.A, c.B) : (c.B, c.A);
            if (!pairs.TryAdd(key, k))
                problems.Add(new(ProblemSite.Coupling, k, $"coupling {c.A}-{c.B} is given twice (also coupling {pairs[key] + 1})",
                    "Keep one value for each pair of nuclei"));
        }
        return problems;
    }

    /// <summary>Things that are allowed but unusual, for a reader to show as warnings.</summary>
    public static IReadOnlyList<string> Warnings(SpinSystem system)
    {
        var list = new List<string>();
        foreach (var c in system.Couplings)
        {
            var a = system.Nuclei[system.IndexOf(c.A)];
            var b = system.Nuclei[system.IndexOf(c.B)];
            if (a.Isotope == Isotope.H1 && b.Isotope == Isotope.H1 && Math.Abs(c.J.Value) > UnusualProtonCouplingHz)
                list.Add($"coupling {c.A}-{c.B} = {c.J.Value} Hz is larger than the usual 1H-1H range (|J| <= {UnusualProtonCouplingHz} Hz); check the value");
        }
        if (system.ObservedNucleusCount == 0)
            list.Add($"the system has no {system.Observed} nuclei, so its {system.Observed} spectrum is empty");
        return list;
    }

    private static SpinSystemProblem UnknownId(int k, string id, IEnumerable<string> known) =>
        new(ProblemSite.Coupling, k, $"coupling refers to unknown nucleus id \"{id}\"",
            $"Use one of the ids defined under nuclei: {string.Join(", ", known.Take(12))}");
}

/// <summary>An inconsistent spin system; carries every problem found, not only the first.</summary>
public sealed class SpinSystemException(IReadOnlyList<SpinSystemProblem> problems)
    : Exception(string.Join("; ", problems.Select(p => p.ToString())))
{
    public IReadOnlyList<SpinSystemProblem> Problems { get; } = problems;
}
