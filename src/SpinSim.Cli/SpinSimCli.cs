using System.CommandLine;
using SpinSim.Cli.Commands;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Formats.Output;
using SpinSim.Formats.SpinSystems;

namespace SpinSim.Cli;

/// <summary>
/// The command-line program: parses, calls the library, prints. Exit codes: 0 success, 1 a user error with a
/// message (bad input file, impossible request), 2 a usage error (unknown option, missing argument).
/// </summary>
public static class SpinSimCli
{
    public const int Success = 0;
    public const int UserError = 1;
    public const int UsageError = 2;

    public static int Run(string[] args, TextWriter stdout, TextWriter stderr, CancellationToken cancel = default)
    {
        var root = new RootCommand(
            "SpinSim: exact simulation of first- and second-order 1H NMR spectra from a spin Hamiltonian, " +
            "and least-squares fitting of shifts and couplings to measured spectra.");
        var io = new CommandIo(stdout, stderr, cancel);
        root.Subcommands.Add(CheckCommand.Build(io));
        root.Subcommands.Add(SimulateCommand.Build(io));
        root.Subcommands.Add(InspectCommand.Build(io));
        root.Subcommands.Add(FitCommand.Build(io));
        root.Subcommands.Add(FieldsCommand.Build(io));
        root.Subcommands.Add(TreeCommand.Build(io));
        root.Subcommands.Add(DemoCommand.Build(io));

        var parse = root.Parse(args);
        if (parse.Errors.Count > 0)
        {
            foreach (var error in parse.Errors) stderr.WriteLine($"error: {error.Message}");
            stderr.WriteLine("Run 'spinsim --help' or 'spinsim COMMAND --help' for usage.");
            return UsageError;
        }
        try
        {
            return parse.Invoke(new InvocationConfiguration { Output = stdout, Error = stderr, EnableDefaultExceptionHandler = false });
        }
        catch (Exception e) when (IsUserError(e))
        {
            stderr.WriteLine($"error: {e.Message}");
            return UserError;
        }
        catch (OperationCanceledException)
        {
            stderr.WriteLine("stopped by the user");
            return UserError;
        }
    }

    private static bool IsUserError(Exception e) => e is SpinSystemFileException or SpinSystemException or SystemTooLargeException
        or OutputFileException or UserInputException or SpinSim.Formats.SpectrumFileException or SpinSim.Formats.Fitting.FitSetupException;
}

/// <summary>Where commands write and how they are stopped.</summary>
public sealed record CommandIo(TextWriter Out, TextWriter Error, CancellationToken Cancel);

/// <summary>A request the program cannot carry out, stated for the user (exit code 1).</summary>
public sealed class UserInputException(string message) : Exception(message);
