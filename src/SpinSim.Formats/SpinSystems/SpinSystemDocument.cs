using SpinSim.Core.Model;
using SpinSim.Core.Units;

namespace SpinSim.Formats.SpinSystems;

/// <summary>What a spin-system file holds: the system, the default linewidth and where things were written.</summary>
/// <param name="DefaultWidth">Global FWHM for lines whose nuclei state no width of their own, when the file gives one.</param>
/// <param name="Fit">The optional [fit] section, as read (interpreted by the fitting setup reader).</param>
public sealed record SpinSystemDocument(
    string Path,
    SpinSystem System,
    WidthHz? DefaultWidth,
    IReadOnlyList<string> Warnings,
    FitSection? Fit = null);

/// <summary>The raw [fit] section of a spin-system or fit file: key/value pairs with their line numbers.</summary>
public sealed record FitSection(string Path, IReadOnlyList<FitEntry> Entries);

/// <summary>One value of a [fit] section. Value is a double, long, string, bool, or an object[] of those.</summary>
public sealed record FitEntry(string Table, string Key, object Value, int Line);
