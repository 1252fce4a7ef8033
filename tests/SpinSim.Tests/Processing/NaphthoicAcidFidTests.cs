using SpinSim.Core.Processing;
using SpinSim.Core.Traces;
using SpinSim.Formats;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Processing;

/// <summary>
/// The public 1-naphthoic-acid FID processed by SpinSim against the spectrum its instrument's software processed from the
/// same FID (both in ../shared/reference-data/jcamp; origin in its SOURCES.md).
/// </summary>
public class NaphthoicAcidFidTests
{
    private static SpectrumTrace Ours(ProcessingOptions? o = null) =>
        SpectrumFiles.Read(ReferenceData.PathOf("jcamp", "naphthoic-acid-1h-500mhz-fid.dx"), processing: o).SortedAscending();

    private static SpectrumTrace Instrument() =>
        SpectrumFiles.Read(ReferenceData.PathOf("jcamp", "naphthoic-acid-1h-500mhz-spectrum.dx")).SortedAscending();

    /// <summary>Local maxima refined by a parabola, tallest first.</summary>
    private static List<(double Ppm, double Height)> Peaks(SpectrumTrace t, int count)
    {
        var peaks = new List<(double, double)>();
        var y = t.Intensity;
        for (var i = 1; i < y.Length - 1; i++)
        {
            if (!(y[i] > y[i - 1] && y[i] >= y[i + 1])) continue;
            var offset = 0.5 * (y[i - 1] - y[i + 1]) / (y[i - 1] - 2 * y[i] + y[i + 1]);
            peaks.Add((t.ShiftPpm[i] + offset * (t.ShiftPpm[i + 1] - t.ShiftPpm[i]), y[i]));
        }
        return peaks.OrderByDescending(p => p.Item2).Take(count).ToList();
    }

    [ReferenceFact]
    public void Ten_tallest_lines_at_the_instruments_ppm()
    {
        var ours = Peaks(Ours(), 40);
        foreach (var (ppm, _) in Peaks(Instrument(), 10))
        {
            var nearest = ours.MinBy(p => Math.Abs(p.Ppm - ppm)).Ppm;
            Assert.True(Math.Abs(nearest - ppm) <= 0.002, $"instrument line at {ppm:0.0000} ppm, ours nearest at {nearest:0.0000}");
        }
    }

    [ReferenceFact]
    public void A_filter_delay_stated_in_the_file_is_used_and_recorded()
    {
        // Private label ##$GRPDLY= (the filter's group delay in points, as some exports write it; from memory of such
        // files) added to the real FID: the stated delay replaces the search, and -1 means "not stated".
        var text = File.ReadAllText(ReferenceData.PathOf("jcamp", "naphthoic-acid-1h-500mhz-fid.dx"));
        var found = Ours().Origin.Processing!.Step("filter_delay")!.Value("points")!.Value;
        var folder = Directory.CreateTempSubdirectory("spinsim-grpdly-").FullName;
        string WithDelay(string value)
        {
            var path = Path.Combine(folder, $"fid-{value}.dx");
            var firstLineEnd = text.IndexOf('\n');
            File.WriteAllText(path, text[..(firstLineEnd + 1)] + $"##$GRPDLY= {value}\n" + text[(firstLineEnd + 1)..]);
            return path;
        }
        var stated = SpectrumFiles.ReadData(WithDelay("53.25"));
        Assert.Equal(53.25, stated.Fid!.StatedFilterDelayPoints);
        var step = stated.ToTrace().Origin.Processing!.Step("filter_delay")!;
        Assert.Equal("stated in the file", step.How);
        Assert.Equal(53.25, step.Value("points"));
        Assert.InRange(found, 52.5, 54.5); // the search found nearly the same delay without the label

        Assert.Null(SpectrumFiles.ReadData(WithDelay("-1")).Fid!.StatedFilterDelayPoints);
        Directory.Delete(folder, recursive: true);
    }

    [ReferenceFact]
    public void Default_processing_is_phased()
    {
        var t = Ours();
        // The criterion: the most negative point above -2 % of the tallest.
        Assert.True(t.Intensity.Min() > -0.02 * t.Intensity.Max(), $"most negative point {t.Intensity.Min() / t.Intensity.Max():P2} of the tallest");
        Assert.Equal("fid", t.Origin.Processing!.Kind);
    }

    [ReferenceFact]
    public void Normalised_traces_agree_once_the_linewidth_matches()
    {
        // The instrument's window is not stated; the exponential width that matches best is searched for, then the rms
        // difference of the traces (each divided by its tallest point) over the aromatic lines and the solvent line must
        // stay below 1 % of the tallest point (tolerance of this test, chosen for it).
        var instrument = Instrument();
        var top = instrument.Intensity.Max();
        var best = double.PositiveInfinity;
        foreach (var hz in new[] { 0.0, 0.25, 0.5, 0.75, 1.0 })
        {
            var ours = Ours(new ProcessingOptions { WindowHz = hz, Points = 131072 });
            var ourTop = ours.Intensity.Max();
            double sum = 0;
            var n = 0;
            for (var i = 0; i < instrument.Count; i++)
            {
                var x = instrument.ShiftPpm[i];
                if (!(x is > 7.4 and < 9.2 || x is > 1.9 and < 2.3)) continue;
                var j = Array.BinarySearch(ours.ShiftPpm, x);
                if (j < 0) j = ~j;
                if (j <= 0 || j >= ours.Count) continue;
                var f = (x - ours.ShiftPpm[j - 1]) / (ours.ShiftPpm[j] - ours.ShiftPpm[j - 1]);
                var d = (ours.Intensity[j - 1] * (1 - f) + ours.Intensity[j] * f) / ourTop - instrument.Intensity[i] / top;
                sum += d * d;
                n++;
            }
            best = Math.Min(best, Math.Sqrt(sum / n));
        }
        Assert.True(best < 0.01, $"rms difference {best:P2} of the tallest point");
    }

    [ReferenceFact]
    public void Fid_record_names_every_step()
    {
        var data = SpectrumFiles.ReadData(ReferenceData.PathOf("jcamp", "naphthoic-acid-1h-500mhz-fid.dx"));
        var fid = data.Fid!;
        // Source: the file's header: VAR_DIM 8192, LAST time 0.4685252 s, .OBSERVE FREQUENCY 500.13750195,
        // .SHIFT REFERENCE INTERNAL, Acetone, 1, 32.47797; first data line "0@@@@..." (zeros: the filter's build-up).
        Assert.Equal(8192, fid.Count);
        Assert.Equal(0.4685252 / 8191, fid.DwellSeconds, 15);
        Assert.Equal(500.13750195, fid.ObserveMHz);
        Assert.Equal(32.47797, fid.HighEdgePpm);
        Assert.Equal(0, fid.Points[0].Real);
        var steps = data.ToTrace().Origin.Processing!.Steps.Select(s => s.Name);
        Assert.Equal(["filter_delay", "window", "zero_fill", "fourier_transform", "phase", "axis"], steps);
    }
}
