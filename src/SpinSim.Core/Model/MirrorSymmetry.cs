namespace SpinSim.Core.Model;

/// <summary>
/// Nuclei that a symmetry of the molecule exchanges, declared once in the spin-system file: each pair (A, A') is swapped
/// by the same operation, for example a para-disubstituted ring as the two pairs (HA, HA') and (HB, HB'). Under the
/// swap every shift equals its partner's and every coupling equals that of the swapped pair, which is what a fit ties.
/// </summary>
public sealed record MirrorSymmetry(IReadOnlyList<(string A, string B)> Pairs)
{
    /// <summary>The partner of <paramref name="id"/> under the swap, or the id itself when the swap leaves it alone.</summary>
    public string Image(string id)
    {
        foreach (var (a, b) in Pairs)
        {
            if (a == id) return b;
            if (b == id) return a;
        }
        return id;
    }

    /// <summary>
    /// Problems that make the declaration unusable for <paramref name="system"/>, each with its fix: an unknown id, a
    /// nucleus in two pairs, a pair of nuclei that differ in count or isotope, a coupling whose swapped pair has no
    /// coupling of its own.
    /// </summary>
    public IReadOnlyList<string> Problems(SpinSystem system)
    {
        var problems = new List<string>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var (a, b) in Pairs)
        {
            foreach (var id in new[] { a, b })
            {
                if (system.IndexOf(id) < 0) problems.Add($"\"{id}\" is not a nucleus of this system: use the ids of the [[nucleus]] tables");
                else if (!seen.Add(id)) problems.Add($"\"{id}\" is in two pairs: each nucleus may be swapped with one partner only");
            }
            if (a == b) problems.Add($"\"{a}\" is paired with itself: list only nuclei that the symmetry exchanges");
            if (system.IndexOf(a) is var i and >= 0 && system.IndexOf(b) is var j and >= 0
                && (system.Nuclei[i].Count != system.Nuclei[j].Count || system.Nuclei[i].Isotope != system.Nuclei[j].Isotope))
                problems.Add($"\"{a}\" and \"{b}\" differ in count or isotope, so no symmetry can exchange them");
        }
        if (problems.Count > 0) return problems;
        foreach (var c in system.Couplings)
        {
            var (a, b) = (Image(c.A), Image(c.B));
            if (!system.Couplings.Any(k => (k.A == a && k.B == b) || (k.A == b && k.B == a)))
                problems.Add($"the coupling {c.A}-{c.B} has no mirror coupling {a}-{b}: add a [[coupling]] between [\"{a}\", \"{b}\"]");
        }
        return problems;
    }
}
