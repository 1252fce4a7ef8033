using SpinSim.Core.Errors;

namespace SpinSim.Formats.SpinSystems;

/// <summary>A spin-system file (TOML or JSON) that cannot be used: names the file, the line when known, and the fix.</summary>
public sealed class SpinSystemFileException(string path, int? line, string problem, string fix) : InputException(path, line, problem, fix);
