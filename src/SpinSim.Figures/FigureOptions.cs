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
        if (!(double.IsFinite(Dpi) && Dpi >= MinDpi && Dpi <= MaxDpi))
            throw new ArgumentException($"Dpi must lie between {MinDpi} and {MaxDpi}, got {Dpi}", nameof(Dpi));
        if (!(double.IsFinite(FontSizePt) && FontSizePt >= MinFontSizePt && FontSizePt <= MaxFontSizePt))
            throw new ArgumentException($"FontSizePt must lie between {MinFontSizePt} and {MaxFontSizePt} points, got {FontSizePt}", nameof(FontSizePt));

        var hasMm = WidthMm is not null || HeightMm is not null;
        var hasPx = WidthPx is not null || HeightPx is not null;
        if (hasMm && hasPx)
            throw new ArgumentException("give the figure size either in millimetres (WidthMm, HeightMm) or in pixels (WidthPx, HeightPx), not both");

        double widthIn, heightIn;
        if (hasPx)
        {
            if (WidthPx is not { } w || HeightPx is not { } h)
                throw new ArgumentException("give both WidthPx and HeightPx, or neither");
            if (w < 1 || h < 1 || w > MaxPixels || h > MaxPixels)
                throw new ArgumentException($"pixel sizes must lie between 1 and {MaxPixels}, got {w} x {h}");
            widthIn = w / Dpi;
            heightIn = h / Dpi;
        }
        else
        {
            if (hasMm && (WidthMm is null || HeightMm is null))
                throw new ArgumentException("give both WidthMm and HeightMm, or neither");
            var wmm = WidthMm ?? DefaultWidthMm;
            var hmm = HeightMm ?? DefaultHeightMm;
            if (!(double.IsFinite(wmm) && wmm > 0 && double.IsFinite(hmm) && hmm > 0))
                throw new ArgumentException($"sizes in millimetres must be positive, got {wmm} x {hmm}");
            widthIn = wmm / MillimetresPerInch;
            heightIn = hmm / MillimetresPerInch;
        }

        var size = new FigureSize(widthIn, heightIn, Dpi);
        if (size.WidthPx > MaxPixels || size.HeightPx > MaxPixels)
            throw new ArgumentException($"{size.WidthPx} x {size.HeightPx} pixels at {Dpi} dpi exceeds {MaxPixels} pixels a side; lower Dpi or the size");
        return size;
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
