using System.Globalization;
using System.Xml;
using System.Xml.Linq;
using SpinSim.Core.Reporting;

namespace SpinSim.Figures.Report;

/// <summary>
/// A fit report as one self-contained HTML page: inline CSS and inline SVG, no scripts, no external
/// resources, so the single file opens anywhere and can be archived with the data. The markup is also
/// well-formed XML (XHTML syntax), built as an element tree so every tag is closed and every text escaped.
/// </summary>
public static class HtmlFitReport
{
    private static readonly XNamespace Xhtml = "http://www.w3.org/1999/xhtml";
    private static readonly XNamespace Svg = "http://www.w3.org/2000/svg";

    /// <summary>Correlations at least this strong (off the diagonal) are marked: the data barely separate the pair.</summary>
    public const double StrongCorrelation = 0.9;

    /// <summary>What the covariance standard errors assume, and why they are optimistic for a spectrum.</summary>
    public const string CovarianceCaveat =
        "The standard errors come from the covariance matrix s² (JᵀJ)⁻¹, which assumes independent points. Neighbouring " +
        "points of a digitised spectrum are correlated (oversampled lines, filtered noise), so these errors are optimistic; " +
        "the block-bootstrap errors (fit --bootstrap N), where given, allow for that. Neither covers baseline or lineshape " +
        "distortions, impurities or referencing errors.";

    /// <summary>The sentence every report carries, so that a fit is not mistaken for a measurement.</summary>
    public const string Caution =
        "Fitted values support, but do not replace, measured evidence: check them against the spectrum, " +
        "the residual and independent data before relying on them.";

    // Kept free of '<', '>' and '&': inside <style> an HTML parser reads characters raw, an XML parser
    // reads entities, and only text without those three means the same to both.
    private const string Css = """
        body { font-family: "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; color: #111; background: #fff;
               max-width: 62rem; margin: 2rem auto; padding: 0 1rem; line-height: 1.45; overflow-wrap: anywhere; }
        h1 { font-size: 1.5rem; margin-bottom: 0.3rem; }
        h2 { font-size: 1.15rem; margin-top: 2rem; border-bottom: 1px solid #999; padding-bottom: 0.2rem; }
        .caution { border-left: 4px solid #D55E00; background: #fbefe6; padding: 0.6rem 0.9rem; }
        .banner { border: 2px solid #D55E00; background: #fbe3d3; padding: 0.6rem 0.9rem; font-weight: bold; }
        .figure svg { width: 100%; height: auto; border: 1px solid #ddd; }
        table { border-collapse: collapse; margin: 0.5rem 0; }
        th, td { padding: 0.25rem 0.7rem; border-bottom: 1px solid #ddd; text-align: left; vertical-align: top; }
        th { border-bottom: 2px solid #444; }
        th.group { border-bottom: 1px solid #999; padding-top: 0.8rem; font-style: italic; font-weight: normal; }
        td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
        td.strong { font-weight: bold; background: #d6e6f2; }
        table.setup td:first-child { white-space: nowrap; }
        table.correlation { table-layout: fixed; width: 100%; font-size: 0.72rem; }
        table.correlation th, table.correlation td { padding: 0.15rem 0.2rem; }
        table.correlation th.name { width: 11rem; text-align: right; font-weight: normal; border-bottom: 1px solid #ddd; }
        table.correlation th.col { writing-mode: vertical-rl; transform: rotate(180deg); text-align: left; font-weight: normal;
                                   vertical-align: bottom; white-space: nowrap; border-bottom: none; }
        table.correlation td.num { white-space: nowrap; overflow: hidden; }
        .dataline { font-family: "DejaVu Serif", Georgia, serif; background: #f4f4f4; padding: 0.6rem 0.9rem; }
        code { font-family: "DejaVu Sans Mono", Consolas, monospace; font-size: 0.85rem; word-break: break-all; }
        ul.warnings li { margin: 0.2rem 0; }
        .note { color: #444; font-size: 0.9rem; }
        footer { margin-top: 2.5rem; color: #444; font-size: 0.85rem; border-top: 1px solid #999; padding-top: 0.5rem; }
        @page { size: A4; margin: 15mm; }
        @media print { body { margin: 0; max-width: none; padding: 0; } .figure svg { border: none; }
                       table, .figure { page-break-inside: avoid; } h2 { page-break-after: avoid; } }
        """;

    /// <summary>The report page, starting with the HTML5 doctype.</summary>
    /// <exception cref="ArgumentException"><see cref="FitReportData.SvgFigure"/> is not well-formed SVG, or the correlation matrix does not match its names.</exception>
    public static string Render(FitReportData data)
    {
        ArgumentNullException.ThrowIfNull(data);
        var title = string.IsNullOrWhiteSpace(data.Title) ? "Fit report" : data.Title;
        var version = data.Version ?? "";
        var created = data.Created.ToString("yyyy-MM-dd HH:mm:ss zzz", CultureInfo.InvariantCulture);

        var body = E("body", E("h1", title));
        if (!string.IsNullOrWhiteSpace(data.Banner))
            body.Add(E("p", new XAttribute("class", "banner"), new XAttribute("role", "alert"), data.Banner));
        body.Add(E("p", new XAttribute("class", "caution"), E("strong", "Caution. "), Caution));

        if (!string.IsNullOrWhiteSpace(data.SvgFigure))
            body.Add(E("div", new XAttribute("class", "figure"), ParseSvg(data.SvgFigure)));

        body.Add(E("h2", "Fitted parameters"));
        if (data.Parameters is { Count: > 0 } parameters)
        {
            var bootstrap = parameters.Any(p => p.Bootstrap.Length > 0);
            var signs = parameters.Any(p => p.Sign.Length > 0);
            string[] header = ["parameter", "value (standard error)", .. bootstrap ? new[] { "bootstrap" } : [], .. signs ? new[] { "relative sign" } : []];
            var rows = new List<XElement>();
            foreach (var group in parameters.GroupBy(p => p.Group))
            {
                rows.Add(E("tr", E("th", new XAttribute("class", "group"), new XAttribute("colspan", header.Length), ParameterDisplay.GroupHeading(group.Key))));
                rows.AddRange(group.Select(p => E("tr", new[] { Cell(p.Label), Num(p.Value) }
                    .Concat(bootstrap ? [Num(p.Bootstrap)] : []).Concat(signs ? [Cell(p.Sign)] : []))));
            }
            body.Add(E("table", E("thead", E("tr", header.Select(h => E("th", h)))), E("tbody", rows)));
            if (!string.IsNullOrWhiteSpace(data.TableKey)) body.Add(E("p", new XAttribute("class", "note"), data.TableKey));
        }
        else body.Add(E("p", "No parameters were fitted."));
        body.Add(E("p", new XAttribute("class", "note"), E("strong", "On the standard errors. "), CovarianceCaveat));

        if (!string.IsNullOrWhiteSpace(data.ReportLine))
        {
            body.Add(E("h2", "Data line"));
            body.Add(E("p", new XAttribute("class", "dataline"), data.ReportLine));
            body.Add(E("p", new XAttribute("class", "note"),
                "In the usual form of an experimental section, from the fitted values: first-order resonances by the n + 1 rule, " +
                "strongly coupled ones named as parts of their spin system, digits limited by the standard errors. Check it against the spectrum."));
        }

        if (data.Statistics is { Count: > 0 } statistics)
        {
            body.Add(E("h2", "Fit statistics"));
            body.Add(Table(["quantity", "value"], statistics.Select(s => new[] { Cell(s.Label), Num(s.Value) })));
        }

        body.Add(E("h2", "Setup (enough to run the fit again)"));
        body.Add(data.Setup is { Count: > 0 } setup
            ? E("table", new XAttribute("class", "setup"), E("thead", E("tr", E("th", "entry"), E("th", "value"))),
                E("tbody", setup.Select(s => E("tr", Cell(s.Key), E("td", E("code", s.Value))))))
            : E("p", "The JSON report of this fit records no setup."));

        if (data.Correlation is { } correlation)
        {
            body.Add(E("h2", "Parameter correlations"));
            body.Add(CorrelationTable(correlation));
            body.Add(E("p", new XAttribute("class", "note"),
                string.Create(CultureInfo.InvariantCulture,
                    $"Lower triangle: each pair once. Bold, shaded cells mark |r| ≥ {StrongCorrelation:0.0#}: the data barely separate that pair, so their values and errors are less certain than the table alone suggests.")));
        }

        if (data.SolutionLines.Count > 0)
        {
            body.Add(E("h2", "Relative signs and alternative solutions"));
            body.Add(E("ul", new XAttribute("class", "solutions"), data.SolutionLines.Select(l => E("li", l.Trim()))));
        }

        body.Add(E("h2", "Warnings"));
        body.Add(data.Warnings is { Count: > 0 } warnings
            ? E("ul", new XAttribute("class", "warnings"), warnings.Select(w => E("li", w ?? "")))
            : E("p", "None."));

        body.Add(E("h2", "Inputs"));
        body.Add(data.Inputs is { Count: > 0 } inputs
            ? Table(["file", "SHA-256"], inputs.Select(i => new[] { Cell(i.Name), E("td", E("code", i.Sha256 ?? "")) }))
            : E("p", "No input files were recorded."));

        body.Add(E("footer",
            E("p", $"SpinSim {version}. Report created ", E("time", new XAttribute("datetime", data.Created.ToString("o", CultureInfo.InvariantCulture)), created), ".")));

        var html = new XElement(Xhtml + "html", new XAttribute("lang", "en"),
            E("head",
                new XElement(Xhtml + "meta", new XAttribute("charset", "utf-8")),
                new XElement(Xhtml + "meta", new XAttribute("name", "viewport"), new XAttribute("content", "width=device-width, initial-scale=1")),
                new XElement(Xhtml + "meta", new XAttribute("name", "generator"), new XAttribute("content", $"SpinSim {version}".TrimEnd())),
                E("title", title),
                E("style", Css)),
            body);

        return "<!DOCTYPE html>\n" + html.ToString(SaveOptions.None) + "\n";
    }

    // Every non-void HTML element gets content, possibly empty text, so that it is written with an end tag:
    // an HTML parser reads <td/> as an unclosed <td>.
    private static XElement E(string name, params object?[] content)
    {
        var element = new XElement(Xhtml + name, content);
        if (element.IsEmpty) element.Add("");
        return element;
    }

    private static XElement Cell(string? text) => E("td", text ?? "");

    private static XElement Num(string? text) => E("td", new XAttribute("class", "num"), text ?? "");

    private static XElement Table(string[] header, IEnumerable<XElement[]> rows) =>
        E("table",
            E("thead", E("tr", header.Select(h => E("th", h)))),
            E("tbody", rows.Select(r => E("tr", r))));

    private static XElement CorrelationTable(ParameterCorrelation correlation)
    {
        var names = correlation.Names ?? throw new ArgumentException("correlation names are required", nameof(correlation));
        var m = correlation.Matrix ?? throw new ArgumentException("the correlation matrix is required", nameof(correlation));
        if (m.GetLength(0) != names.Count || m.GetLength(1) != names.Count)
            throw new ArgumentException($"the correlation matrix is {m.GetLength(0)} x {m.GetLength(1)} but there are {names.Count} names; it must be square with one row per name", nameof(correlation));

        // Lower triangle without the diagonal: each pair once, n - 1 columns, so the table is half as wide.
        var rows = Enumerable.Range(1, names.Count - 1).Select(i =>
            E("tr", new[] { E("th", new XAttribute("class", "name"), names[i] ?? "") }.Concat(Enumerable.Range(0, names.Count - 1).Select(j =>
            {
                if (j >= i) return E("td", "");
                var r = m[i, j];
                var text = double.IsFinite(r) ? Typography.TrueMinus(r.ToString("0.00", CultureInfo.InvariantCulture)) : "–";
                var strong = double.IsFinite(r) && Math.Abs(r) >= StrongCorrelation;
                return E("td", new XAttribute("class", strong ? "num strong" : "num"), text);
            }))));
        return E("table", new XAttribute("class", "correlation"),
            E("thead", E("tr", new[] { E("th", new XAttribute("class", "name"), "") }
                .Concat(names.Take(names.Count - 1).Select(n => E("th", new XAttribute("class", "col"), n ?? ""))))),
            E("tbody", rows));
    }

    // The figure is parsed rather than pasted, so malformed markup fails here instead of breaking the page,
    // and any XML declaration or doctype is left behind; scripts and event handlers are dropped so the report
    // stays a passive document.
    private static XElement ParseSvg(string markup)
    {
        XElement svg;
        try
        {
            var settings = new XmlReaderSettings { DtdProcessing = DtdProcessing.Ignore, XmlResolver = null };
            using var reader = XmlReader.Create(new StringReader(markup), settings);
            svg = XDocument.Load(reader).Root ?? throw new XmlException("no root element");
        }
        catch (XmlException e)
        {
            throw new ArgumentException($"the figure is not well-formed SVG: {e.Message}", nameof(markup), e);
        }
        if (svg.Name != Svg + "svg")
            throw new ArgumentException($"the figure's root element is {svg.Name}, expected svg in the namespace {Svg}", nameof(markup));

        svg.Descendants().Where(e => e.Name.LocalName == "script").ToList().ForEach(e => e.Remove());
        foreach (var element in svg.DescendantsAndSelf())
            element.Attributes().Where(a => a.Name.LocalName.StartsWith("on", StringComparison.OrdinalIgnoreCase)).ToList().ForEach(a => a.Remove());
        svg.SetAttributeValue("role", "img");
        return svg;
    }
}
