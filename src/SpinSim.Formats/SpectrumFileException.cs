using SpinSim.Core.Errors;

namespace SpinSim.Formats;

/// <summary>
/// The one error a spectrum file reader throws: the file could not be read as a trace. The problem says what was
/// expected and how to fix the file; the message starts with the file and line.
/// </summary>
public sealed class SpectrumFileException(string filePath, int? line, string problem, Exception? inner = null)
    : InputException(filePath, line, problem, null, inner);
