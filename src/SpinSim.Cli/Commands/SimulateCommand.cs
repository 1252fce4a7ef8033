using System.CommandLine;
using SpinSim.Core.Engine;
using SpinSim.Core.Units;
using SpinSim.Formats.Lines;
using SpinSim.Formats.Output;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli.Commands;

/// <summary><c>spinsim simulate SYSTEM</c>: the exact line list and, on request, the spectrum trace.</summary>
public static class SimulateCommand
{
    public static Command Build(CommandIo io)
    {
        var file = new Argument<string>("system") { Description = "Spin-system file (.toml or .json)" };
        var field = new Option<double?>("--field") { Description = "Spectrometer 1H frequency in MHz; overrides the file's field" };
        var lines = new Option<string?>("--lines") { Description = "Write the transition table (frequency_hz, shift_ppm, intensity, origin) to this CSV file" };
        var verbose = new Option<bool>("--verbose", "-v") { Description = "Say which linear-algebra backend ran and what it cost" };
        var command = new Command("simulate", "Simulate the spectrum of a spin system at a field: exact transitions, trace and integrals")
        {
            file, field, lines, verbose,
        };
        command.SetAction(parse =>
        {
            var path = parse.GetValue(file)!;
            var document = SpinSystemFiles.Read(path);
            var system = document.System;
            if (parse.GetValue(field) is { } mhz)
            {
                if (!double.IsFinite(mhz) || mhz <= 0) throw new UserInputException($"--field must be above 0 MHz, got {mhz}");
                system = system.WithField(new FieldMHz(mhz));
            }
            foreach (var w in document.Warnings) io.Error.WriteLine($"warning: {w}");

            var started = System.Diagnostics.Stopwatch.StartNew();
            var result = SpectrumEngine.Compute(system, cancel: io.Cancel);
            var elapsed = started.Elapsed;

            io.Out.WriteLine($"{system.Title} at {system.Field.Value:0.###} MHz: {result.Lines.Count} lines, " +
                             $"total intensity {result.TotalIntensity:G8} (expected {result.ExpectedTotalIntensity:G8})");
            if (parse.GetValue(verbose))
            {
                io.Out.WriteLine($"backend: {result.Backend}");
                io.Out.WriteLine($"blocks: {result.Blocks}, largest {result.LargestBlock} states; {elapsed.TotalMilliseconds:0} ms");
                io.Out.WriteLine($"dropped intensity below the floor: {result.DroppedIntensity:G3}");
            }
            if (parse.GetValue(lines) is { } linesPath)
            {
                AtomicFile.Write(linesPath, w => LineListCsv.Write(w, result, system), [path]);
                io.Out.WriteLine($"lines written to {linesPath}");
            }
            return 0;
        });
        return command;
    }
}
