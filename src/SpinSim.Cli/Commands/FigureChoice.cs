using System.CommandLine;
using OxyPlot;
using SpinSim.Figures;
using SpinSim.Formats.Output;

namespace SpinSim.Cli.Commands;

/// <summary>Options for a figure file: path (format by extension), size in mm or pixels, dpi, font size and title.</summary>
public sealed class FigureChoice
{
    public Option<string?> Path { get; } = new("--figure") { Description = "Write a figure: .png, .svg or .pdf (chosen by extension)", HelpName = "FILE" };
    public Option<double?> WidthMm { get; } = new("--width-mm") { Description = "Figure width in mm (default 170)", HelpName = "MM" };
    public Option<double?> HeightMm { get; } = new("--height-mm") { Description = "Figure height in mm (default 110)", HelpName = "MM" };
    public Option<int?> WidthPx { get; } = new("--width-px") { Description = "Figure width in pixels (instead of mm)", HelpName = "PX" };
    public Option<int?> HeightPx { get; } = new("--height-px") { Description = "Figure height in pixels (instead of mm)", HelpName = "PX" };
    public Option<double> Dpi { get; } = new("--dpi") { Description = "Resolution of PNG figures", DefaultValueFactory = _ => 300, HelpName = "DPI" };
    public Option<double> FontSize { get; } = new("--font-size") { Description = "Font size in points", DefaultValueFactory = _ => 9, HelpName = "PT" };
    public Option<string?> Title { get; } = new("--title") { Description = "Title drawn above the figure (default: one naming what it shows)", HelpName = "TEXT" };
    public Option<bool> NoTitle { get; } = new("--no-title") { Description = "Draw no title (a paper's caption says it)" };

    public void AddTo(Command command)
    {
        foreach (var o in new Option[] { Path, WidthMm, HeightMm, WidthPx, HeightPx, Dpi, FontSize, Title, NoTitle }) command.Options.Add(o);
    }

    /// <summary>The figure options, checked (before any work) so that a bad size is refused with nothing written.</summary>
    /// <exception cref="UserInputException">A size, dpi or font size the renderer cannot honour.</exception>
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
            Title = parse.GetValue(NoTitle) ? "" : parse.GetValue(Title) ?? title,
        };
        if (parse.GetValue(NoTitle) && parse.GetValue(Title) is not null)
            throw new UserInputException("give --title TEXT or --no-title, not both");
        if (options.Problem() is { } problem) throw new UserInputException("figure size", problem);
        return options;
    }

    /// <summary>The format a figure path names by its extension.</summary>
    /// <exception cref="UserInputException">An extension that is not .png, .svg or .pdf.</exception>
    public static FigureFormat FormatOf(string path) =>
        FigureRenderer.TryFromExtension(path, out var format, out var problem) ? format : throw new UserInputException(path, problem);

    /// <summary>Renders <paramref name="model"/> into the staged output <paramref name="path"/>.</summary>
    public static void Write(StagedOutputs outputs, string path, PlotModel model, FigureOptions options) =>
        outputs.AddBytes(path, s => FigureRenderer.Render(model, FormatOf(path), options, s));

    /// <summary>Renders <paramref name="model"/> to <paramref name="path"/> through a temporary file.</summary>
    public static void Write(string path, PlotModel model, FigureOptions options, IEnumerable<string> inputs)
    {
        using var outputs = new StagedOutputs(inputs);
        Write(outputs, path, model, options);
        outputs.Commit();
    }
}
