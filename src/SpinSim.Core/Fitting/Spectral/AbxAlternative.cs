// Method: the two-solution ABX analysis from the AB part, J. A. Pople, W. G. Schneider, H. J. Bernstein, High-resolution Nuclear Magnetic Resonance (McGraw-Hill 1959), ch. 6.
using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>
/// The second solution of an ABX system. For each spin state of X the AB part is an AB quartet with the effective shift
/// difference D(+-) = dnu_AB +- (J_AX - J_BX)/2 and centre (nu_A + nu_B)/2 +- (J_AX + J_BX)/4; an AB quartet does not
/// change when its shift difference changes sign. Exchanging dnu_AB with (J_AX - J_BX)/2 turns D+ into D+ and D- into
/// -D-, so it leaves the whole AB part unchanged: the AB part alone cannot tell the two solutions apart (the X part can,
/// through its intensities).
/// </summary>
public static class AbxAlternative
{
    /// <summary>
    /// The other solution for the strongly coupled pair <paramref name="a"/>, <paramref name="b"/> and their common
    /// partner <paramref name="x"/>: new shifts of A and B (same centre) and new J(A,X), J(B,X) (same sum); J(A,B) and
    /// everything else unchanged. Null when the system lacks either coupling to X, or when the two solutions coincide.
    /// Exact when X is of another isotope (J Iz Iz exactly), to first order in J/dnu_AX otherwise.
    /// </summary>
    public static SpinSystem? SecondSolution(SpinSystem system, string a, string b, string x)
    {
        var (ia, ib) = (system.IndexOf(a), system.IndexOf(b));
        var jax = Find(system, a, x);
        var jbx = Find(system, b, x);
        if (ia < 0 || ib < 0 || jax is null || jbx is null) return null;
        var observeMHz = system.Nuclei[ia].Isotope.ObserveMHz(system.Field);
        if (system.Nuclei[ib].Isotope != system.Nuclei[ia].Isotope) return null;

        var nuA = system.FrequencyHz(ia);
        var nuB = system.FrequencyHz(ib);
        var centre = (nuA + nuB) / 2;
        var deltaHz = nuA - nuB;
        var sum = jax.J.Value + jbx.J.Value;
        var halfDifference = (jax.J.Value - jbx.J.Value) / 2;
        // (dnu, M/2) -> (M/2, dnu): A stays the nucleus on the side that dnu' = (J_AX - J_BX)/2 puts it.
        var newDelta = halfDifference;
        var newHalfDifference = deltaHz;
        if (Math.Abs(newDelta - deltaHz) < 1e-12 * Math.Max(1, Math.Abs(deltaHz))) return null;

        var nuclei = system.Nuclei.Select((n, i) =>
            i == ia ? n with { Shift = new ShiftPpm((centre + newDelta / 2) / observeMHz) }
            : i == ib ? n with { Shift = new ShiftPpm((centre - newDelta / 2) / observeMHz) }
            : n).ToArray();
        var couplings = system.Couplings.Select(c =>
            ReferenceEquals(c, jax) ? c with { J = new CouplingHz(sum / 2 + newHalfDifference) }
            : ReferenceEquals(c, jbx) ? c with { J = new CouplingHz(sum / 2 - newHalfDifference) }
            : c).ToArray();
        return SpinSystem.Create(system.Field, nuclei, couplings, system.Title, system.Observed);
    }

    private static Coupling? Find(SpinSystem system, string p, string q) =>
        system.Couplings.FirstOrDefault(c => (c.A == p && c.B == q) || (c.A == q && c.B == p));
}
