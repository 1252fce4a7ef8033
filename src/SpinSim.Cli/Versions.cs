using System.Reflection;

namespace SpinSim.Cli;

public static class Versions
{
    public static string Current { get; } =
        typeof(Versions).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion.Split('+')[0] ?? "0.0.0";
}
