using SpinSim.Core.Traces;

namespace SpinSim.Tests.Core.Traces;

public class SpectrumTraceTests
{
    private static readonly TraceOrigin Origin = TraceOrigin.Describe("test");

    [Fact]
    public void Validation()
    {
        Assert.Throws<ArgumentException>(() => new SpectrumTrace([1, 2], [1], 400, "1H", Origin));
        Assert.Throws<ArgumentException>(() => new SpectrumTrace([], [], 400, "1H", Origin));
        Assert.Throws<ArgumentException>(() => new SpectrumTrace([1, double.NaN], [1, 2], 400, "1H", Origin));
        Assert.Throws<ArgumentException>(() => new SpectrumTrace([1, 2], [1, double.PositiveInfinity], 400, "1H", Origin));
        Assert.Throws<ArgumentException>(() => new SpectrumTrace([1], [1], 0, "1H", Origin));
        Assert.Throws<ArgumentException>(() => new SpectrumTrace([1], [1], 400, " ", Origin));
    }

    [Fact]
    public void Arrays_are_copied()
    {
        double[] ppm = [1, 2];
        var t = new SpectrumTrace(ppm, [3, 4], null, "1H", Origin);
        ppm[0] = 99;

        Assert.Equal(1, t.ShiftPpm[0]);
    }

    [Fact]
    public void Hz_axis_is_ppm_times_observe_frequency()
    {
        var t = new SpectrumTrace([7.26, 0], [1, 2], 400, "1H", Origin);

        Assert.Equal(2904, t.FrequencyAt(0).Value, 1e-9);
        Assert.Equal([2904, 0], t.FrequencyHzAxis().Select(v => Math.Round(v, 9)));
        Assert.Throws<InvalidOperationException>(() => new SpectrumTrace([1], [1], null, "1H", Origin).FrequencyHzAxis());
    }

    [Fact]
    public void Sorted_ascending_reverses_a_descending_axis()
    {
        var t = new SpectrumTrace([3, 2, 1], [30, 20, 10], 400, "1H", Origin);

        var s = t.SortedAscending();

        Assert.False(t.IsAscending);
        Assert.Equal([1, 2, 3], s.ShiftPpm);
        Assert.Equal([10, 20, 30], s.Intensity);
        Assert.Same(s, s.SortedAscending());
    }

    [Fact]
    public void Equality_compares_values()
    {
        var a = new SpectrumTrace([1, 2], [3, 4], 400, "1H", Origin);
        var b = new SpectrumTrace([1, 2], [3, 4], 400, "1H", TraceOrigin.Describe("test"));
        var c = new SpectrumTrace([1, 2], [3, 5], 400, "1H", Origin);

        Assert.Equal(a, b);
        Assert.NotEqual(a, c);
    }
}
