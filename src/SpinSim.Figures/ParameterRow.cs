namespace SpinSim.Figures;

/// <summary>
/// One fitted parameter as shown to a reader: name, value and standard error already formatted (the caller
/// knows the sensible digits), and the unit ("ppm", "Hz", or empty).
/// </summary>
public sealed record ParameterRow(string Name, string Value, string StdError, string Unit);
