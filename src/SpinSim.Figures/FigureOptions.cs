namespace SpinSim.Figures;

/// <summary>
/// Size, resolution, text size and title of a figure. Give the size either in millimetres
/// (<see cref="WidthMm"/> and <see cref="HeightMm"/>) or in pixels (<see cref="WidthPx"/> and
/// <see cref="HeightPx"/>), or neither for <see cref="DefaultWidthMm"/> x <see cref="DefaultHeightMm"/>.
/// Pixels are pixels at <see cref="Dpi"/>, so 1200 px at 300 dpi is a 4 inch (101.6 mm) figure in every format.
/// </summary>
public sealed record FigureOptions
{
    /// <summary>Two-column journal width, the common case for a spectrum with a table beside it.</summary>
    public const double DefaultWidthMm = 170;
    public const double DefaultHeightMm = 110;

    public const double MinDpi = 30, MaxDpi = 2400;
    public const double MinFontSizePt = 4, MaxFontSizePt = 48;

    // A bitmap this large already takes about 1.6 GB; beyond it a caller has made a unit mistake.
    public const int MaxPixels = 20000;

    private const double MillimetresPerInch = 25.4;

    /// <summary>Options with every default: 170 x 110 mm, 300 dpi, 9 pt text, no title.</summary>
    public static FigureOptions Default { get; } = new();

    /// <summary>Width in millimetres, with <see cref="HeightMm"/>.</summary>
    public double? WidthMm { get; init; }

    /// <summary>Height in millimetres, with <see cref="WidthMm"/>.</summary>
    public double? HeightMm { get; init; }

    /// <summary>Width in pixels at <see cref="Dpi"/>, with <see cref="HeightPx"/>.</summary>
    public int? WidthPx { get; init; }

    /// <summary>Height in pixels at <see cref="Dpi"/>, with <see cref="WidthPx"/>.</summary>
    public int? HeightPx { get; init; }

    /// <summary>Dots per inch of PNG output (recorded in the file) and of pixel sizes; 300 by default.</summary>
    public double Dpi { get; init; } = 300;

    /// <summary>Size of ordinary text in points (1/72 inch); titles are drawn somewhat larger.</summary>
    public double FontSizePt { get; init; } = 9;

    /// <summary>Title drawn above the plot; null for the figure's own default, empty for none.</summary>
    public string? Title { get; init; }

    /// <summary>The physical size and pixel size these options describe.</summary>
    /// <exception cref="ArgumentException">A size given half in mm and half in pixels, a missing half of a pair, or a value out of range.</exception>
    public FigureSize Resolve()
    {
        var (size, problem) = Evaluate();
        return problem is null ? size : throw new ArgumentException(problem);
    }

    /// <summary>What is wrong with these options, in words for the user, or null when they describe a figure.</summary>
    public string? Problem() => Evaluate().Problem;

    private (FigureSize Size, string? Problem) Evaluate()
    {
        if (!(double.IsFinite(Dpi) && Dpi >= MinDpi && Dpi <= MaxDpi))
            return (default, $"the resolution must lie between {MinDpi} and {MaxDpi} dpi, got {Dpi}");
        if (!(double.IsFinite(FontSizePt) && FontSizePt >= MinFontSizePt && FontSizePt <= MaxFontSizePt))
            return (default, $"the font size must lie between {MinFontSizePt} and {MaxFontSizePt} points, got {FontSizePt}");

        var hasMm = WidthMm is not null || HeightMm is not null;
        var hasPx = WidthPx is not null || HeightPx is not null;
        if (hasMm && hasPx)
            return (default, "give the figure size either in millimetres (width and height in mm) or in pixels, not both");

        double widthIn, heightIn;
        if (hasPx)
        {
            if (WidthPx is not { } w || HeightPx is not { } h)
                return (default, "give both the width and the height in pixels, or neither");
            if (w < 1 || h < 1 || w > MaxPixels || h > MaxPixels)
                return (default, $"pixel sizes must lie between 1 and {MaxPixels}, got {w} x {h}");
            widthIn = w / Dpi;
            heightIn = h / Dpi;
        }
        else
        {
            if (hasMm && (WidthMm is null || HeightMm is null))
                return (default, "give both the width and the height in mm, or neither");
            var wmm = WidthMm ?? DefaultWidthMm;
            var hmm = HeightMm ?? DefaultHeightMm;
            if (!(double.IsFinite(wmm) && wmm > 0 && double.IsFinite(hmm) && hmm > 0))
                return (default, $"sizes in millimetres must be positive, got {wmm} x {hmm}");
            widthIn = wmm / MillimetresPerInch;
            heightIn = hmm / MillimetresPerInch;
        }

        var size = new FigureSize(widthIn, heightIn, Dpi);
        if (size.WidthPx > MaxPixels || size.HeightPx > MaxPixels)
            return (default, $"{size.WidthPx} x {size.HeightPx} pixels at {Dpi} dpi exceeds {MaxPixels} pixels a side; lower the dpi or the size");
        return (size, null);
    }
}

/// <summary>A figure's physical size in inches and the pixel raster it gets at <see cref="Dpi"/>.</summary>
public readonly record struct FigureSize(double WidthInches, double HeightInches, double Dpi)
{
    /// <summary>OxyPlot lays out in device-independent units of 1/96 inch.</summary>
    public const double UnitsPerInch = 96;

    public int WidthPx => (int)Math.Round(WidthInches * Dpi);
    public int HeightPx => (int)Math.Round(HeightInches * Dpi);

    /// <summary>Width in OxyPlot's layout units (1/96 inch).</summary>
    public double WidthUnits => WidthInches * UnitsPerInch;

    /// <summary>Height in OxyPlot's layout units (1/96 inch).</summary>
    public double HeightUnits => HeightInches * UnitsPerInch;

    public double WidthMm => WidthInches * 25.4;
    public double HeightMm => HeightInches * 25.4;
}
