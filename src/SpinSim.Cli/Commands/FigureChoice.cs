using System.CommandLine;
using OxyPlot;
using SpinSim.Figures;
using SpinSim.Formats.Output;

namespace SpinSim.Cli.Commands;

/// <summary>Options for a figure file: path (format by extension), size in mm or pixels, dpi and font size.</summary>
public sealed class FigureChoice
{
    public Option<string?> Path { get; } = new("--figure") { Description = "Write a figure: .png, .svg or .pdf (chosen by extension)" };
    public Option<double?> WidthMm { get; } = new("--width-mm") { Description = "Figure width in mm (default 170)" };
    public Option<double?> HeightMm { get; } = new("--height-mm") { Description = "Figure height in mm (default 110)" };
    public Option<int?> WidthPx { get; } = new("--width-px") { Description = "Figure width in pixels (instead of mm)" };
    public Option<int?> HeightPx { get; } = new("--height-px") { Description = "Figure height in pixels (instead of mm)" };
    public Option<double> Dpi { get; } = new("--dpi") { Description = "Resolution of PNG figures", DefaultValueFactory = _ => 300 };
    public Option<double> FontSize { get; } = new("--font-size") { Description = "Font size in points", DefaultValueFactory = _ => 9 };

    public void AddTo(Command command)
    {
        foreach (var o in new Option[] { Path, WidthMm, HeightMm, WidthPx, HeightPx, Dpi, FontSize }) command.Options.Add(o);
    }

    public FigureOptions Options(ParseResult parse, string? title = null)
    {
        var options = new FigureOptions
        {
            WidthMm = parse.GetValue(WidthMm),
            HeightMm = parse.GetValue(HeightMm),
            WidthPx = parse.GetValue(WidthPx),
            HeightPx = parse.GetValue(HeightPx),
            Dpi = parse.GetValue(Dpi),
            FontSizePt = parse.GetValue(FontSize),
            Title = title,
        };
        try { options.Resolve(); }
        catch (ArgumentException e) { throw new UserInputException($"figure size: {e.Message}"); }
        return options;
    }

    /// <summary>Renders <paramref name="model"/> to <paramref name="path"/> through a temporary file.</summary>
    public static void Write(string path, PlotModel model, FigureOptions options, IEnumerable<string> inputs)
    {
        FigureFormat format;
        try { format = FigureRenderer.FromExtension(path); }
        catch (ArgumentException e) { throw new UserInputException($"{path}: {e.Message}"); }
        AtomicFile.WriteBytes(path, s => FigureRenderer.Render(model, format, options, s), inputs);
    }
}
