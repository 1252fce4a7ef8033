using SkiaSharp;

namespace SpinSim.Figures.Rendering;

/// <summary>
/// The one typeface every figure uses: DejaVu Sans, embedded in this assembly (licence in
/// Fonts/LICENSE-DejaVu.txt and <see cref="LicenceText"/>). Shipping the font makes the text of a
/// figure independent of the machine: the same glyphs and widths everywhere, and text at all on a
/// server that has no fonts installed.
/// </summary>
public static class BundledFont
{
    /// <summary>Family name written into SVG and PDF output.</summary>
    public const string FamilyName = "DejaVu Sans";

    private const string FontResource = "SpinSim.Figures.Fonts.DejaVuSans.ttf";
    private const string LicenceResource = "SpinSim.Figures.Fonts.LICENSE-DejaVu.txt";

    // Loaded once and never disposed: a typeface is immutable and safe to share between threads.
    private static readonly Lazy<SKTypeface> Loaded = new(Load, LazyThreadSafetyMode.ExecutionAndPublication);

    /// <summary>The embedded typeface, loaded from the assembly on first use, never from the system.</summary>
    /// <exception cref="InvalidOperationException">The resource is missing or not a font (a broken build).</exception>
    public static SKTypeface Typeface => Loaded.Value;

    /// <summary>The font's licence text, to show wherever the program lists what it ships.</summary>
    public static string LicenceText
    {
        get
        {
            using var stream = OpenResource(LicenceResource);
            using var reader = new StreamReader(stream);
            return reader.ReadToEnd();
        }
    }

    /// <summary>Advance width of one line of <paramref name="text"/> at <paramref name="fontSize"/>, in the unit of the size.</summary>
    public static double MeasureWidth(string text, double fontSize)
    {
        using var paint = CreatePaint(fontSize, bold: false);
        return paint.MeasureText(text);
    }

    /// <summary>Lines of <paramref name="text"/> broken at spaces so that each is at most <paramref name="width"/> wide (a single long word stays whole).</summary>
    public static IReadOnlyList<string> Wrap(string text, double fontSize, double width)
    {
        var lines = new List<string>();
        var line = "";
        foreach (var word in text.Split(' ', StringSplitOptions.RemoveEmptyEntries))
        {
            var candidate = line.Length == 0 ? word : line + " " + word;
            if (line.Length > 0 && MeasureWidth(candidate, fontSize) > width) { lines.Add(line); line = word; }
            else line = candidate;
        }
        if (line.Length > 0) lines.Add(line);
        return lines;
    }

    /// <summary>Distance between baselines of consecutive lines at <paramref name="fontSize"/>, in the unit of the size.</summary>
    public static double LineHeight(double fontSize)
    {
        using var paint = CreatePaint(fontSize, bold: false);
        return paint.FontSpacing;
    }

    internal static SKPaint CreatePaint(double fontSize, bool bold, SKTypeface? typeface = null) => new()
    {
        Typeface = typeface ?? Typeface,
        TextSize = (float)fontSize,
        IsAntialias = true,
        SubpixelText = true,
        // Only the regular face is shipped; emboldening it is enough for titles and table headers.
        FakeBoldText = bold,
    };

    /// <summary>The font file's bytes, for cutting a subset (<see cref="FontSubset"/>).</summary>
    internal static byte[] FontBytes()
    {
        using var stream = OpenResource(FontResource);
        using var copy = new MemoryStream();
        stream.CopyTo(copy);
        return copy.ToArray();
    }

    private static SKTypeface Load()
    {
        using var stream = OpenResource(FontResource);
        using var data = SKData.Create(stream);
        return SKTypeface.FromData(data)
            ?? throw new InvalidOperationException($"embedded resource {FontResource} is not a font SkiaSharp can read; the build is broken");
    }

    private static Stream OpenResource(string name) =>
        typeof(BundledFont).Assembly.GetManifestResourceStream(name)
        ?? throw new InvalidOperationException($"embedded resource {name} is missing from {typeof(BundledFont).Assembly.GetName().Name}; the build is broken");
}
