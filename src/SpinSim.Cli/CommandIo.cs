using System.CommandLine;

namespace SpinSim.Cli;

/// <summary>How much a command says on stderr besides its results, warnings and errors.</summary>
public enum Verbosity { Quiet, Normal, Verbose }

/// <summary>
/// Where commands write and how they are stopped. Every command follows one convention: results on <see cref="Out"/>;
/// on <see cref="Error"/> the warnings and errors always, status and progress lines unless -q, details (backend,
/// timings, how a system was split) only with -v.
/// </summary>
public sealed class CommandIo(TextWriter output, TextWriter error, CancellationToken cancel)
{
    /// <summary>-v, on every command.</summary>
    public Option<bool> VerboseOption { get; } = new("--verbose", "-v")
    {
        Description = "Also print details on stderr: which linear-algebra backend ran, how a system was split, what it cost",
        Recursive = true,
    };

    /// <summary>-q, on every command.</summary>
    public Option<bool> QuietOption { get; } = new("--quiet", "-q")
    {
        Description = "Print no status or progress lines on stderr (results, warnings and errors still)",
        Recursive = true,
    };

    public TextWriter Out { get; } = output;
    public TextWriter Error { get; } = error;
    public CancellationToken Cancel { get; } = cancel;
    public Verbosity Verbosity { get; private set; } = Verbosity.Normal;

    internal void ReadVerbosity(ParseResult parse)
    {
        var (verbose, quiet) = (parse.GetValue(VerboseOption), parse.GetValue(QuietOption));
        if (verbose && quiet) throw new UserInputException("-v and -q", "exclude each other", "Give one of them");
        Verbosity = verbose ? Verbosity.Verbose : quiet ? Verbosity.Quiet : Verbosity.Normal;
    }

    /// <summary>A warning: always printed, prefixed "warning: ".</summary>
    public void Warn(string text) => Error.WriteLine($"warning: {text}");

    /// <summary>A status line (an output written, a step done): on stderr unless -q.</summary>
    public void Status(string text)
    {
        if (Verbosity != Verbosity.Quiet) Error.WriteLine(text);
    }

    /// <summary>A detail: on stderr only with -v.</summary>
    public void Detail(string text)
    {
        if (Verbosity == Verbosity.Verbose) Error.WriteLine(text);
    }
}
