using System.CommandLine;
using SpinSim.Core.Model;
using SpinSim.Core.Units;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli.Commands;

/// <summary>
/// The one way a command reads its spin system: the file, the optional --field that overrides its field, and the
/// plausibility warnings of the system that will actually be used, on stderr, each naming the file and line (or the option).
/// </summary>
public static class SystemInput
{
    public static Argument<string> FileArgument(string description = "Spin-system file (.toml or .json)") =>
        new("system") { Description = description, HelpName = "FILE" };

    public static Option<double?> FieldOption() =>
        new("--field") { Description = "Spectrometer 1H frequency in MHz; overrides the file's field", HelpName = "MHZ" };

    /// <summary>Reads the system, applies the field override, prints the warnings.</summary>
    /// <exception cref="SpinSim.Core.Errors.InputException">The file cannot be used, or the field is refused.</exception>
    public static (SpinSystemDocument Document, SpinSystem System) Load(CommandIo io, string path, double? fieldMHz = null)
    {
        var document = SpinSystemFiles.Read(path);
        var system = document.System;
        if (fieldMHz is { } mhz)
        {
            var problem = SpinSystemRules.Check(new FieldMHz(mhz), system.Nuclei, system.Couplings).FirstOrDefault(p => p.Site == ProblemSite.Field);
            if (problem is not null) throw new UserInputException("--field", problem.Message, problem.Fix.Replace("field_mhz = ", "--field "));
            system = system.WithField(new FieldMHz(mhz));
        }
        foreach (var w in system.Warnings)
            io.Warn(fieldMHz is not null && w.Site == ProblemSite.Field
                ? SpinSim.Core.Errors.InputException.Compose("--field", null, w.Message, w.Fix)
                : document.Describe([w])[0]);
        return (document, system);
    }
}
