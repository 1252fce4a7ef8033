using SpinSim.Core.Fitting.Spectral;
using System.Text;
using System.Text.RegularExpressions;
using System.Xml.Linq;
using SpinSim.Core.Reporting;
using SpinSim.Figures;
using SpinSim.Figures.Plots;
using SpinSim.Figures.Report;

namespace SpinSim.Tests.Figures;

public sealed class HtmlFitReportTests
{
    private static readonly XNamespace X = "http://www.w3.org/1999/xhtml";

    private static FitReportData Data(string? svg = null)
    {
        var options = new FigureOptions { WidthMm = 160, HeightMm = 100 };
        svg ??= Encoding.UTF8.GetString(FigureRenderer.Render(FitFigure.Create(FigureSamples.Fit(), options), FigureFormat.Svg, options));
        return new FitReportData(
            "Fit of <sample> & friends",
            svg,
            [new("δ(H1)/ppm", "7.2604(3)", "±0.0004", ParameterGroup.Spin), new("J(H1,H2)/Hz", "7.12(4)", "±0.05", ParameterGroup.Spin),
             new("scale", "1.0012(4)", "±0.0005", ParameterGroup.Nuisance)],
            ["line width fixed at 0.8 Hz", "residual shows a baseline roll < 1 %"],
            [("spectrum.jdx", new string('a', 64)), ("system.toml", new string('b', 64))],
            "0.1.0",
            new DateTimeOffset(2025, 3, 4, 5, 6, 7, TimeSpan.FromHours(1)),
            [("RMS residual", "0.0041"), ("points", "8192")],
            new ParameterCorrelation(["δ(H1)", "J(H1,H2)", "scale"], new[,] { { 1.0, 0.95, 0.1 }, { 0.95, 1.0, -0.2 }, { 0.1, -0.2, 1.0 } }))
        {
            TableKey = "Digits in parentheses: the standard error.",
            ReportLine = "¹H NMR (400 MHz): δ 7.260 (d, 1H, J = 7.12 Hz).",
            Setup = SetupTable.Flatten(System.Text.Json.Nodes.JsonNode.Parse("""{"regions_ppm": [[7.6, 6.8]], "lineshape": "lorentzian", "bounds": {"shift:H1": [7.2, 7.5]}}""")),
        };
    }

    private static XDocument Parse(string html)
    {
        Assert.StartsWith("<!DOCTYPE html>", html);
        return XDocument.Parse(html[html.IndexOf('\n')..]);
    }

    [Fact]
    public void Report_is_well_formed_xml_and_keeps_its_parts()
    {
        var html = HtmlFitReport.Render(Data());
        FigureSamples.Keep("report.html", Encoding.UTF8.GetBytes(html));

        var doc = Parse(html);
        XDocument.Parse(html); // the doctype alone does not upset an XML parser either
        Assert.Equal(X + "html", doc.Root!.Name);
        Assert.Single(doc.Descendants(XNamespace.Get("http://www.w3.org/2000/svg") + "svg"));

        var parameterTable = doc.Descendants(X + "table").First();
        var header = parameterTable.Element(X + "thead")!.Descendants(X + "th").Select(t => t.Value).ToArray();
        Assert.Equal(["parameter", "value (standard error)", "bootstrap"], header);
        var cells = parameterTable.Descendants(X + "td").Select(t => t.Value).ToArray();
        Assert.Equal(["δ(H1)/ppm", "7.2604(3)", "±0.0004", "J(H1,H2)/Hz", "7.12(4)", "±0.05", "scale", "1.0012(4)", "±0.0005"], cells);
        var groups = parameterTable.Descendants(X + "th").Where(t => (string?)t.Attribute("class") == "group").Select(t => t.Value).ToArray();
        Assert.Equal([ParameterDisplay.GroupHeading(ParameterGroup.Spin), ParameterDisplay.GroupHeading(ParameterGroup.Nuisance)], groups);

        var text = doc.Root.Value;
        Assert.Contains("Fit of <sample> & friends", text);
        Assert.Contains("line width fixed at 0.8 Hz", text);
        Assert.Contains("residual shows a baseline roll < 1 %", text);
        Assert.Contains(new string('a', 64), text);
        Assert.Contains("system.toml", text);
        Assert.Contains("0.1.0", text);
        Assert.Contains("2025-03-04 05:06:07 +01:00", text);
        Assert.Contains("RMS residual", text);
        Assert.Contains(HtmlFitReport.Caution, text);
        Assert.Contains("do not replace", text);
        Assert.Contains(HtmlFitReport.CovarianceCaveat, text);
        Assert.Contains("¹H NMR (400 MHz): δ 7.260 (d, 1H, J = 7.12 Hz).", text);
        Assert.Contains("Digits in parentheses", text);
        Assert.DoesNotContain("did not converge", text);
    }

    [Fact]
    public void Setup_is_shown_as_recorded_key_by_key()
    {
        var doc = Parse(HtmlFitReport.Render(Data()));
        var setup = doc.Descendants(X + "table").Single(t => (string?)t.Attribute("class") == "setup");
        var rows = setup.Element(X + "tbody")!.Elements(X + "tr").Select(r => r.Elements(X + "td").Select(c => c.Value).ToArray()).ToArray();
        Assert.Equal(["regions_ppm", "[7.6, 6.8]"], rows[0]);
        Assert.Equal(["lineshape", "lorentzian"], rows[1]);
        Assert.Equal(["bounds.shift:H1", "7.2, 7.5"], rows[2]);
    }

    [Fact]
    public void A_fit_that_did_not_converge_gets_a_banner_at_the_top()
    {
        var doc = Parse(HtmlFitReport.Render(Data("") with { Banner = "The fit did not converge." }));
        var first = doc.Descendants(X + "body").Single().Elements().Skip(1).First();
        Assert.Equal("banner", (string?)first.Attribute("class"));
        Assert.Equal("The fit did not converge.", first.Value);
    }

    [Fact]
    public void Correlations_are_a_lower_triangle_each_pair_once()
    {
        var doc = Parse(HtmlFitReport.Render(Data()));
        var table = doc.Descendants(X + "table").Single(t => (string?)t.Attribute("class") == "correlation");
        var columns = table.Element(X + "thead")!.Descendants(X + "th").Skip(1).Select(t => t.Value).ToArray();
        Assert.Equal(["δ(H1)", "J(H1,H2)"], columns); // n - 1 columns: no diagonal
        var rows = table.Element(X + "tbody")!.Elements(X + "tr")
            .Select(r => r.Elements(X + "td").Select(c => c.Value).ToArray()).ToArray();
        Assert.Equal(["0.95", ""], rows[0]);            // J(H1,H2) against δ(H1)
        Assert.Equal(["0.10", "\u22120.20"], rows[1]);  // scale against both, true minus
    }

    [Fact]
    public void Report_is_self_contained()
    {
        var html = HtmlFitReport.Render(Data());
        var doc = Parse(html);
        Assert.Empty(doc.Descendants(X + "script"));
        Assert.Empty(doc.Descendants(X + "link"));
        Assert.DoesNotMatch(new Regex(@"(src|href)\s*=\s*""(https?:)?//", RegexOptions.IgnoreCase), html);
    }

    [Fact]
    public void Non_void_elements_are_closed_with_an_end_tag()
    {
        // An HTML parser reads <td/> as an open <td>; only void elements may self-close outside the SVG.
        var html = HtmlFitReport.Render(Data() with { Parameters = [new("fixed", "1", "", ParameterGroup.Spin)] });
        var outsideSvg = Regex.Replace(html, "<svg.*</svg>", "", RegexOptions.Singleline);
        var selfClosed = Regex.Matches(outsideSvg, @"<([a-z0-9]+)\b[^>]*/>").Select(m => m.Groups[1].Value).Distinct();
        Assert.All(selfClosed, name => Assert.Contains(name, new[] { "meta", "br", "hr", "img", "link" }));
    }

    [Fact]
    public void Strong_correlations_are_marked()
    {
        var doc = Parse(HtmlFitReport.Render(Data()));
        var strong = doc.Descendants(X + "td").Where(t => ((string?)t.Attribute("class") ?? "").Contains("strong")).Select(t => t.Value).ToArray();
        Assert.Equal(["0.95"], strong); // once: the lower triangle
    }

    [Fact]
    public void Correlation_of_the_wrong_shape_is_refused()
    {
        var data = Data("") with { Correlation = new ParameterCorrelation(["a", "b", "c"], new double[2, 2]) };
        Assert.Throws<ArgumentException>(() => HtmlFitReport.Render(data));
    }

    [Fact]
    public void Malformed_svg_is_refused()
    {
        var e = Assert.Throws<ArgumentException>(() => HtmlFitReport.Render(Data("<svg xmlns=\"http://www.w3.org/2000/svg\"><g></svg>")));
        Assert.Contains("not well-formed", e.Message);
    }

    [Fact]
    public void Scripts_in_the_figure_are_dropped()
    {
        const string svg = "<?xml version=\"1.0\"?><svg xmlns=\"http://www.w3.org/2000/svg\" onload=\"alert(1)\"><script>alert(2)</script><rect width=\"1\" height=\"1\"/></svg>";
        var html = HtmlFitReport.Render(Data(svg));
        Assert.DoesNotContain("alert", html);
        Assert.DoesNotContain("<?xml", html);
    }

    [Fact]
    public void Empty_lists_say_so()
    {
        var data = Data("") with { Warnings = [], Inputs = [], Statistics = [], Correlation = null };
        var text = Parse(HtmlFitReport.Render(data)).Root!.Value;
        Assert.Contains("None.", text);
        Assert.Contains("No input files were recorded.", text);
    }
}
