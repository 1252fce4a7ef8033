namespace SpinSim.Formats.SpinSystems;

/// <summary>A spin-system file (TOML or JSON) that cannot be used: names the file, the line when known, and the fix.</summary>
public sealed class SpinSystemFileException(string path, int? line, string problem, string fix)
    : Exception($"{path}{(line is { } l ? $":{l}" : "")}: {problem}. {fix}")
{
    public string FilePath { get; } = path;

    /// <summary>1-based line number, when known.</summary>
    public int? Line { get; } = line;

    public string Problem { get; } = problem;
    public string Fix { get; } = fix;
}
