using SpinSim.Formats;
using SpinSim.Formats.Jcamp;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Formats.Jcamp;

/// <summary>
/// Departures from the standard met in real exports, read with one warning each. The standard (JCAMP-DX for NMR,
/// A. N. Davies and P. Lampen, Appl. Spectrosc. 47, 1093, 1993) numbers the point of ##.SHIFT REFERENCE= from 1; private
/// labels begin with ##$ (R. S. McDonald and P. A. Wilks, Appl. Spectrosc. 42, 151, 1988) and their repetition is not defined.
/// </summary>
public class JcampTolerantReadingTests
{
    // Four points in Hz at 400 MHz: 2904 Hz is 7.26 ppm when 0 Hz is 0 ppm (nu = delta x SF; exact arithmetic).
    private static string InHz(string extraHeader) =>
        JcampSamples.Minimal("2904 1 2 3 4", 4, 2904, 2901, extraHeader).Replace("##XUNITS= PPM", "##XUNITS= HZ");

    [Fact]
    public void Point_zero_shift_reference_is_read_when_firstx_agrees()
    {
        var t = JcampReader.Parse(InHz("##.SHIFT REFERENCE= INTERNAL, CDCl3, 0, 7.26\n"), "old.jdx");

        Assert.Equal(7.26, t.ShiftPpm[0], 12);
        Assert.Equal(7.2525, t.ShiftPpm[^1], 12);
        Assert.Single(t.Origin.Warnings, w => w.Contains("point 0"));
    }

    [Fact]
    public void Point_zero_shift_reference_is_refused_when_firstx_disagrees()
    {
        var text = InHz("##.SHIFT REFERENCE= INTERNAL, CDCl3, 0, 7.00\n");
        var e = Assert.Throws<SpectrumFileException>(() => JcampReader.Parse(text, "old.jdx"));

        Assert.Equal(JcampSamples.LineOf(text, l => l.StartsWith("##.SHIFT REFERENCE")), e.Line);
        Assert.Contains("point 0", e.Problem);
    }

    [Fact]
    public void Repeated_private_labels_give_one_summary_warning()
    {
        var repeats = string.Concat(Enumerable.Range(0, 6).Select(i => $"##$RELAX= {i}\n##$PROBHD= probe {i}\n##$OWNER= someone\n"));
        var t = JcampReader.Parse(JcampSamples.Minimal("7.26 1 2 3 4", 4, 7.26, 7.20, repeats), "export.jdx");

        var warning = Assert.Single(t.Origin.Warnings);
        Assert.Contains("3 private ##$ label(s)", warning);
        Assert.Contains("15 repeats", warning);
    }

    [Fact]
    public void Repeated_standard_labels_still_warn_one_by_one()
    {
        var t = JcampReader.Parse(JcampSamples.Minimal("7.26 1 2 3 4", 4, 7.26, 7.20, "##OWNER= a\n##OWNER= b\n"), "export.jdx");

        Assert.Single(t.Origin.Warnings, w => w.Contains("##OWNER= repeats"));
    }

    /// <summary>Every public 1H file in ../shared/reference-data/jcamp (SOURCES.md), FIDs included, reads into a trace.</summary>
    [ReferenceFact]
    public void Every_public_1h_file_reads()
    {
        var files = Directory.GetFiles(ReferenceData.PathOf("jcamp"))
            .Where(f => Path.GetFileName(f).Contains("-1h-", StringComparison.OrdinalIgnoreCase)).ToArray();
        Assert.True(files.Length >= 6, $"found {files.Length} 1H files");
        foreach (var file in files)
        {
            var t = SpectrumFiles.Read(file);
            Assert.Equal("1H", t.Nucleus);
            Assert.True(t.Count > 1000, file);
            var (low, high) = (t.ShiftPpm.Min(), t.ShiftPpm.Max());
            // Every 1H spectrum here covers 1 to 8 ppm, where its lines are (chemistry from memory, common practice).
            Assert.True(low < 1 && high > 8 || Path.GetFileName(file).StartsWith("isobutanol"), $"{file}: {low}..{high} ppm");
        }
    }
}
