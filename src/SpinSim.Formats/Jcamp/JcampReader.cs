// JCAMP-DX 4.24/5.x reader: McDonald & Wilks, Appl. Spectrosc. 42, 151 (1988); NMR labels: Davies & Lampen, Appl. Spectrosc. 47, 1093 (1993).
using System.Globalization;
using System.Text;
using System.Numerics;
using SpinSim.Core.Processing;
using SpinSim.Core.Traces;

namespace SpinSim.Formats.Jcamp;

/// <summary>
/// Reads one 1D NMR spectrum from a JCAMP-DX file (versions 4.24, 5.00, 5.01; 6.0 files of the same
/// shape also read). Takes the first block holding a spectrum (##XYDATA=, ##XYPOINTS= or an
/// ##NTUPLES= data table); in NTUPLES the real page. The axis comes from FIRSTX, LASTX and NPOINTS,
/// converted to ppm when x is in Hz. Every defect is a <see cref="SpectrumFileException"/>; anything
/// tolerated is listed in <see cref="TraceOrigin.Warnings"/>.
/// </summary>
/// <remarks>
/// Tolerance: when the number of ordinates differs from ##NPOINTS= by exactly one, and
/// (LASTX - FIRSTX) / DELTAX + 1 equals the number read, three labels and the data agree against
/// NPOINTS alone; the trace is read with the count read and a warning. Any other disagreement is an
/// error. (The shared 300 MHz plain-AFFN sample needs this: NPOINTS=16385 over 16,384 values.)
/// </remarks>
public static class JcampReader
{
    /// <summary>Files beyond this many points are refused rather than exhausting memory (a 50 MB file holds far fewer).</summary>
    public const int MaxPoints = 1 << 26;

    /// <summary>Reads the file at <paramref name="path"/>; an FID is processed with <paramref name="processing"/> (defaults when null).</summary>
    /// <exception cref="SpectrumFileException">The file cannot be read or is not a usable JCAMP-DX spectrum or FID.</exception>
    public static SpectrumTrace Read(string path, ProcessingOptions? processing = null)
    {
        ArgumentNullException.ThrowIfNull(path);
        return ReadData(path).ToTrace(processing);
    }

    /// <summary>Reads JCAMP-DX text; <paramref name="sourceName"/> names it in messages and in the trace's origin. An FID is processed.</summary>
    /// <exception cref="SpectrumFileException">The text is not a usable JCAMP-DX spectrum or FID.</exception>
    public static SpectrumTrace Parse(string text, string sourceName, ProcessingOptions? processing = null) =>
        ParseData(text, sourceName).ToTrace(processing);

    /// <summary>Reads the file at <paramref name="path"/> as it is: a spectrum, or an unprocessed FID.</summary>
    /// <exception cref="SpectrumFileException">The file cannot be read or is not a usable JCAMP-DX spectrum or FID.</exception>
    public static MeasuredData ReadData(string path)
    {
        ArgumentNullException.ThrowIfNull(path);
        var text = SpectrumFiles.ReadText(path);
        return ParseData(text, path);
    }

    /// <summary>Reads JCAMP-DX text as it is: a spectrum, or an unprocessed FID.</summary>
    /// <exception cref="SpectrumFileException">The text is not a usable JCAMP-DX spectrum or FID.</exception>
    public static MeasuredData ParseData(string text, string sourceName)
    {
        ArgumentNullException.ThrowIfNull(text);
        ArgumentNullException.ThrowIfNull(sourceName);
        if (string.IsNullOrWhiteSpace(text))
            throw new SpectrumFileException(sourceName, null, "the file is empty: expected a JCAMP-DX spectrum starting with ##TITLE=");
        // Old files may end lines with a bare CR.
        if (!text.Contains('\n') && text.Contains('\r')) text = text.Replace('\r', '\n');

        var warnings = new List<string>();
        var blocks = JcampScanner.Scan(text, sourceName, warnings);
        var chosen = ChooseBlock(blocks, sourceName, warnings);
        return new BlockReader(text, sourceName, chosen, FileVersion(blocks), warnings).Read();
    }

    private static string FileVersion(List<JcampBlock> blocks)
    {
        foreach (var b in blocks)
            if (b.First("JCAMPDX") is { } v)
                return v.Value;
        return "";
    }

    private static bool HasSpectrum(JcampBlock b) =>
        b.Records.Exists(r => r.Label is "XYDATA" or "XYPOINTS" or "NTUPLES");

    private static JcampBlock ChooseBlock(List<JcampBlock> blocks, string path, List<string> warnings)
    {
        var chosen = blocks.Find(HasSpectrum);
        foreach (var b in blocks)
            foreach (var r in b.Records)
                if (r.Label == "PEAKTABLE")
                    warnings.Add($"line {r.Line}: ##PEAK TABLE= ignored: a peak list is not a trace");
        if (chosen is null)
        {
            var what = blocks.Exists(b => b.First("PEAKTABLE") is not null) ? " (the file holds only a peak table)" : "";
            throw new SpectrumFileException(path, null,
                $"no spectrum found{what}: expected a block with ##XYDATA=(X++(Y..Y)), ##XYPOINTS=(XY..XY) or ##NTUPLES= with a ##DATA TABLE=");
        }
        if (blocks.Count > 1)
        {
            var others = blocks.Where(b => b != chosen).Select(b => b.Describe() + (HasSpectrum(b) ? ", a spectrum not read" : ", no spectrum"));
            warnings.Add($"the file holds {blocks.Count} blocks; read {chosen.Describe()}; not read: {string.Join("; ", others)}");
        }
        return chosen;
    }

    /// <summary>What a table needs: its form, scaling, stated axis and stated count.</summary>
    private sealed record TableSpec(
        Ldr Table, string Form, bool IsXyData, string Description,
        string XUnits, double XFactor, double YFactor,
        double? FirstX, double? LastX, double? DeltaX, double? FirstY, double? MinY, double? MaxY,
        int? NPoints, int? NPointsLine);

    /// <summary>Interprets one block's labels and decodes its table.</summary>
    private sealed class BlockReader(string text, string path, JcampBlock block, string version, List<string> warnings)
    {
        private readonly Dictionary<string, Ldr> _header = HeaderOf(block, warnings);

        public MeasuredData Read()
        {
            if (string.IsNullOrEmpty(version))
                warnings.Add("no ##JCAMP-DX= version label; read as JCAMP-DX 5.01");
            else if (!(version.StartsWith("4.24") || version.StartsWith('5') || version.StartsWith('6')))
                warnings.Add($"##JCAMP-DX={version}: versions 4.24 to 6.0 are known; read as 5.01");
            if (block.Records.Exists(r => r.Label == "NTUPLES"))
            {
                var ntuples = NtuplesPages();
                if (ntuples.IsTimeDomain) return new MeasuredData(ReadFid(ntuples));
                return new MeasuredData(ReadSpectrum(ntuples.RealPageSpec()));
            }
            return new MeasuredData(ReadSpectrum(XyDataSpec()));
        }

        private SpectrumTrace ReadSpectrum(TableSpec spec)
        {
            var observeMHz = ObserveFrequency(spec.XUnits == "HZ");
            var nucleus = Nucleus();
            var (xFile, intensity, form) = Decode(spec);
            var ppm = ToPpm(spec, xFile, observeMHz);

            var origin = new TraceOrigin(path, version.Length == 0 ? "JCAMP-DX" : $"JCAMP-DX {version}", form, warnings.ToArray(), Labels());
            try
            {
                return new SpectrumTrace(ppm, intensity, observeMHz, nucleus, origin);
            }
            catch (ArgumentException e)
            {
                throw new SpectrumFileException(path, spec.Table.Line, $"the decoded values do not form a trace: {e.Message}", e);
            }
        }

        /// <summary>A time-domain FID: the real and imaginary pages, x in seconds.</summary>
        private FreeInductionDecay ReadFid(NtuplesTable ntuples)
        {
            var (realSpec, imagSpec) = ntuples.FidPageSpecs();
            var observeMHz = ObserveFrequency(required: true)!.Value;
            var nucleus = Nucleus();
            // FID writers state MIN and MAX over both halves together, so the range is checked on both at once.
            var (time, re, realForm) = Decode(realSpec, checkRange: false);
            var (_, im, imagForm) = Decode(imagSpec, checkRange: false);
            CheckOrdinates(realSpec with { FirstY = null }, [.. re, .. im]);
            if (re.Length != im.Length)
                throw new SpectrumFileException(path, imagSpec.Table.Line,
                    $"the real page holds {re.Length} points but the imaginary page {im.Length}: both halves of the FID must have the same length");
            if (re.Length < FreeInductionDecay.MinPoints)
                throw new SpectrumFileException(path, realSpec.Table.Line, $"the FID holds {re.Length} points; at least {FreeInductionDecay.MinPoints} are needed");
            var dwell = (time[^1] - time[0]) / (time.Length - 1);
            if (!(dwell > 0 && double.IsFinite(dwell)))
                throw new SpectrumFileException(path, realSpec.Table.Line,
                    $"the time axis runs from {G(time[0])} to {G(time[^1])} s: expected increasing times (FIRST and LAST of the TIME column)");
            var points = new Complex[re.Length];
            for (var i = 0; i < points.Length; i++) points[i] = new Complex(re[i], im[i]);
            var highEdge = FidReference(re.Length, dwell);
            var delay = StatedFilterDelay(re.Length);
            var form = $"{realForm}; {imagForm}";
            var origin = new TraceOrigin(path, version.Length == 0 ? "JCAMP-DX" : $"JCAMP-DX {version}", form, warnings.ToArray(), Labels());
            try
            {
                return new FreeInductionDecay(points, dwell, observeMHz, nucleus, highEdge, delay, origin);
            }
            catch (ArgumentException e)
            {
                throw new SpectrumFileException(path, realSpec.Table.Line, $"the decoded values do not form an FID: {e.Message}", e);
            }
        }

        /// <summary>The file's points as read and scaled: x as in the file, y times its factor, and the form decoded.</summary>
        private (double[] X, double[] Y, string Form) Decode(TableSpec spec, bool checkRange = true)
        {
            double[] xFile, yRaw;
            string form;
            if (spec.IsXyData)
            {
                var maxPoints = spec.NPoints is { } np ? Math.Min(np + 1, MaxPoints) : MaxPoints;
                var table = AsdfDecoder.DecodeXyData(text, spec.Table.BodyStart, spec.Table.BodyEnd, spec.Table.BodyFirstLine,
                    spec.NPoints ?? 0, maxPoints, path);
                var count = CheckedCount(spec, table.Count, table.LastDataLine);
                yRaw = table.Y.AsSpan(0, count).ToArray();
                xFile = EvenAxis(spec.FirstX!.Value, spec.LastX!.Value, count);
                CheckAbscissae(spec, table, xFile);
                form = $"{spec.Description} {FormsText(table.Forms)}";
            }
            else
            {
                var (xRaw, yPoints, lastLine) = AsdfDecoder.DecodeXyPoints(text, spec.Table.BodyStart, spec.Table.BodyEnd, spec.Table.BodyFirstLine,
                    spec.NPoints is { } np ? Math.Min(np, MaxPoints) : MaxPoints, path);
                if (xRaw.Length == 0)
                    throw new SpectrumFileException(path, spec.Table.Line, $"the ##{spec.Table.RawLabel}= table holds no points; expected x,y pairs");
                if (spec.NPoints is { } stated && stated != xRaw.Length)
                    throw new SpectrumFileException(path, lastLine,
                        $"the table holds {xRaw.Length} points but ##NPOINTS= says {stated}: the data are cut short or NPOINTS is wrong");
                if (spec.NPoints is null) warnings.Add("no ##NPOINTS=; the count read from the table was used");
                xFile = Scale(xRaw, spec.XFactor, "x", spec.Table.Line);
                yRaw = yPoints;
                CheckEnds(spec, xFile);
                form = $"{spec.Description} AFFN";
            }
            var intensity = Scale(yRaw, spec.YFactor, "y", spec.Table.Line);
            if (checkRange) CheckOrdinates(spec, intensity);
            return (xFile, intensity, form);
        }

        private TableSpec XyDataSpec()
        {
            var table = block.Records.Find(r => r.Label is "XYDATA" or "XYPOINTS")!;
            var form = NormaliseForm(table.Value);
            var isXyData = table.Label == "XYDATA";
            var expected = isXyData ? "(X++(Y..Y))" : "(XY..XY)";
            if (form != expected)
                throw new SpectrumFileException(path, table.Line,
                    $"##{table.RawLabel}={table.Value}: expected the form {expected}; other variable lists are not 1D spectra");
            if (block.Records.Count(r => r.Label is "XYDATA" or "XYPOINTS") > 1)
                warnings.Add($"the block holds more than one data table; the first (line {table.Line}) was read");

            var xUnits = Units(Required("XUNITS"));
            var yFactor = Factor("YFACTOR");
            var xFactor = Factor("XFACTOR");
            var npoints = Count("NPOINTS", required: isXyData);
            return new TableSpec(table, form, isXyData, $"{table.Label} {form}", xUnits, xFactor, yFactor,
                isXyData ? Number("FIRSTX", required: true) : Number("FIRSTX"),
                isXyData ? Number("LASTX", required: true) : Number("LASTX"),
                Number("DELTAX"), Number("FIRSTY"), Number("MINY"), Number("MAXY"),
                npoints, _header.TryGetValue("NPOINTS", out var n) ? n.Line : null);
        }

        /// <summary>One page of an NTUPLES table: its ##PAGE= and ##DATA TABLE= records, page labels, form and columns.</summary>
        private sealed record NtuplesPage(Ldr Table, Dictionary<string, Ldr> Labels, string Form, bool IsXyData, int XCol, int YCol, string PageText);

        /// <summary>An NTUPLES table: per-column attributes, then pages. Spectra read the real page; FIDs the real and imaginary pages.</summary>
        private sealed class NtuplesTable(BlockReader reader, string path, List<string> warnings, int startLine, Dictionary<string, Ldr> columns, List<NtuplesPage> pages, string[] symbols, string[] names)
        {
            public string[] Column(string label) =>
                columns.TryGetValue(label, out var r) ? r.Value.Split(',', StringSplitOptions.TrimEntries) : [];

            /// <summary>True when the x column is in seconds (an FID).</summary>
            public bool IsTimeDomain
            {
                get
                {
                    var units = Column("UNITS");
                    var x = pages[0].XCol;
                    return x < units.Length && units[x].Trim().ToUpperInvariant() is "SECONDS" or "SECOND" or "S";
                }
            }

            private bool Named(int col, string word, string symbol) =>
                (col < names.Length && names[col].Contains(word, StringComparison.OrdinalIgnoreCase))
                || symbols[col].Equals(symbol, StringComparison.OrdinalIgnoreCase);

            private string SymbolName(int col) => col < names.Length && names[col].Length > 0 ? names[col] : symbols[col];

            public TableSpec RealPageSpec()
            {
                var chosen = pages.FindIndex(p => Named(p.YCol, "REAL", "R"));
                if (chosen < 0)
                {
                    chosen = 0;
                    warnings.Add("NTUPLES: no page holds a real spectrum column; the first page was read");
                }
                var c = pages[chosen];
                var others = pages.Where((_, i) => i != chosen).Select(p => $"{p.PageText} ({SymbolName(p.YCol)})").ToList();
                warnings.Add($"NTUPLES: read the real page {c.PageText} ({SymbolName(c.YCol)})" +
                    (others.Count > 0 ? $"; not read: {string.Join(", ", others)}" : ""));
                return Spec(c, timeDomain: false);
            }

            public (TableSpec Real, TableSpec Imaginary) FidPageSpecs()
            {
                var real = pages.Find(p => Named(p.YCol, "REAL", "R"));
                var imaginary = pages.Find(p => Named(p.YCol, "IMAG", "I"));
                if (real is null || imaginary is null)
                    throw new SpectrumFileException(path, startLine,
                        "an FID (x in SECONDS) needs a real and an imaginary page (VAR_NAME .../REAL and .../IMAG, or SYMBOL R and I); " +
                        $"the pages hold {string.Join(", ", pages.Select(p => SymbolName(p.YCol)))}");
                return (Spec(real, timeDomain: true), Spec(imaginary, timeDomain: true));
            }

            private double? At(string label, int col, bool required = false)
            {
                var values = Column(label);
                if (col < values.Length && values[col].Length > 0)
                    return reader.ParseNumber(values[col], columns[label]);
                if (required)
                    throw new SpectrumFileException(path, startLine,
                        $"NTUPLES: ##{label}= gives no value for column {symbols[col]}; it is required to build the axis");
                return null;
            }

            private TableSpec Spec(NtuplesPage c, bool timeDomain)
            {
                var xUnitsList = Column("UNITS");
                if (c.XCol >= xUnitsList.Length || xUnitsList[c.XCol].Length == 0)
                    throw new SpectrumFileException(path, startLine, $"NTUPLES: ##UNITS= gives no unit for the x column {symbols[c.XCol]}");
                var pageN = c.Labels.TryGetValue("NPOINTS", out var pn) ? pn : null;
                int? npoints = pageN is not null ? reader.ParseCount(pageN)
                    : At("VARDIM", c.YCol) is { } dim ? reader.CountFrom(dim, columns["VARDIM"]) : null;
                if (c.IsXyData && npoints is null)
                    throw new SpectrumFileException(path, startLine, "NTUPLES: neither ##VAR_DIM= nor the page's ##NPOINTS= gives the number of points");
                var firstY = c.Labels.TryGetValue("FIRSTY", out var fy) ? reader.ParseNumber(fy.Value, fy) : At("FIRST", c.YCol);
                var first = At("FIRST", c.XCol, required: c.IsXyData);
                var last = At("LAST", c.XCol, required: c.IsXyData);
                var unitsLdr = new Ldr("UNITS", "UNITS", xUnitsList[c.XCol], columns["UNITS"].Line, 0, 0);
                return new TableSpec(c.Table, c.Form, c.IsXyData, $"NTUPLES {c.PageText} {c.Form}",
                    timeDomain ? "SECONDS" : reader.Units(unitsLdr),
                    At("FACTOR", c.XCol) ?? 1, At("FACTOR", c.YCol) ?? 1,
                    first, last, null, firstY, At("MIN", c.YCol), At("MAX", c.YCol),
                    npoints, pageN?.Line ?? (columns.TryGetValue("VARDIM", out var vd) ? vd.Line : null));
            }
        }

        private NtuplesTable NtuplesPages()
        {
            var start = block.Records.FindIndex(r => r.Label == "NTUPLES");
            var columns = new Dictionary<string, Ldr>();
            var raw = new List<(Ldr Page, Ldr Table, Dictionary<string, Ldr> Labels)>();
            Ldr? page = null;
            var pageLabels = new Dictionary<string, Ldr>();
            for (var i = start + 1; i < block.Records.Count; i++)
            {
                var r = block.Records[i];
                if (r.Label == "ENDNTUPLES") break;
                if (r.Label == "PAGE") { page = r; pageLabels = []; }
                else if (r.Label == "DATATABLE")
                {
                    if (page is null)
                        throw new SpectrumFileException(path, r.Line, "##DATA TABLE= before any ##PAGE=: each NTUPLES page starts with ##PAGE=");
                    raw.Add((page, r, pageLabels));
                }
                else if (page is null) columns.TryAdd(r.Label, r);
                else pageLabels.TryAdd(r.Label, r);
            }
            var startLine = block.Records[start].Line;
            if (raw.Count == 0)
                throw new SpectrumFileException(path, startLine, "##NTUPLES= with no ##PAGE= and ##DATA TABLE=: expected at least one page of data");

            string[] Column(string label) =>
                columns.TryGetValue(label, out var r) ? r.Value.Split(',', StringSplitOptions.TrimEntries) : [];
            var symbols = Column("SYMBOL");
            var names = Column("VARNAME");
            if (symbols.Length == 0)
                throw new SpectrumFileException(path, startLine, "##NTUPLES= without ##SYMBOL=: the columns cannot be matched to the pages");

            // Parse each page's form, e.g. "(X++(R..R)), XYDATA".
            var pages = new List<NtuplesPage>();
            foreach (var (p, t, labels) in raw)
            {
                var form = NormaliseForm(t.Value.Split(',')[0]);
                var (xs, ys, isXy) = SymbolsOf(form) ?? throw new SpectrumFileException(path, t.Line,
                    $"##DATA TABLE={t.Value}: expected (X++(Y..Y)) or (XY..XY) with column symbols");
                var xCol = Array.FindIndex(symbols, s => s.Equals(xs, StringComparison.OrdinalIgnoreCase));
                var yCol = Array.FindIndex(symbols, s => s.Equals(ys, StringComparison.OrdinalIgnoreCase));
                if (xCol < 0 || yCol < 0)
                    throw new SpectrumFileException(path, t.Line,
                        $"##DATA TABLE={t.Value} names a symbol not in ##SYMBOL={string.Join(",", symbols)}");
                pages.Add(new NtuplesPage(t, labels, form, isXy, xCol, yCol, p.Value));
            }
            return new NtuplesTable(this, path, warnings, startLine, columns, pages, symbols, names);
        }

        private static (string X, string Y, bool IsXyData)? SymbolsOf(string form)
        {
            // (X++(Y..Y)) or (XY..XY), symbols of any length.
            if (form.StartsWith('(') && form.EndsWith("))") && form.Contains("++("))
            {
                var x = form[1..form.IndexOf("++(", StringComparison.Ordinal)];
                var inner = form[(form.IndexOf("++(", StringComparison.Ordinal) + 3)..^2];
                var dots = inner.IndexOf("..", StringComparison.Ordinal);
                return dots > 0 && x.Length > 0 ? (x, inner[..dots], true) : null;
            }
            if (form.StartsWith('(') && form.EndsWith(')') && form.Length == 8 && form[3..5] == "..")
                return (form[1].ToString(), form[2].ToString(), false);
            return null;
        }

        private int CheckedCount(TableSpec spec, int read, int lastDataLine)
        {
            if (read == 0)
                throw new SpectrumFileException(path, spec.Table.Line, $"the ##{spec.Table.RawLabel}= table holds no ordinates");
            var stated = spec.NPoints!.Value;
            if (read == stated) return read;
            var where = spec.NPointsLine is { } l ? $" (line {l})" : "";
            if (Math.Abs(read - stated) == 1 && spec.DeltaX is { } dx && dx != 0)
            {
                var steps = (spec.LastX!.Value - spec.FirstX!.Value) / dx;
                if (Math.Abs(steps - (read - 1)) < 0.01)
                {
                    warnings.Add($"##NPOINTS={stated}{where} but {read} ordinates follow; FIRSTX, LASTX and DELTAX agree with {read}, so {read} points were read");
                    return read;
                }
            }
            throw new SpectrumFileException(path, lastDataLine,
                $"the table ends after {read} ordinates but ##NPOINTS={stated}{where}: the data are cut short, lines are missing or duplicated, or NPOINTS is wrong; " +
                "re-export the file or correct NPOINTS");
        }

        private static double[] EvenAxis(double first, double last, int n)
        {
            var x = new double[n];
            if (n == 1) { x[0] = first; return x; }
            var span = last - first;
            for (var i = 0; i < n; i++) x[i] = first + span * i / (n - 1);
            x[n - 1] = last;
            return x;
        }

        // Line abscissae are only a check: many writers round them or write point indices, so the axis
        // comes from FIRSTX/LASTX/NPOINTS and a disagreement is a warning. A line's X is allowed the
        // rounding of its printed digits plus half a point.
        private void CheckAbscissae(TableSpec spec, XyDataTable table, double[] x)
        {
            var n = x.Length;
            var step = n > 1 ? Math.Abs(x[n - 1] - x[0]) / (n - 1) : 0;
            int bad = 0;
            LineAbscissa? firstBad = null;
            double firstExpected = 0;
            foreach (var a in table.Abscissae)
            {
                if (a.PointIndex < 0 || a.PointIndex >= n) continue;
                var xLine = a.XRaw * spec.XFactor;
                var tolerance = 0.5 * Math.Pow(10, -a.Decimals) * spec.XFactor + 0.5 * step + 1e-9 * Math.Abs(x[a.PointIndex]);
                if (Math.Abs(xLine - x[a.PointIndex]) > tolerance)
                {
                    if (bad++ == 0) { firstBad = a; firstExpected = x[a.PointIndex]; }
                }
            }
            if (bad > 0)
                warnings.Add($"line abscissae disagree with FIRSTX, LASTX and NPOINTS on {bad} of {table.Abscissae.Count} lines " +
                    $"(first at line {firstBad!.Value.Line}: {G(firstBad.Value.XRaw * spec.XFactor)} where the axis gives {G(firstExpected)}); " +
                    "the axis was taken from FIRSTX, LASTX and NPOINTS");
            if (spec.DeltaX is { } dx && n > 1)
            {
                var delta = (x[n - 1] - x[0]) / (n - 1);
                if (Math.Abs(dx - delta) > 1e-4 * Math.Abs(delta))
                    warnings.Add($"##DELTAX={G(dx)} disagrees with (LASTX - FIRSTX)/(NPOINTS - 1) = {G(delta)}; the latter was used");
            }
        }

        private void CheckEnds(TableSpec spec, double[] x)
        {
            var tolerance = 1e-6 * Math.Max(Math.Abs(x[0]), Math.Abs(x[^1])) + 1e-12;
            if (spec.FirstX is { } f && Math.Abs(f - x[0]) > tolerance)
                warnings.Add($"##FIRSTX={G(f)} but the first x read is {G(x[0])}; the x values read were used");
            if (spec.LastX is { } l && Math.Abs(l - x[^1]) > tolerance)
                warnings.Add($"##LASTX={G(l)} but the last x read is {G(x[^1])}; the x values read were used");
        }

        // FIRSTY, MINY and MAXY exist to catch a wrong YFACTOR or a misread first value. Writers round
        // them (by up to 0.03 % in the shared samples), so only a disagreement above 0.1 % is reported.
        private void CheckOrdinates(TableSpec spec, double[] y)
        {
            const double relative = 1e-3;
            if (spec.FirstY is { } fy && Math.Abs(fy - y[0]) > relative * Math.Max(Math.Abs(fy), Math.Abs(y[0])))
                warnings.Add($"##FIRSTY={G(fy)} but the first ordinate decodes to {G(y[0])}; the decoded values were used");
            var scale = Math.Max(Math.Abs(spec.MinY ?? 0), Math.Abs(spec.MaxY ?? 0));
            if (spec.MaxY is { } maxY && Math.Abs(y.Max() - maxY) > relative * scale)
                warnings.Add($"##MAXY={G(maxY)} but the largest ordinate decodes to {G(y.Max())}");
            if (spec.MinY is { } minY && Math.Abs(y.Min() - minY) > relative * scale)
                warnings.Add($"##MINY={G(minY)} but the smallest ordinate decodes to {G(y.Min())}");
        }

        private double[] ToPpm(TableSpec spec, double[] x, double? observeMHz)
        {
            if (spec.XUnits == "PPM") return x;
            var sf = observeMHz!.Value;
            var ppm = new double[x.Length];
            var (refIndex, refPpm, how) = Reference(x.Length);
            if (how is null)
            {
                warnings.Add("x is in HZ with no .SHIFT REFERENCE: 0 Hz was taken as 0 ppm");
                for (var i = 0; i < x.Length; i++) ppm[i] = x[i] / sf;
            }
            else
            {
                if (refIndex < 0) refIndex = PointZero(x, sf, refPpm);
                for (var i = 0; i < x.Length; i++) ppm[i] = refPpm + (x[i] - x[refIndex]) / sf;
            }
            for (var i = 0; i < ppm.Length; i++)
                if (!double.IsFinite(ppm[i]))
                    throw new SpectrumFileException(path, spec.Table.Line, "the shift axis overflows; FIRSTX, LASTX or the observe frequency is corrupted");
            return ppm;
        }

        /// <summary>
        /// Some older instruments number the points from 0 in ##.SHIFT REFERENCE=. The standard numbers them from 1, so
        /// point 0 is read as the first point only when FIRSTX (Hz from 0 ppm) puts the first point at the stated shift.
        /// </summary>
        private int PointZero(double[] x, double sf, double shift)
        {
            var r = _header[".SHIFTREFERENCE"];
            var firstPpm = x[0] / sf;
            var pointPpm = x.Length > 1 ? Math.Abs(x[1] - x[0]) / sf : 0;
            if (Math.Abs(firstPpm - shift) > pointPpm + 1e-9 * Math.Abs(shift))
                throw new SpectrumFileException(path, r.Line,
                    $"##.SHIFT REFERENCE={r.Value} names point 0, but points are numbered from 1, and FIRSTX puts the first point at {G(firstPpm)} ppm, " +
                    $"not {G(shift)}: correct the point number (1 for the first point) or FIRSTX");
            warnings.Add($"line {r.Line}: ##.SHIFT REFERENCE= names point 0 (points are numbered from 1); FIRSTX agrees that the first point is at {G(shift)} ppm, so it was read as point 1");
            return 0;
        }

        /// <summary>The point and shift that anchor a Hz axis: ##.SHIFT REFERENCE= (point -1 for a point 0 still to be checked), else a private $OFFSET (ppm of the first point).</summary>
        private (int Index, double Ppm, string? How) Reference(int n)
        {
            if (ShiftReference() is { } r)
            {
                if (r.Point > n)
                    throw new SpectrumFileException(path, r.Line,
                        $"##.SHIFT REFERENCE= names point {r.Point}, outside the trace's points 1 to {n}");
                return (r.Point - 1, r.Ppm, ".SHIFT REFERENCE");
            }
            // $OFFSET, written by some instrument exports, is (from memory of such files) the ppm of the first point.
            if (_header.TryGetValue("$OFFSET", out var o))
                return (0, ParseNumber(o.Value, o), "$OFFSET");
            return (0, 0, null);
        }

        /// <summary>##.SHIFT REFERENCE= as (point number as written, shift in ppm, line), or null when absent.</summary>
        private (int Point, double Ppm, int Line)? ShiftReference()
        {
            if (!_header.TryGetValue(".SHIFTREFERENCE", out var r)) return null;
            // "INTERNAL, CDCl3, 1, 7.26": type, compound, point number (from 1), shift in ppm.
            var parts = r.Value.Trim('(', ')', ' ').Split(',', StringSplitOptions.TrimEntries);
            if (parts.Length < 4
                || !int.TryParse(parts[^2], NumberStyles.Integer, CultureInfo.InvariantCulture, out var point)
                || !double.TryParse(parts[^1], NumberStyles.Float, CultureInfo.InvariantCulture, out var shift)
                || !double.IsFinite(shift))
                throw new SpectrumFileException(path, r.Line,
                    $"##.SHIFT REFERENCE={r.Value}: expected 'INTERNAL or EXTERNAL, compound, point number, shift in ppm', e.g. 'INTERNAL, TMS, 1, 0.0'");
            if (point < 0)
                throw new SpectrumFileException(path, r.Line, $"##.SHIFT REFERENCE= names point {point}; points are numbered from 1");
            return (point, shift, r.Line);
        }

        /// <summary>
        /// For an FID, the shift reference names a point of the spectrum made from it; point 1 is the high-frequency edge of
        /// the spectral window. Another point is placed on a spectrum of as many points as the FID, with a warning.
        /// </summary>
        private double? FidReference(int n, double dwell)
        {
            if (ShiftReference() is not { } r)
            {
                warnings.Add("the FID has no ##.SHIFT REFERENCE=: the ppm axis is relative to the window's centre; set a known line to its shift");
                return null;
            }
            if (r.Point == 0)
            {
                warnings.Add($"line {r.Line}: ##.SHIFT REFERENCE= names point 0 (points are numbered from 1); it was read as point 1, the window's high-frequency edge");
                return r.Ppm;
            }
            if (r.Point == 1) return r.Ppm;
            var observe = ObserveFrequency(required: true)!.Value;
            warnings.Add($"line {r.Line}: ##.SHIFT REFERENCE= names point {r.Point} of the spectrum; it was placed on a spectrum of {n} points (the FID's size)");
            // Point p lies (p - 1) SW / n below the high-frequency edge.
            return r.Ppm + (r.Point - 1) / (dwell * n) / observe;
        }

        /// <summary>The digital-filter delay in points when the file states it (private ##$GRPDLY=, positive), else null.</summary>
        private double? StatedFilterDelay(int n)
        {
            // Some exports keep the filter's group delay as ##$GRPDLY= in points (from memory of such files); -1 means "not used".
            if (!_header.TryGetValue("$GRPDLY", out var r)) return null;
            var d = ParseNumber(r.Value, r);
            return d > 0 && d < n / 2.0 ? d : null;
        }

        private double? ObserveFrequency(bool required)
        {
            if (!_header.TryGetValue(".OBSERVEFREQUENCY", out var r))
            {
                if (required)
                    throw new SpectrumFileException(path, block.Line,
                        "x is in HZ but the block has no ##.OBSERVE FREQUENCY= (MHz), so the ppm axis cannot be computed; add the label");
                warnings.Add("no ##.OBSERVE FREQUENCY=: the trace has no Hz axis");
                return null;
            }
            var mhz = ParseNumber(r.Value, r);
            if (!(mhz > 0))
                throw new SpectrumFileException(path, r.Line, $"##.OBSERVE FREQUENCY={r.Value}: expected a positive frequency in MHz");
            return mhz;
        }

        private string Nucleus()
        {
            if (_header.TryGetValue(".OBSERVENUCLEUS", out var r))
            {
                var nucleus = r.Value.Replace("^", "").Replace(" ", "");
                if (nucleus.Length > 0) return nucleus;
            }
            warnings.Add("no ##.OBSERVE NUCLEUS=: 1H assumed");
            return "1H";
        }

        private string Units(Ldr r)
        {
            var units = r.Value.Trim().ToUpperInvariant();
            if (units is "HZ" or "PPM") return units;
            throw new SpectrumFileException(path, r.Line,
                $"x units are '{r.Value}': SpinSim reads NMR spectra with x in HZ or PPM (a time-domain FID or another kind of spectrum cannot be read as a trace)");
        }

        private Ldr Required(string label) =>
            _header.TryGetValue(label, out var r)
                ? r
                : throw new SpectrumFileException(path, block.Line,
                    $"required label ##{label}= is missing from {block.Describe()}; it is needed to build the axis — add it");

        private double? Number(string label, bool required = false)
        {
            if (!_header.TryGetValue(label, out var r))
            {
                if (!required) return null;
                r = Required(label);
            }
            return ParseNumber(r.Value, r);
        }

        private double Factor(string label)
        {
            if (!_header.TryGetValue(label, out var r))
            {
                warnings.Add($"no ##{label}=; 1 assumed");
                return 1;
            }
            var f = ParseNumber(r.Value, r);
            if (f == 0)
                throw new SpectrumFileException(path, r.Line, $"##{label}=0 would make every value zero; expected the non-zero scale of the integers in the table");
            return f;
        }

        private int? Count(string label, bool required)
        {
            if (!_header.TryGetValue(label, out var r))
            {
                if (required) Required(label);
                return null;
            }
            return ParseCount(r);
        }

        private int ParseCount(Ldr r) => CountFrom(ParseNumber(r.Value, r), r);

        private int CountFrom(double v, Ldr r)
        {
            // Some writers print counts as "16385.000000000".
            if (v != Math.Floor(v) || v < 1 || v > MaxPoints)
                throw new SpectrumFileException(path, r.Line, $"##{r.RawLabel}={r.Value}: expected a whole number of points from 1 to {MaxPoints}");
            return (int)v;
        }

        private double ParseNumber(string value, Ldr r)
        {
            if (double.TryParse(value.AsSpan().Trim(), NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && double.IsFinite(v))
                return v;
            throw new SpectrumFileException(path, r.Line, $"##{r.RawLabel}={value}: expected a number (digits, '.' as decimal point)");
        }

        private double[] Scale(double[] raw, double factor, string axis, int line)
        {
            var scaled = new double[raw.Length];
            for (var i = 0; i < raw.Length; i++)
            {
                scaled[i] = raw[i] * factor;
                if (!double.IsFinite(scaled[i]))
                    throw new SpectrumFileException(path, line, $"a {axis} value times its factor overflows; the factor or the data are corrupted");
            }
            return scaled;
        }

        private IReadOnlyDictionary<string, string> Labels()
        {
            var labels = new Dictionary<string, string>(StringComparer.OrdinalIgnoreCase);
            foreach (var r in block.Records)
                if (r.Label is not ("XYDATA" or "XYPOINTS" or "PEAKTABLE" or "DATATABLE" or "PAGE"))
                    labels.TryAdd(r.RawLabel, r.Value);
            return labels;
        }

        private static Dictionary<string, Ldr> HeaderOf(JcampBlock block, List<string> warnings)
        {
            var header = new Dictionary<string, Ldr>();
            // Instrument exports repeat their private ##$ labels (one per parameter set); one line says so, not one per label.
            var privateRepeats = new List<Ldr>();
            foreach (var r in block.Records)
            {
                if (r.Label == "NTUPLES") break;
                if (header.TryAdd(r.Label, r) || r.Label is "XYDATA" or "XYPOINTS" or "PEAKTABLE") continue;
                if (r.Label.StartsWith('$')) privateRepeats.Add(r);
                else warnings.Add($"line {r.Line}: ##{r.RawLabel}= repeats the label of line {header[r.Label].Line}; the first was used");
            }
            if (privateRepeats.Count > 0)
            {
                var labels = privateRepeats.Select(r => r.Label).Distinct().ToList();
                var first = privateRepeats[0];
                warnings.Add($"{labels.Count} private ##$ label(s) appear more than once ({privateRepeats.Count} repeats, the first ##{first.RawLabel}= at line {first.Line}, " +
                    $"first given at line {header[first.Label].Line}); the first value of each was used: " +
                    string.Join(", ", labels.Take(8)) + (labels.Count > 8 ? ", ..." : ""));
            }
            return header;
        }

        private static string NormaliseForm(string form)
        {
            var sb = new StringBuilder(form.Length);
            foreach (var ch in form)
                if (!char.IsWhiteSpace(ch)) sb.Append(char.ToUpperInvariant(ch));
            return sb.ToString();
        }

        private static string FormsText(AsdfForms forms)
        {
            var parts = new List<string>();
            if (forms.HasFlag(AsdfForms.Sqz) || forms.HasFlag(AsdfForms.Dif) || forms.HasFlag(AsdfForms.Dup) || forms.HasFlag(AsdfForms.Pac))
            {
                if (forms.HasFlag(AsdfForms.Pac)) parts.Add("PAC");
                if (forms.HasFlag(AsdfForms.Sqz)) parts.Add("SQZ");
                if (forms.HasFlag(AsdfForms.Dif)) parts.Add("DIF");
                if (forms.HasFlag(AsdfForms.Dup)) parts.Add("DUP");
            }
            else parts.Add("AFFN");
            return string.Join("+", parts);
        }

        private static string G(double v) => v.ToString("G10", CultureInfo.InvariantCulture);
    }
}
