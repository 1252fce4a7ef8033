namespace SpinSim.Formats;

/// <summary>
/// The one error a spectrum file reader throws: the file could not be read as a trace. The message
/// says what was expected and how to fix the file; <see cref="Message"/> starts with the file and line.
/// </summary>
public sealed class SpectrumFileException : Exception
{
    public SpectrumFileException(string filePath, int? line, string problem, Exception? inner = null)
        : base(Compose(filePath, line, problem), inner)
    {
        FilePath = filePath;
        Line = line;
        Problem = problem;
    }

    /// <summary>The path or source name given to the reader.</summary>
    public string FilePath { get; }

    /// <summary>1-based line number of the defect, or null when it concerns the file as a whole.</summary>
    public int? Line { get; }

    /// <summary>The message without the file and line prefix.</summary>
    public string Problem { get; }

    private static string Compose(string filePath, int? line, string problem) =>
        line is { } n ? $"{filePath}, line {n}: {problem}" : $"{filePath}: {problem}";
}
