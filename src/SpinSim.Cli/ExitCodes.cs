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

    /// <summary>The lines printed at the end of the root help.</summary>
    public static string Help =>
        "Exit codes: 0 success; 1 bad input (the message names the file, the line and the fix; no output is written); " +
        "2 usage error (unknown option, missing argument, a value that is not a number).";
}
