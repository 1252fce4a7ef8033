using System.CommandLine;
using SpinSim.Cli.Commands;
using SpinSim.Core.Errors;

namespace SpinSim.Cli;

/// <summary>
/// The command-line program: parses, calls the library, prints. Results go to stdout; status, progress, warnings and
/// errors to stderr. <see cref="ExitCodes"/> lists what the exit code means.
/// </summary>
public static class SpinSimCli
{
    public static int Run(string[] args, TextWriter stdout, TextWriter stderr, CancellationToken cancel = default)
    {
        var root = new RootCommand(
            "SpinSim: exact simulation of first- and second-order 1H NMR spectra from a spin Hamiltonian, " +
            "and least-squares fitting of shifts and couplings to measured spectra. " + ExitCodes.Help);
        var io = new CommandIo(stdout, stderr, cancel);
        root.Options.Add(io.VerboseOption);
        root.Options.Add(io.QuietOption);
        root.Subcommands.Add(CheckCommand.Build(io));
        root.Subcommands.Add(SimulateCommand.Build(io));
        root.Subcommands.Add(InspectCommand.Build(io));
        root.Subcommands.Add(FitCommand.Build(io));
        root.Subcommands.Add(FieldsCommand.Build(io));
        root.Subcommands.Add(TreeCommand.Build(io));
        root.Subcommands.Add(DemoCommand.Build(io));
        OptionValues.UseReadableParsers(root);

        // No arguments: the help, as for --help (exit code 0).
        var parse = root.Parse(args.Length == 0 ? ["--help"] : args);
        if (parse.Errors.Count > 0)
        {
            foreach (var error in parse.Errors) stderr.WriteLine($"error: {error.Message}");
            stderr.WriteLine("Run 'spinsim --help' or 'spinsim COMMAND --help' for usage.");
            return ExitCodes.UsageError;
        }
        try
        {
            io.ReadVerbosity(parse);
            return parse.Invoke(new InvocationConfiguration { Output = stdout, Error = stderr, EnableDefaultExceptionHandler = false });
        }
        catch (InputException e)
        {
            stderr.WriteLine($"error: {e.Message}");
            return ExitCodes.InputError;
        }
        catch (OperationCanceledException)
        {
            stderr.WriteLine("stopped by the user");
            return ExitCodes.Interrupted;
        }
    }
}

/// <summary>A request the program cannot carry out, stated for the user (exit code 1).</summary>
/// <param name="where">The option or file the problem is in, for example "--field".</param>
public sealed class UserInputException(string? where, string problem, string? fix = null) : InputException(where, null, problem, fix)
{
    public UserInputException(string message) : this(null, message) { }
}
