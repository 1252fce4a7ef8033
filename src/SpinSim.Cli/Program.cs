namespace SpinSim.Cli;

public static class Program
{
    public static int Main(string[] args) => SpinSimCli.Run(args, Console.Out, Console.Error);
}
