using System.CommandLine;
using System.CommandLine.Parsing;
using System.Globalization;

namespace SpinSim.Cli;

/// <summary>
/// Number options that read like SpinSim: a value that is not a number is refused with the option, its placeholder and
/// what it expects, never with a .NET type name. Numbers use the decimal point whatever the machine's culture.
/// </summary>
internal static class OptionValues
{
    /// <summary>Gives every number option under <paramref name="command"/> the readable parser, once, in one place.</summary>
    public static void UseReadableParsers(Command command)
    {
        foreach (var option in command.Options)
        {
            switch (option)
            {
                case Option<double> o: o.CustomParser = r => Parse(r, o, ParseDouble) ?? 0; break;
                case Option<double?> o: o.CustomParser = r => Parse(r, o, ParseDouble); break;
                case Option<int> o: o.CustomParser = r => Parse(r, o, ParseInt) ?? 0; break;
                case Option<int?> o: o.CustomParser = r => Parse(r, o, ParseInt); break;
            }
        }
        foreach (var sub in command.Subcommands) UseReadableParsers(sub);
    }

    private static double? ParseDouble(string text) =>
        double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) ? v : null;

    private static int? ParseInt(string text) =>
        int.TryParse(text, NumberStyles.Integer, CultureInfo.InvariantCulture, out var v) ? v : null;

    private static T? Parse<T>(ArgumentResult result, Option option, Func<string, T?> parse) where T : struct
    {
        if (result.Tokens.Count == 0) return null;
        var text = result.Tokens[^1].Value;
        if (parse(text) is { } value) return value;
        var kind = typeof(T) == typeof(int) ? "a whole number" : "a number";
        var placeholder = string.IsNullOrEmpty(option.HelpName) ? "" : $" <{option.HelpName}>";
        result.AddError($"{option.Name}{placeholder}: \"{text}\" is not {kind} (decimal point, no unit). {option.Description}");
        return null;
    }
}
