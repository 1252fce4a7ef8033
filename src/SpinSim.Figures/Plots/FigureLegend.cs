using OxyPlot;
using OxyPlot.Legends;

namespace SpinSim.Figures.Plots;

internal static class FigureLegend
{
    /// <summary>A one-row legend above the plot area on the right: outside the plot, so it never covers a peak.</summary>
    public static void AddAbove(PlotModel model, double fontSize)
    {
        model.IsLegendVisible = true;
        model.Legends.Add(new Legend
        {
            LegendPlacement = LegendPlacement.Outside,
            LegendPosition = LegendPosition.TopRight,
            LegendOrientation = LegendOrientation.Horizontal,
            LegendBorderThickness = 0,
            LegendBackground = OxyColors.Undefined,
            LegendFontSize = fontSize,
            LegendTextColor = FigurePalette.Ink,
            LegendSymbolLength = fontSize * 2.5,
            LegendPadding = fontSize * 0.3,
            LegendMargin = fontSize * 0.3,
            LegendItemSpacing = fontSize * 1.5,
        });
    }
}
