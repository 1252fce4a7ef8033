namespace SpinSim.Cli;

public static class Program
{
    public static int Main(string[] args)
    {
        // Ctrl+C asks long runs (fits) to stop and keep their best point instead of killing the process.
        using var cancel = new CancellationTokenSource();
        Console.CancelKeyPress += (_, e) =>
        {
            if (cancel.IsCancellationRequested) return; // a second Ctrl+C ends the process
            e.Cancel = true;
            cancel.Cancel();
            Console.Error.WriteLine("stopping: finishing the current step and keeping the best point so far (Ctrl+C again to abort)");
        };
        return SpinSimCli.Run(args, Console.Out, Console.Error, cancel.Token);
    }
}
