namespace SpinSim.Cli;

/// <summary>
/// The exit codes of <c>spinsim</c>, listed in the root <c>--help</c>. Codes are never reused for another meaning;
/// new ones are added here and to <see cref="Help"/>.
/// </summary>
public static class ExitCodes
{
    /// <summary>The command did what was asked.</summary>
    public const int Success = 0;

    /// <summary>Bad input: a file, value or request SpinSim refuses, with a message naming file, line and fix. Nothing was written.</summary>
    public const int InputError = 1;

    /// <summary>Usage error: unknown command or option, missing argument, a value that does not parse.</summary>
    public const int UsageError = 2;

    /// <summary>A fit ran to its end but did not converge: its results are written, but they are not an optimum.</summary>
    public const int FitNotConverged = 3;

    /// <summary>Stopped with Ctrl+C (128 + SIGINT, as shells report it); a fit keeps and writes its best point so far.</summary>
    public const int Interrupted = 130;

    /// <summary>The lines printed at the end of the root help.</summary>
    public static string Help =>
        "Exit codes: 0 success; 1 bad input (the message names the file, the line and the fix; no output is written); " +
        "2 usage error (unknown option, missing argument, a value that is not a number); " +
        "3 a fit that did not converge (results written, but not an optimum); 130 stopped with Ctrl+C (a fit keeps its best point).";
}
