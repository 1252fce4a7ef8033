using SpinSim.Core.Model;
using SpinSim.Formats.SpinSystems;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Formats;

public class SpinSystemTomlTests
{
    private const string Valid = """
        # comment
        title = "t"
        field_mhz = 400
        [[nucleus]]
        id = "A"
        shift_ppm = 7.1
        [[nucleus]]
        id = "Me"
        shift_ppm = 1.2
        count = 3
        [[coupling]]
        between = ["A", "Me"]
        j_hz = -7.5
        """;

    [Fact]
    public void ReadsTheSchema()
    {
        var doc = SpinSystemToml.Parse(Valid, "x.toml");
        Assert.Equal(400, doc.System.Field.Value);
        Assert.Equal(3, doc.System.Nuclei[1].Count);
        Assert.Equal(-7.5, doc.System.Couplings[0].J.Value);
    }

    [Fact]
    public void ASymmetryIsDeclaredAsPairsAndWrittenBack()
    {
        var path = Path.Combine(ReferenceData.RepositoryRoot, "spin-systems", "para-ring-aabb.toml");
        var doc = SpinSystemToml.Read(path);
        var symmetry = Assert.Single(doc.Symmetries);
        Assert.Equal([("HA", "HA'"), ("HB", "HB'")], symmetry.Pairs);
        var again = SpinSystemToml.Parse(SpinSystemToml.Write(doc.System, doc.DefaultWidth, null, doc.Symmetries), "again.toml");
        Assert.Equal(symmetry.Pairs, Assert.Single(again.Symmetries).Pairs);
    }

    [Fact]
    public void ASymmetryThatDoesNotFitIsRefusedAtItsLine()
    {
        var text = Valid + "\n[[symmetry]]\nswap = [[\"A\", \"Me\"]]\n";
        var e = Assert.Throws<SpinSystemFileException>(() => SpinSystemToml.Parse(text, "x.toml"));
        Assert.StartsWith("x.toml, line 14:", e.Message);
        Assert.Contains("differ in count or isotope", e.Message);
    }

    [Fact]
    public void FieldInTeslaUsesCodataProtonRatio()
    {
        // CODATA 2018: gamma_p / 2 pi = 42.577 478 518 MHz/T (value from memory of the CODATA table).
        var doc = SpinSystemToml.Parse(Valid.Replace("field_mhz = 400", "field_tesla = 9.4"), "x.toml");
        Assert.Equal(9.4 * 42.577478518, doc.System.Field.Value, 9);
    }

    [Theory]
    [InlineData("between = [\"A\", \"Me\"]", "between = [\"A\", \"Q\"]", 11, "unknown nucleus id \"Q\"")]
    [InlineData("id = \"Me\"", "id = \"A\"", 7, "duplicate nucleus id \"A\"")]
    [InlineData("between = [\"A\", \"Me\"]", "between = [\"A\", \"A\"]", 11, "with itself")]
    // Limits of the model are refused at the line of the [[nucleus]] table they concern.
    [InlineData("count = 3", "count = 0", 7, "must be at least 1")]
    [InlineData("count = 3", "count = 65", 7, "more than 64 equivalent nuclei")]
    [InlineData("shift_ppm = 7.1", "shift_ppm = 2e4", 4, "beyond the +-1E+04 ppm")]
    [InlineData("field_mhz = 400", "field_mhz = 300e6", 3, "field_mhz = 300 if")]
    [InlineData("field_mhz = 400", "field_mhz = 9e-324", 3, "outside the 0.001 to 1E+07 MHz")]
    [InlineData("j_hz = -7.5", "j_hz = 2e5", 11, "beyond the +-1E+05 Hz")]
    [InlineData("shift_ppm = 7.1", "shift = 7.1", 6, "Did you mean \"shift_ppm\"")]
    [InlineData("shift_ppm = 7.1", "shift_ppm = nan", 6, "not a finite number")]
    [InlineData("j_hz = -7.5", "j_hz = inf", 13, "not a finite number")]
    [InlineData("count = 3", "isotope = \"2H\"", 10, "unknown isotope \"2H\"")]
    [InlineData("field_mhz = 400", "field_mhz = 0", 3, "field must be")]
    [InlineData("field_mhz = 400", "field_mhz = -5", 3, "field must be")]
    [InlineData("shift_ppm = 7.1", "shift_pmm = 7.1", 6, "Did you mean \"shift_ppm\"")]
    [InlineData("j_hz = -7.5", "j_hz = \"7.5\"", 13, "must be a number")]
    public void EveryMistakeNamesFileLineAndFix(string from, string to, int line, string expected)
    {
        var text = Valid.Replace(from, to);
        var e = Assert.Throws<SpinSystemFileException>(() => SpinSystemToml.Parse(text, "bad.toml"));
        Assert.Equal(line, e.Line);
        Assert.Contains(expected, e.Message);
        Assert.StartsWith($"bad.toml, line {line}:", e.Message);
        Assert.False(string.IsNullOrWhiteSpace(e.Fix));
    }

    [Fact]
    public void CouplingGivenTwiceIsRefused()
    {
        var text = Valid + "\n[[coupling]]\nbetween = [\"Me\", \"A\"]\nj_hz = 1.0\n";
        var e = Assert.Throws<SpinSystemFileException>(() => SpinSystemToml.Parse(text, "bad.toml"));
        Assert.Contains("given twice", e.Message);
        Assert.Equal(14, e.Line);
    }

    [Theory]
    [InlineData("", "empty")]
    [InlineData("field_mhz = 400\n", "no nuclei")]
    [InlineData("[[nucleus]]\nid = \"A\"\nshift_ppm = 1\n", "field is missing")]
    [InlineData("field_mhz = = 4\n", "not valid TOML")]
    public void StructuralMistakesAreExplained(string text, string expected)
    {
        var e = Assert.Throws<SpinSystemFileException>(() => SpinSystemToml.Parse(text, "bad.toml"));
        Assert.Contains(expected, e.Message);
    }

    [Fact]
    public void WrittenTomlReadsBackEqual()
    {
        var doc = SpinSystemToml.Parse(Valid, "x.toml");
        var again = SpinSystemToml.Parse(SpinSystemToml.Write(doc.System, new SpinSim.Core.Units.WidthHz(0.75)), "y.toml");
        Assert.Equal(doc.System.Nuclei, again.System.Nuclei);
        Assert.Equal(doc.System.Couplings, again.System.Couplings);
        Assert.Equal(0.75, again.DefaultWidth!.Value.Value);
    }

    [Fact]
    public void JsonFormUsesThePublishedKeysAndReadsBack()
    {
        var doc = SpinSystemToml.Parse(Valid, "x.toml");
        var json = SpinSystemJson.Write(doc.System);
        foreach (var key in new[] { "\"field_mhz\"", "\"nuclei\"", "\"id\"", "\"shift_ppm\"", "\"count\"", "\"isotope\"", "\"couplings\"", "\"a\"", "\"b\"", "\"j_hz\"" })
            Assert.Contains(key, json);
        var back = SpinSystemJson.Parse(json, "x.json");
        Assert.Equal(doc.System.Nuclei, back.System.Nuclei);
        Assert.Equal(doc.System.Couplings, back.System.Couplings);
    }

    [Fact]
    public void JsonMistakesAreExplained()
    {
        var e = Assert.Throws<SpinSystemFileException>(() => SpinSystemJson.Parse(
            """{"field_mhz": 400, "nuclei": [{"id": "A", "shift_ppm": 1}], "couplings": [{"a": "A", "b": "Z", "j_hz": 3}]}""", "s.json"));
        Assert.Contains("unknown nucleus id \"Z\"", e.Message);
        var syntax = Assert.Throws<SpinSystemFileException>(() => SpinSystemJson.Parse("{\n\"field_mhz\": 400,\n\"nuclei\": [ }", "s.json"));
        Assert.Equal(3, syntax.Line);
    }

    [Fact]
    public void EveryBundledExampleReadsAndIsConsistent()
    {
        var files = Directory.GetFiles(Path.Combine(ReferenceData.RepositoryRoot, "spin-systems"), "*.toml");
        Assert.True(files.Length >= 6);
        foreach (var f in files)
        {
            var doc = SpinSystemFiles.Read(f);
            Assert.Contains("invented", doc.System.Title, StringComparison.OrdinalIgnoreCase);
            Assert.True(doc.System.ObservedNucleusCount > 0);
        }
    }
}
