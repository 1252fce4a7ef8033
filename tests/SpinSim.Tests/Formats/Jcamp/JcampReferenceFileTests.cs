using SpinSim.Core.Traces;
using SpinSim.Formats.Jcamp;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Formats.Jcamp;

/// <summary>The public JCAMP-DX files in ../shared/reference-data/jcamp (origins in its SOURCES.md).</summary>
public class JcampReferenceFileTests
{
    private static SpectrumTrace Read(string name) => JcampReader.Read(ReferenceData.PathOf("jcamp", name));

    private static void AssertClose(double expected, double actual, double relative = 1e-12) =>
        Assert.True(Math.Abs(expected - actual) <= relative * Math.Max(Math.Abs(expected), 1e-300),
            $"expected {expected:R}, got {actual:R}");

    [ReferenceFact]
    public void Isobutanol_sqz_dif_in_ppm()
    {
        var t = Read("isobutanol-1h-300mhz-sqzdif.jdx");

        // Source: isobutanol-1h-300mhz-sqzdif.jdx header: NPOINTS=2153, FIRSTX=0.449892, LASTX=3.951200 (PPM),
        // .OBSERVE FREQUENCY=300.149506, .OBSERVE NUCLEUS=^1H, YFACTOR=3.5404570000.
        Assert.Equal(2153, t.Count);
        Assert.Equal(0.449892, t.ShiftPpm[0]);
        Assert.Equal(3.9512, t.ShiftPpm[^1]);
        Assert.Equal(300.149506, t.ObserveMHz);
        Assert.Equal("1H", t.Nucleus);
        // Source: same file, line 24 "128492B598Pp2..." (B598 = 2598, P = +7) and line 119, whose last
        // value (decoded with an independent script while writing this test) is 1539.
        AssertClose(2598 * 3.5404570000, t.Intensity[0]);
        AssertClose(2605 * 3.5404570000, t.Intensity[1]);
        AssertClose(1539 * 3.5404570000, t.Intensity[^1]);
        // The strongest point is the methyl doublet of 2-methyl-1-propanol near 0.9 ppm (chemistry from memory).
        var top = t.ShiftPpm[Array.IndexOf(t.Intensity, t.Intensity.Max())];
        Assert.InRange(top, 0.85, 0.95);
        Assert.Equal("JCAMP-DX 5.00", t.Origin.Format);
        Assert.Equal("XYDATA (X++(Y..Y)) SQZ+DIF", t.Origin.Form);
        Assert.Empty(t.Origin.Warnings);
    }

    [ReferenceFact]
    public void Isas_13c_affn_in_hz()
    {
        var t = Read("isas-13c-affn.dx");

        // Source: isas-13c-affn.dx header: NPOINTS=16384, FIRSTX=24038.5, LASTX=0 (HZ), .OBSERVE FREQUENCY=100.4,
        // no .SHIFT REFERENCE (so 0 Hz = 0 ppm, with a warning).
        Assert.Equal(16384, t.Count);
        AssertClose(24038.5 / 100.4, t.ShiftPpm[0]);
        Assert.Equal(0, t.ShiftPpm[^1]);
        Assert.Equal(100.4, t.ObserveMHz);
        Assert.Equal("13C", t.Nucleus);
        AssertClose(24038.5, t.FrequencyAt(0).Value);
        // Source: same file, line 25 "16383 2259260 -5242968 ...", line 26 "16379 10650432 ...", line 4120 ends "1505988".
        Assert.Equal(2259260, t.Intensity[0]);
        Assert.Equal(-5242968, t.Intensity[1]);
        Assert.Equal(10650432, t.Intensity[4]);
        Assert.Equal(1505988, t.Intensity[^1]);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("no .SHIFT REFERENCE"));
    }

    [ReferenceFact]
    public void Isas_13c_four_forms_decode_to_the_same_values()
    {
        // Source: SOURCES.md, jcamp/: AFFN, SQZ and PAC decode to identical values; the DIF+DUP file is a
        // re-rounded copy, compared to about 2e-5 of full scale.
        var affn = Read("isas-13c-affn.dx");
        var sqz = Read("isas-13c-sqz.dx");
        var pac = Read("isas-13c-pac.dx");
        var difdup = Read("isas-13c-difdup.dx");

        Assert.Equal(affn.Intensity, sqz.Intensity);
        Assert.Equal(affn.Intensity, pac.Intensity);
        Assert.Equal(affn.ShiftPpm, difdup.ShiftPpm);
        var fullScale = affn.Intensity.Max(Math.Abs);
        for (var i = 0; i < affn.Count; i++)
            Assert.True(Math.Abs(affn.Intensity[i] - difdup.Intensity[i]) <= 2e-5 * fullScale, $"point {i}");
        Assert.EndsWith("SQZ", sqz.Origin.Form);
        Assert.EndsWith("PAC", pac.Origin.Form);
        Assert.EndsWith("SQZ+DIF+DUP", difdup.Origin.Form);
    }

    [ReferenceFact]
    public void Rutin_link_file_reads_the_spectrum_block()
    {
        var t = Read("rutin-1h-400mhz-link.jdx");

        // Source: rutin-1h-400mhz-link.jdx, inner block (BLOCK_ID=2): NPOINTS=52430, FIRSTX=7604.450041814470751,
        // LASTX=-408.37047100600989324 (HZ, descending), .OBSERVE FREQUENCY=399.78219837824997285,
        // YFACTOR=4.9776292514548946375e-08.
        const double mhz = 399.78219837824997285, yFactor = 4.9776292514548946375e-08;
        Assert.Equal(52430, t.Count);
        AssertClose(7604.450041814470751 / mhz, t.ShiftPpm[0]);
        AssertClose(-408.37047100600989324 / mhz, t.ShiftPpm[^1]);
        Assert.Equal(mhz, t.ObserveMHz);
        // Source: same file, line 34 "7604g349..." (g349 = -7349) and line 1387 "-408f489" (-6489).
        AssertClose(-7349 * yFactor, t.Intensity[0]);
        AssertClose(-6489 * yFactor, t.Intensity[^1]);
        // Source: SOURCES.md: the DMSO residual sits near 2.46 ppm on the file's axis (the tallest line here).
        var top = t.ShiftPpm[Array.IndexOf(t.Intensity, t.Intensity.Max())];
        Assert.InRange(top, 2.40, 2.52);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("read block 2") && w.Contains("DATA TYPE=LINK"));
    }

    [ReferenceFact]
    public void Ntuples_file_reads_the_real_page()
    {
        var t = Read("sample-1h-300mhz-ntuples.dx");

        // Source: sample-1h-300mhz-ntuples.dx: VAR_DIM=32768, FIRST=4789.12587366797 and LAST=0 (HZ) for X,
        // FIRST=-118793 and LAST=-78595 for R (the real page), .SHIFT REFERENCE= INTERNAL, CDCl3, 1, 15.47866,
        // .OBSERVE FREQUENCY=300.132250975.
        Assert.Equal(32768, t.Count);
        AssertClose(15.47866, t.ShiftPpm[0]);
        AssertClose(15.47866 - 4789.12587366797 / 300.132250975, t.ShiftPpm[^1], 1e-11);
        Assert.Equal(300.132250975, t.ObserveMHz);
        Assert.Equal(-118793, t.Intensity[0]);
        Assert.Equal(-78595, t.Intensity[^1]);
        Assert.StartsWith("NTUPLES N=1 (X++(R..R))", t.Origin.Form);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("real page") && w.Contains("SPECTRUM/IMAG"));
    }

    [ReferenceFact]
    public void Nonconformant_affn_sample_reads_with_warnings()
    {
        // Decision: read it. NPOINTS=16385 over 16,384 values, but FIRSTX, LASTX and DELTAX agree with 16,384,
        // so the count read is used and each defect is reported (see JcampReader's remarks).
        var t = Read("sample-1h-300mhz-affn-nonconformant.jdx");

        // Source: sample-1h-300mhz-affn-nonconformant.jdx: FIRSTX=16.089531599, LASTX=-0.746542441 (ppm),
        // .OBSERVE FREQUENCY=299.9328561, YFACTOR=160.199999131; line 25 "0 -0.000111519 ...",
        // line 26 "5 -0.000106869 ...", line 3301 ends "0.000453211".
        const double yFactor = 160.199999131;
        Assert.Equal(16384, t.Count);
        Assert.Equal(16.089531599, t.ShiftPpm[0]);
        Assert.Equal(-0.746542441, t.ShiftPpm[^1]);
        Assert.Equal(299.9328561, t.ObserveMHz);
        AssertClose(-0.000111519 * yFactor, t.Intensity[0]);
        AssertClose(-0.000106869 * yFactor, t.Intensity[5]);
        AssertClose(0.000453211 * yFactor, t.Intensity[^1]);
        Assert.Contains(t.Origin.Warnings, w => w.Contains("NPOINTS=16385") && w.Contains("16384"));
        Assert.Contains(t.Origin.Warnings, w => w.Contains("line abscissae disagree"));
        Assert.Contains(t.Origin.Warnings, w => w.Contains("FIRSTY"));
        Assert.Equal("JCAMP-DX 4.24", t.Origin.Format);
    }

    [ReferenceFact]
    public void Every_file_gives_a_summary_with_the_stated_points()
    {
        foreach (var (name, points) in new[]
                 {
                     ("isobutanol-1h-300mhz-sqzdif.jdx", 2153), ("rutin-1h-400mhz-link.jdx", 52430),
                     ("sample-1h-300mhz-ntuples.dx", 32768), ("sample-1h-300mhz-affn-nonconformant.jdx", 16384),
                     ("isas-13c-affn.dx", 16384), ("isas-13c-sqz.dx", 16384), ("isas-13c-pac.dx", 16384), ("isas-13c-difdup.dx", 16384),
                 })
        {
            // Source: SOURCES.md, jcamp/ table (points per file).
            var summary = SpinSim.Formats.TraceSummary.From(SpinSim.Formats.SpectrumFiles.Read(ReferenceData.PathOf("jcamp", name)));
            Assert.Equal(points, summary.Points);
        }
    }
}
