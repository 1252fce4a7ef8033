using SpinSim.Formats.SpinSystems;

namespace SpinSim.Tests.Formats;

/// <summary>The JSON reader refuses every defect with the line it is on, like the TOML one.</summary>
public class SpinSystemJsonTests
{
    private const string Valid = """
        {
          "field_mhz": 400,
          "nuclei": [
            {"id": "A", "shift_ppm": 7.1},
            {"id": "Me", "shift_ppm": 1.2, "count": 3}
          ],
          "couplings": [
            {"a": "A", "b": "Me", "j_hz": -7.5}
          ]
        }
        """;

    [Fact]
    public void ReadsTheSchema()
    {
        var doc = SpinSystemJson.Parse(Valid, "x.json");
        Assert.Equal(400, doc.System.Field.Value);
        Assert.Equal(3, doc.System.Nuclei[1].Count);
        Assert.Equal(-7.5, doc.System.Couplings[0].J.Value);
    }

    [Theory]
    [InlineData("\"shift_ppm\": 1.2,", "\"shift_ppm\": 1.2, \"shift_ppm\": 1.3,", 5, "given twice")]
    [InlineData("\"shift_ppm\": 7.1", "\"shift_ppm\": \"7.1\"", 4, "must be a finite number")]
    [InlineData("\"shift_ppm\": 7.1", "\"shift_ppm\": [7.1]", 4, "must be a finite number")]
    [InlineData("{\"id\": \"A\"", "{\"id\": 5", 4, "must be a text")]
    [InlineData("\"field_mhz\": 400", "\"field_mhz\": {}", 2, "must be a finite number")]
    [InlineData("\"count\": 3", "\"count\": 3.5", 5, "whole number")]
    [InlineData("\"count\": 3", "\"count\": 100", 5, "more than 64")]
    [InlineData("\"b\": \"Me\"", "\"b\": \"Q\"", 8, "unknown nucleus id \"Q\"")]
    [InlineData("\"field_mhz\": 400", "\"field_mhz\": 0", 2, "field must be")]
    [InlineData("\"j_hz\": -7.5", "\"j_hz\": -7.5, \"x\": 1", 8, "unknown key \"x\"")]
    [InlineData("\"shift_ppm\": 7.1", "\"shift\": 7.1", 4, "Did you mean \"shift_ppm\"")]
    [InlineData("\"couplings\": [", "\"nuclei2\": [", 7, "unknown key \"nuclei2\"")]
    [InlineData("\"couplings\": [", "\"couplings\": {\"a\": 1}, \"c\": [", 7, "unknown key \"c\"")]
    [InlineData("\"couplings\": [", "\"couplings\": [,", 7, "not valid JSON")]
    public void EveryMistakeNamesFileLineAndFix(string from, string to, int line, string expected)
    {
        Assert.Contains(from, Valid);
        var e = Assert.Throws<SpinSystemFileException>(() => SpinSystemJson.Parse(Valid.Replace(from, to), "bad.json"));
        Assert.Contains(expected, e.Message);
        Assert.Equal(line, e.Line);
        Assert.StartsWith($"bad.json, line {line}:", e.Message);
    }

    [Fact]
    public void PlausibilityWarningsNameTheirLine()
    {
        var doc = SpinSystemJson.Parse(Valid.Replace("\"shift_ppm\": 1.2", "\"shift_ppm\": 984").Replace("400", "7.05"), "w.json");
        Assert.Contains(doc.Warnings, w => w.StartsWith("w.json, line 2:") && w.Contains("field_tesla = 7.05"));
        Assert.Contains(doc.Warnings, w => w.StartsWith("w.json, line 5:") && w.Contains("984 ppm"));
    }
}
