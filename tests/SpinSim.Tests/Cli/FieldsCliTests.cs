using System.Text.Json;

namespace SpinSim.Tests.Cli;

public class FieldsCliTests
{
    private static string Temp(string ext) => Path.Combine(Path.GetTempPath(), $"spinsim-fields-{Guid.NewGuid():N}{ext}");

    [Fact]
    public void TableListsClustersFieldsAndTheLowestField()
    {
        var (code, o, err) = CliTests.Run("fields", CliTests.Example("para-ring-aabb.toml"), "--at", "400,60");
        Assert.True(code == 0, err);
        Assert.Contains("cluster 1: HA, HA', HB, HB'", o);
        Assert.Contains("field/MHz", o);
        Assert.Contains("deviation", o);
        var rows = o.Split('\n').Select(l => l.Trim()).Where(l => l.StartsWith("60 ") || l.StartsWith("400 ")).ToArray();
        Assert.Equal(2, rows.Length);
        Assert.StartsWith("60 ", rows[0]); // increasing field
        Assert.Contains("lowest field within 0.05 of first order", o);
        Assert.Contains("at no field", o); // AA'XX' stays second order
    }

    [Fact]
    public void JsonIsAListWithOneEntryPerField()
    {
        var (code, o, err) = CliTests.Run("fields", CliTests.Example("abx-stereocentre.toml"), "--at", "60,300,600", "--json");
        Assert.True(code == 0, err);
        using var json = JsonDocument.Parse(o);
        var root = json.RootElement;
        Assert.Equal(JsonValueKind.Array, root.ValueKind);
        Assert.Equal(3, root.GetArrayLength());
        Assert.Equal([60.0, 300, 600], root.EnumerateArray().Select(e => e.GetProperty("field_mhz").GetDouble()));
        foreach (var entry in root.EnumerateArray())
        {
            var cluster = Assert.Single(entry.GetProperty("clusters").EnumerateArray());
            Assert.Equal(1, cluster.GetProperty("cluster").GetInt32());
            Assert.Equal(["HA", "HB", "HX"], cluster.GetProperty("nuclei").EnumerateArray().Select(n => n.GetString()));
            Assert.True(cluster.GetProperty("min_ratio").GetDouble() > 0);
            // HA-HB is 0.13 ppm apart with J = -16.4 Hz: |dnu/J| is 0.48 at 60 MHz and still 4.8 at 600 MHz, strongly
            // coupled, so at every field listed the pattern is further than the 0.05 tolerance from first order.
            Assert.True(cluster.GetProperty("first_order_deviation").GetDouble() > 0.05);
            Assert.True(cluster.GetProperty("resolved_lines").GetInt32() > 0);
            var lowest = cluster.GetProperty("lowest_first_order_field");
            Assert.Equal(0.05, lowest.GetProperty("tolerance").GetDouble());
            // Distinct shifts make the high-field limit first order, so the first-order field lies above the list,
            // bracketed by the search: within tolerance at within_field_mhz, outside it just below.
            Assert.Equal("above_largest_field", lowest.GetProperty("reach").GetString());
            Assert.True(lowest.GetProperty("within_field_mhz").GetDouble() > 600);
            Assert.InRange(lowest.GetProperty("within_deviation").GetDouble(), 0, 0.05);
            Assert.True(lowest.GetProperty("outside_deviation").GetDouble() > 0.05);
            Assert.True(lowest.GetProperty("high_field_limit_deviation").GetDouble() < 0.05);
        }
        // ABX: HA-HB at 0.13 ppm with J = -16.4 Hz is the closest pair; 0.13 ppm x 60 MHz / 16.4 Hz.
        var first = root[0].GetProperty("clusters")[0];
        Assert.Equal(0.13 * 60 / 16.4, first.GetProperty("min_ratio").GetDouble(), 9);
        Assert.Equal(["HA", "HB"], first.GetProperty("closest_pair").EnumerateArray().Select(n => n.GetString()));
    }

    [Fact]
    public void FigureIsWrittenAsPng()
    {
        var png = Temp(".png");
        var (code, o, err) = CliTests.Run("fields", CliTests.Example("para-ring-aabb.toml"), "--at", "60,400", "--figure", png);
        Assert.True(code == 0, err);
        Assert.Contains($"written: {png}", err);
        var bytes = File.ReadAllBytes(png);
        Assert.True(bytes.Length > 1000, $"{bytes.Length} bytes");
        Assert.Equal(new byte[] { 0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A }, bytes[..8]);
        File.Delete(png);
    }

    [Theory]
    [InlineData("60,abc", "\"abc\" is not a number")]
    [InlineData("60,,80", "empty value")]
    [InlineData("0", "above 0 MHz")]
    [InlineData("-80", "above 0 MHz")]
    [InlineData("60;80", "\"60;80\" is not a number")]
    public void BadFieldListsAreUserErrors(string at, string message)
    {
        var (code, _, err) = CliTests.Run("fields", CliTests.Example("para-ring-aabb.toml"), $"--at={at}");
        Assert.Equal(1, code);
        Assert.Contains(message, err);
        Assert.Contains("--at", err);
    }

    [Fact]
    public void BadToleranceAndFigureTypeAreUserErrors()
    {
        Assert.Equal(1, CliTests.Run("fields", CliTests.Example("vinyl.toml"), "--at", "60", "--tolerance", "0").Code);
        var (code, _, err) = CliTests.Run("fields", CliTests.Example("vinyl.toml"), "--at", "60", "--figure", Temp(".gif"));
        Assert.Equal(1, code);
        Assert.Contains(".png", err);
    }
}
