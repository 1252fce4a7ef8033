using System.CommandLine;
using SpinSim.Formats.Delimited;

namespace SpinSim.Cli.Commands;

/// <summary>Options that say how to read a delimited-text spectrum and how to process an FID; shared by every command that reads measured data.</summary>
public sealed class DataFileOptions
{
    public Option<string> Separator { get; } = new("--separator")
    {
        Description = "Column separator of a text file: auto, comma, semicolon, tab or space",
        DefaultValueFactory = _ => "auto",
        HelpName = "SEP",
    };

    public Option<bool> DecimalComma { get; } = new("--decimal-comma") { Description = "Numbers in the text file use a decimal comma (1,25)" };
    public Option<string?> XColumn { get; } = new("--x-column") { Description = "Shift column of a text file, by header name or 0-based index (default 0)", HelpName = "COLUMN" };
    public Option<string?> YColumn { get; } = new("--y-column") { Description = "Intensity column of a text file, by header name or 0-based index (default 1)", HelpName = "COLUMN" };
    public Option<string?> XUnit { get; } = new("--x-unit") { Description = "Unit of the text file's shift column: ppm or hz (default: hz when its header names Hz, else ppm)", HelpName = "UNIT" };
    public Option<double?> ObserveMHz { get; } = new("--observe-mhz") { Description = "Observe frequency in MHz for a text file (needed with --x-unit hz)", HelpName = "MHZ" };

    /// <summary>FID processing and re-referencing.</summary>
    public ProcessingChoice Processing { get; } = new();

    public void AddTo(Command command)
    {
        Processing.AddTo(command);
        command.Options.Add(Separator);
        command.Options.Add(DecimalComma);
        command.Options.Add(XColumn);
        command.Options.Add(YColumn);
        command.Options.Add(XUnit);
        command.Options.Add(ObserveMHz);
    }

    public DelimitedOptions Read(ParseResult parse)
    {
        var options = new DelimitedOptions
        {
            Separator = parse.GetValue(Separator)!.ToLowerInvariant() switch
            {
                "auto" => ColumnSeparator.Auto,
                "comma" or "," => ColumnSeparator.Comma,
                "semicolon" or ";" => ColumnSeparator.Semicolon,
                "tab" => ColumnSeparator.Tab,
                "space" or "whitespace" => ColumnSeparator.Whitespace,
                var s => throw new UserInputException("--separator", $"\"{s}\" is not known", "Use auto, comma, semicolon, tab or space"),
            },
            DecimalMark = parse.GetValue(DecimalComma) ? DecimalMark.Comma : DecimalMark.Point,
            XUnit = parse.GetValue(XUnit)?.ToLowerInvariant() switch
            {
                null => null,
                "ppm" => DelimitedXUnit.Ppm,
                "hz" => DelimitedXUnit.Hz,
                var u => throw new UserInputException("--x-unit", $"\"{u}\" is not known", "Use ppm or hz"),
            },
            ObserveMHz = parse.GetValue(ObserveMHz),
        };
        options = Column(parse.GetValue(XColumn), options, (o, i) => o with { XColumnIndex = i }, (o, n) => o with { XColumnName = n });
        return Column(parse.GetValue(YColumn), options, (o, i) => o with { YColumnIndex = i }, (o, n) => o with { YColumnName = n });
    }

    private static DelimitedOptions Column(string? value, DelimitedOptions o, Func<DelimitedOptions, int, DelimitedOptions> byIndex,
        Func<DelimitedOptions, string, DelimitedOptions> byName) =>
        value is null ? o : int.TryParse(value, out var i) ? byIndex(o, i) : byName(o, value);
}
