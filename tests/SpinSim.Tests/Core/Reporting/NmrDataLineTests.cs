using SpinSim.Core.Model;
using SpinSim.Core.Reporting;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Core.Reporting;

// Systems with invented values. Expected multiplicities from the n + 1 rule (common practice, no source): n equivalent
// partners split a resonance into n + 1 lines (d, t, q, quint, sext, sept); spin-system letters after Pople, Schneider
// and Bernstein, High-resolution NMR (1959).
public sealed class NmrDataLineTests
{
    private static SpinSystem Make(double mhz, Nucleus[] nuclei, Coupling[] couplings) =>
        SpinSystem.Create(new FieldMHz(mhz), nuclei, couplings);

    [Fact]
    public void Ethyl_is_a_quartet_and_a_triplet()
    {
        var ethyl = Make(400, [new("OCH2", 4.12, 2), new("CH3", 1.26, 3)], [new("OCH2", "CH3", 7.1)]);
        var groups = NmrDataLine.Groups(ethyl);
        Assert.Equal(["q", "t"], groups.Select(g => g.Multiplicity));
        Assert.Equal([2, 3], groups.Select(g => g.Nuclei));
        Assert.All(groups, g => Assert.True(g.FirstOrder));
        Assert.Equal("¹H NMR (400 MHz, CDCl3): δ 4.120 (q, 2H, J = 7.10 Hz), 1.260 (t, 3H, J = 7.10 Hz).",
            NmrDataLine.Format(ethyl, new DataLineOptions { Solvent = "CDCl3" }));
    }

    [Fact]
    public void Isopropyl_is_a_septet_and_a_doublet_whether_the_methyls_are_one_entry_or_two()
    {
        var one = Make(400, [new("CH", 2.91), new("Me2", 1.23, 6)], [new("CH", "Me2", 6.9)]);
        Assert.Equal(["sept", "d"], NmrDataLine.Groups(one).Select(g => g.Multiplicity));

        // Two methyl entries with the same shift and the same J: one resonance of 6H, and the CH sees six equal partners.
        var two = Make(400, [new("CH", 2.91), new("MeA", 1.23, 3), new("MeB", 1.23, 3)], [new("CH", "MeA", 6.9), new("CH", "MeB", 6.9)]);
        var groups = NmrDataLine.Groups(two);
        Assert.Equal(["sept", "d"], groups.Select(g => g.Multiplicity));
        Assert.Equal(6, groups[1].Nuclei);
    }

    [Fact]
    public void Different_couplings_give_a_doublet_of_triplets_largest_first()
    {
        var s = Make(400, [new("H1", 5.0), new("H2", 3.0), new("H3", 2.0, 2)], [new("H1", "H2", 10.0), new("H1", "H3", 4.0)]);
        var h1 = NmrDataLine.Groups(s)[0];
        Assert.Equal("dt", h1.Multiplicity);
        Assert.Equal([10.0, 4.0], h1.Couplings);
    }

    [Fact]
    public void Para_ring_is_named_as_the_two_halves_of_an_AA_BB_system()
    {
        var ring = Make(80, [new("HA", 7.34), new("HA'", 7.34), new("HB", 7.08), new("HB'", 7.08)],
            [new("HA", "HB", 8.6), new("HA'", "HB'", 8.6), new("HA", "HB'", 0.35), new("HA'", "HB", 0.35), new("HA", "HA'", 2.2), new("HB", "HB'", 2.6)]);
        var groups = NmrDataLine.Groups(ring);
        Assert.Equal(2, groups.Count);
        Assert.All(groups, g => Assert.Equal("AA′BB′ part", g.Multiplicity));
        Assert.All(groups, g => Assert.False(g.FirstOrder));
        Assert.Equal([2, 2], groups.Select(g => g.Nuclei));
        Assert.Equal([8.6, 2.6, 2.2, 0.35], groups[0].Couplings);
        Assert.Empty(groups[1].Couplings);
        Assert.Equal("¹H NMR (80 MHz): δ 7.340 (AA′BB′ part, 2H, J = 8.60, 2.60, 2.20, 0.35 Hz), 7.080 (AA′BB′ part, 2H).",
            NmrDataLine.Format(ring));
    }

    [Fact]
    public void Same_ring_at_a_field_where_the_halves_are_far_apart_is_AA_XX()
    {
        // Magnetic inequivalence keeps it second order at any field: |Δν/J| is large, the letters jump to X.
        var ring = Make(400, [new("HA", 7.9), new("HA'", 7.9), new("HB", 6.9), new("HB'", 6.9)],
            [new("HA", "HB", 8.6), new("HA'", "HB'", 8.6), new("HA", "HB'", 0.35), new("HA'", "HB", 0.35)]);
        Assert.All(NmrDataLine.Groups(ring), g => Assert.Equal("AA′XX′ part", g.Multiplicity));
    }

    [Fact]
    public void Diastereotopic_CH2_next_to_a_CH_is_an_ABX_system_with_signed_couplings()
    {
        var abx = Make(100, [new("HA", 2.74), new("HB", 2.61), new("HX", 4.08)],
            [new("HA", "HB", -16.4), new("HA", "HX", 4.7), new("HB", "HX", 8.9)]);
        var groups = NmrDataLine.Groups(abx);
        Assert.Equal(["HX", "HA", "HB"], groups.Select(g => g.Ids.Single()));
        Assert.All(groups, g => Assert.Equal("ABX part", g.Multiplicity));
        Assert.Equal("¹H NMR (100 MHz): δ 4.080 (ABX part, 1H, J = −16.40, 8.90, 4.70 Hz), 2.740 (ABX part, 1H), 2.610 (ABX part, 1H).",
            NmrDataLine.Format(abx));
    }

    [Fact]
    public void Fitted_uncertainties_limit_the_digits_but_never_add_any()
    {
        var ethyl = Make(400, [new("OCH2", 4.1234, 2), new("CH3", 1.26, 3)], [new("OCH2", "CH3", 7.1234)]);
        var line = NmrDataLine.Format(ethyl, new DataLineOptions
        {
            Uncertainty = name => name switch { "shift:OCH2" => 0.004, "shift:CH3" => 1e-6, "j:OCH2-CH3" => 0.5, _ => null },
        });
        Assert.Equal("¹H NMR (400 MHz): δ 4.123 (q, 2H, J = 7.1 Hz), 1.260 (t, 3H, J = 7.1 Hz).", line);
    }

    [Fact]
    public void Header_gives_the_nominal_field_and_the_solvent_as_written()
    {
        // A measured file states 399.782198 MHz: papers quote the instrument as 400 MHz; a hyphen in a solvent name stays a hyphen.
        var ethyl = Make(399.782198, [new("OCH2", 4.12, 2), new("CH3", 1.26, 3)], [new("OCH2", "CH3", 7.1)]);
        Assert.StartsWith("¹H NMR (400 MHz, DMSO-d6): δ 4.120 (q,", NmrDataLine.Format(ethyl, new DataLineOptions { Solvent = "DMSO-d6" }));
        Assert.StartsWith("¹H NMR (43 MHz): δ", NmrDataLine.Format(ethyl.WithField(new FieldMHz(43.2))));
    }
}
