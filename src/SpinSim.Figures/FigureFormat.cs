namespace SpinSim.Figures;

/// <summary>Output formats of a figure: a bitmap for slides and quick looks, and two vector formats for print.</summary>
public enum FigureFormat
{
    Png,
    Svg,
    Pdf,
}
