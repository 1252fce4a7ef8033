using SpinSim.Core.Model;
using SpinSim.Core.Planning;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;
using SpinSim.Formats.SpinSystems;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Planning;

public class FieldPlannerTests
{
    private static FieldPlanSettings Settings(double widthHz = 1.0, double tolerance = FieldPlanSettings.DefaultTolerance) =>
        new(new WidthHz(widthHz), Lineshape.Lorentzian, tolerance);

    private static FieldMHz[] Fields(params double[] mhz) => mhz.Select(f => new FieldMHz(f)).ToArray();

    private static SpinSystem ParaRing() =>
        SpinSystemFiles.Read(Path.Combine(ReferenceData.RepositoryRoot, "spin-systems", "para-ring-aabb.toml")).System;

    [Fact]
    public void AbRatioIsTheShiftDifferenceTimesTheFieldOverJ()
    {
        // Exact invariant: delta nu = delta ppm x field, so |delta nu| / |J| = 0.1 ppm x field / 12 Hz.
        var ab = SpinSystem.Create(new FieldMHz(100), [new("A", 2.10), new("B", 2.00)], [new("A", "B", -12.0)]);
        var plan = FieldPlanner.Plan(ab, Fields(43, 60, 400, 900), Settings());
        foreach (var point in plan.Fields)
        {
            var cluster = Assert.Single(point.Clusters);
            var expected = (2.10 - 2.00) * point.Field.Value / 12.0;
            Assert.Equal(expected, cluster.MinDeltaNuOverJ!.Value, expected * 1e-12);
            Assert.Equal(("A", "B"), cluster.ClosestPair);
        }
        Assert.Equal([43.0, 60, 400, 900], plan.Fields.Select(p => p.Field.Value));
    }

    [Fact]
    public void A2X3ThousandCouplingsApartIsFirstOrderToOnePartInAThousand()
    {
        // First-order corrections scale as J / delta nu (common practice, no source): line positions move by about
        // J^2 / delta nu and intensities tilt by J / delta nu. With J equal to the linewidth both stay below 1e-3 of the
        // pattern at delta nu = 1000 J; with lines much narrower than J the position shift counts more (J = 7 Hz,
        // 1 Hz lines: about 6e-3).
        var deviation = A2X3Deviation(separationInJ: 1000);
        Assert.True(deviation < 1e-3, $"deviation {deviation}");
        Assert.True(deviation > 0, "the exact spectrum is never exactly first order");
    }

    [Fact]
    public void A2X3DeviationHalvesWhenTheSeparationDoubles()
    {
        // Common practice, no source: the leading corrections are first order in J / delta nu.
        var ratio = A2X3Deviation(1000) / A2X3Deviation(2000);
        Assert.InRange(ratio, 1.9, 2.1);
    }

    private static double A2X3Deviation(double separationInJ)
    {
        const double j = 1.0;
        var system = SpinSystem.Create(new FieldMHz(100), [new("A", 1.0, 2), new("X", 1.0 + separationInJ * j / 100, 3)], [new("A", "X", j)]);
        var point = FieldPlanner.Evaluate(system, new FieldMHz(100), Settings(widthHz: 1.0));
        var cluster = Assert.Single(point.Clusters);
        Assert.Equal(separationInJ, cluster.MinDeltaNuOverJ!.Value, 1e-9);
        return cluster.FirstOrderDeviation;
    }

    [Fact]
    public void ParaRingDeviationFallsWithField()
    {
        var plan = FieldPlanner.Plan(ParaRing(), FieldPlanSettings.DefaultFields, Settings(0.7));
        var deviations = plan.Fields.Select(p => Assert.Single(p.Clusters).FirstOrderDeviation).ToArray();
        for (var i = 1; i < deviations.Length; i++)
            Assert.True(deviations[i] < deviations[i - 1], $"{plan.Fields[i].Field}: {deviations[i]} not below {deviations[i - 1]}");
    }

    [Fact]
    public void ParaRingSearchBracketsTheLowestFieldWithinTolerance()
    {
        // AA'BB' tends to AA'XX' at high field, which is not first order (McConnell, McLean & Reilly, J. Chem. Phys. 23,
        // 1152, 1955): its deviation levels off near 0.4 here, so the search is checked with a tolerance above that.
        var system = ParaRing();
        var settings = Settings(0.7, tolerance: 0.6);
        var plan = FieldPlanner.Plan(system, FieldPlanSettings.DefaultFields, settings);
        var lowest = Assert.Single(plan.LowestFields);
        Assert.Equal(FirstOrderReach.Bracketed, lowest.Reach);
        var (within, outside) = (lowest.Within!.Value, lowest.Outside!.Value);
        Assert.True(outside.Value < within.Value);
        Assert.True(within.Value / outside.Value <= 1 + settings.FieldPrecision);

        // Recomputed independently at both fields.
        var atWithin = Assert.Single(FieldPlanner.Evaluate(system, within, settings).Clusters).FirstOrderDeviation;
        var atOutside = Assert.Single(FieldPlanner.Evaluate(system, outside, settings).Clusters).FirstOrderDeviation;
        Assert.True(atWithin <= 0.6, $"{within}: {atWithin}");
        Assert.True(atOutside > 0.6, $"{outside}: {atOutside}");
        Assert.Equal(lowest.DeviationWithin!.Value, atWithin, 12);
        Assert.InRange(within.Value, 200, 300); // between the listed fields where the deviation crosses 0.6
    }

    [Fact]
    public void ParaRingIsNeverFirstOrderWithinTheDefaultTolerance()
    {
        var plan = FieldPlanner.Plan(ParaRing(), Fields(80, 400), Settings(0.7));
        var lowest = Assert.Single(plan.LowestFields);
        Assert.Equal(FirstOrderReach.NotAtAnyField, lowest.Reach);
        Assert.Null(lowest.Within);
        Assert.Equal(400, lowest.Outside!.Value.Value);
        Assert.True(lowest.HighFieldLimitDeviation > 0.3, $"limit {lowest.HighFieldLimitDeviation}");
    }

    [Fact]
    public void AFirstOrderPatternAtTheLowestFieldIsReportedAsSuch()
    {
        var system = SpinSystem.Create(new FieldMHz(100), [new("A", 1.0, 2), new("X", 9.0, 3)], [new("A", "X", 1.0)]);
        var lowest = Assert.Single(FieldPlanner.Plan(system, Fields(400, 60), Settings()).LowestFields);
        Assert.Equal(FirstOrderReach.AtOrBelowLowestField, lowest.Reach);
        Assert.Equal(60, lowest.Within!.Value.Value);
    }

    [Fact]
    public void AnAbWithinReachAboveTheListIsReportedAboveTheLargestField()
    {
        // At 60 MHz an AB with J = 12 Hz and 0.1 ppm is strongly coupled; its limit is first order.
        var ab = SpinSystem.Create(new FieldMHz(100), [new("A", 2.10), new("B", 2.00)], [new("A", "B", -12.0)]);
        var lowest = Assert.Single(FieldPlanner.Plan(ab, Fields(60), Settings()).LowestFields);
        Assert.Equal(FirstOrderReach.AboveLargestField, lowest.Reach);
        Assert.True(lowest.HighFieldLimitDeviation < 0.05);
        // The search goes on past the list and brackets a field there.
        Assert.True(lowest.Outside!.Value.Value >= 60 && lowest.Outside.Value.Value < lowest.Within!.Value.Value);
        Assert.True(lowest.DeviationOutside > 0.05);
        Assert.True(lowest.DeviationWithin <= 0.05);
    }

    [Fact]
    public void ClustersAreHomonuclearComponentsAndIgnoreHeteronuclearLinks()
    {
        // Exact invariant of the definition: A-B and C-D are joined only through F (19F), so they stay apart; E is alone.
        var system = SpinSystem.Create(new FieldMHz(400),
            [new("A", 7.2), new("B", 7.0), new("C", 3.1), new("D", 2.9, 2), new("E", 1.2, 3), new("F", -110, 1, Isotope.F19)],
            [new("A", "B", 8.0), new("C", "D", 7.0), new("B", "F", 6.0), new("F", "C", 3.0)]);
        var clusters = FieldPlanner.Clusters(system);
        Assert.Equal(2, clusters.Count);
        Assert.Equal(["A", "B"], clusters[0].Ids);
        Assert.Equal(["C", "D"], clusters[1].Ids);
        Assert.Equal([1, 2], clusters.Select(c => c.Number));

        // The same clusters at every field, in the same order.
        var plan = FieldPlanner.Plan(system, Fields(60, 600), Settings());
        foreach (var point in plan.Fields) Assert.Equal(clusters.Select(c => c.Label), point.Clusters.Select(c => c.Cluster.Label));
    }

    [Fact]
    public void EachClusterIsMeasuredOnItsOwnLines()
    {
        // Exact invariant: two identical AB systems that overlap in frequency give each the deviation of one alone.
        var one = SpinSystem.Create(new FieldMHz(100), [new("A", 2.10), new("B", 2.00)], [new("A", "B", -12.0)]);
        var two = SpinSystem.Create(new FieldMHz(100), [new("A", 2.10), new("B", 2.00), new("C", 2.10), new("D", 2.00)],
            [new("A", "B", -12.0), new("C", "D", -12.0)]);
        var alone = Assert.Single(FieldPlanner.Evaluate(one, new FieldMHz(80), Settings()).Clusters);
        var pair = FieldPlanner.Evaluate(two, new FieldMHz(80), Settings()).Clusters;
        Assert.Equal(2, pair.Count);
        foreach (var c in pair)
        {
            Assert.Equal(alone.FirstOrderDeviation, c.FirstOrderDeviation, 9);
            Assert.Equal(alone.ResolvedLines, c.ResolvedLines);
        }
        Assert.Equal(4, alone.ResolvedLines); // an AB quartet at |delta nu| / |J| = 0.67 with 1 Hz lines
    }

    [Fact]
    public void EqualShiftsGiveNoRatioAndNoFieldDependence()
    {
        // Exact invariant: coupled nuclei of equal shift form a singlet at every field, as first order says.
        var system = SpinSystem.Create(new FieldMHz(100), [new("A", 3.0), new("A'", 3.0)], [new("A", "A'", 5.0)]);
        var cluster = Assert.Single(FieldPlanner.Evaluate(system, new FieldMHz(300), Settings()).Clusters);
        Assert.Null(cluster.MinDeltaNuOverJ);
        Assert.Null(cluster.ClosestPair);
        Assert.True(cluster.FirstOrderDeviation < 1e-9, $"{cluster.FirstOrderDeviation}");
        Assert.Equal(1, cluster.ResolvedLines);
    }

    [Fact]
    public void InvalidFieldsAndSettingsAreRefused()
    {
        var ab = SpinSystem.Create(new FieldMHz(100), [new("A", 2.10), new("B", 2.00)], [new("A", "B", -12.0)]);
        Assert.Throws<ArgumentException>(() => FieldPlanner.Plan(ab, [], Settings()));
        Assert.Throws<ArgumentException>(() => FieldPlanner.Plan(ab, Fields(60, 0), Settings()));
        Assert.Throws<ArgumentException>(() => FieldPlanner.Plan(ab, Fields(60), Settings(tolerance: 0)));
        Assert.Throws<ArgumentException>(() => FieldPlanner.Plan(ab, Fields(60), Settings(widthHz: -1)));
    }
}
