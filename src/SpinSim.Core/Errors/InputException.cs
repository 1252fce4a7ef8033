namespace SpinSim.Core.Errors;

/// <summary>
/// The one base type of every refusal that the user can act on: a file that cannot be used, an option out of range, a
/// system the engine cannot honour. It carries where the problem sits (file and 1-based line, when known), what is wrong
/// and how to fix it. Programs map this type, and only this type, to "bad input" (the command line to exit code 1);
/// any other exception is a defect of SpinSim.
/// </summary>
/// <remarks>
/// The message reads <c>FILE, line N: PROBLEM. FIX</c>, with the parts that are not known left out.
/// </remarks>
public class InputException : Exception
{
    public InputException(string? filePath, int? line, string problem, string? fix = null, Exception? inner = null)
        : base(Compose(filePath, line, problem, fix), inner)
    {
        FilePath = filePath;
        Line = line;
        Problem = problem;
        Fix = fix;
    }

    /// <summary>The input file (or the option, for a command-line value) the problem is in; null when it concerns no one file.</summary>
    public string? FilePath { get; }

    /// <summary>1-based line number of the defect, or null when it concerns the file as a whole or is not known.</summary>
    public int? Line { get; }

    /// <summary>What is wrong, without the file and line prefix.</summary>
    public string Problem { get; }

    /// <summary>What to do about it, when there is more to say than the problem itself.</summary>
    public string? Fix { get; }

    /// <summary><c>FILE, line N: PROBLEM. FIX</c> with the unknown parts left out.</summary>
    public static string Compose(string? filePath, int? line, string problem, string? fix)
    {
        var where = (filePath, line) switch
        {
            (null, null) => "",
            (null, { } n) => $"line {n}: ",
            ({ } f, null) => $"{f}: ",
            ({ } f, { } n) => $"{f}, line {n}: ",
        };
        var text = where + problem;
        if (string.IsNullOrWhiteSpace(fix)) return text;
        return text.TrimEnd().EndsWith('.') ? $"{text} {fix}" : $"{text}. {fix}";
    }
}
