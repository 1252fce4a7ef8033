using OxyPlot;

namespace SpinSim.Figures;

/// <summary>
/// Colours of all figures, and the line styles that keep series apart in black and white.
/// Colours: the Okabe-Ito palette (Okabe and Ito, "Color Universal Design", 2008, https://jfly.uni-koeln.de/color/).
/// </summary>
public static class FigurePalette
{
    public static OxyColor Black { get; } = OxyColor.FromRgb(0x00, 0x00, 0x00);
    public static OxyColor Orange { get; } = OxyColor.FromRgb(0xE6, 0x9F, 0x00);
    public static OxyColor SkyBlue { get; } = OxyColor.FromRgb(0x56, 0xB4, 0xE9);
    public static OxyColor BluishGreen { get; } = OxyColor.FromRgb(0x00, 0x9E, 0x73);
    public static OxyColor Yellow { get; } = OxyColor.FromRgb(0xF0, 0xE4, 0x42);
    public static OxyColor Blue { get; } = OxyColor.FromRgb(0x00, 0x72, 0xB2);
    public static OxyColor Vermillion { get; } = OxyColor.FromRgb(0xD5, 0x5E, 0x00);
    public static OxyColor ReddishPurple { get; } = OxyColor.FromRgb(0xCC, 0x79, 0xA7);

    /// <summary>A simulated spectrum.</summary>
    public static OxyColor Simulated => Blue;

    /// <summary>Transition sticks, drawn thinner than the trace so they differ in grey print too.</summary>
    public static OxyColor Sticks => Vermillion;

    /// <summary>A measured spectrum: black and solid, the reference the eye compares against.</summary>
    public static OxyColor Measured => Black;

    /// <summary>A fitted spectrum: dashed over the measured one, so both stay visible where they agree.</summary>
    public static OxyColor Fitted => Vermillion;
    public static LineStyle FittedStyle => LineStyle.Dash;

    public static OxyColor Residual => Blue;

    /// <summary>Text, axes and table rules.</summary>
    public static OxyColor Ink => Black;

    /// <summary>Zero lines and other guides that should recede.</summary>
    public static OxyColor Guide { get; } = OxyColor.FromRgb(0x99, 0x99, 0x99);

    /// <summary>Shading of excluded ranges: light enough that the trace over it stays black.</summary>
    public static OxyColor Excluded { get; } = OxyColor.FromRgb(0xE4, 0xE4, 0xE4);

    /// <summary>
    /// Colours for several traces in one figure, in order; yellow is left out because it vanishes on white.
    /// Stacked traces are told apart by position and label, so colour is a help, not the only cue.
    /// </summary>
    public static IReadOnlyList<OxyColor> Sequence { get; } = [Blue, Vermillion, BluishGreen, ReddishPurple, Black, Orange, SkyBlue];

    /// <summary>Line styles for several traces, in the same order as <see cref="Sequence"/>, so they differ in grey print too.</summary>
    public static IReadOnlyList<LineStyle> StyleSequence { get; } = [LineStyle.Solid, LineStyle.Dash, LineStyle.Dot, LineStyle.DashDot, LineStyle.LongDash, LineStyle.DashDashDot, LineStyle.LongDashDot];
}
