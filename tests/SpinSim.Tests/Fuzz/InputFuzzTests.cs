using System.Text;
using Xunit.Abstractions;

namespace SpinSim.Tests.Fuzz;

/// <summary>
/// The in-suite fuzz run: seeded, about 2,000 mutated inputs through every reader, the model, the engine and a small
/// simulation (<see cref="InputFuzzer"/>). SPINSIM_FUZZ_INPUTS=10000 runs the same harness on more inputs
/// (DEVELOPERS.md, "Fuzzing").
/// </summary>
public class InputFuzzTests(ITestOutputHelper output)
{
    public const int DefaultInputs = 2000;
    public const int Seed = 20261202;

    [Fact]
    public void Every_mutated_input_gives_a_result_that_keeps_the_invariants_or_an_input_error()
    {
        var count = int.TryParse(Environment.GetEnvironmentVariable("SPINSIM_FUZZ_INPUTS"), out var n) && n > 0 ? n : DefaultInputs;
        var seed = int.TryParse(Environment.GetEnvironmentVariable("SPINSIM_FUZZ_SEED"), out var s) ? s : Seed;
        int accepted = 0, refused = 0;
        var failures = new StringBuilder();
        var failed = 0;
        var byFormat = new Dictionary<FuzzFormat, (int Accepted, int Refused)>();
        var slowest = (Seconds: 0.0, Name: "");
        foreach (var input in InputFuzzer.Inputs(seed, count))
        {
            var clock = System.Diagnostics.Stopwatch.StartNew();
            var outcome = InputFuzzer.Check(input);
            // Reported, not asserted: hangs are prevented by the engine's resource estimate, and speed is for benchmarks.
            if (clock.Elapsed.TotalSeconds > slowest.Seconds) slowest = (clock.Elapsed.TotalSeconds, input.Name);
            var (a, r) = byFormat.GetValueOrDefault(input.Format);
            if (outcome.Failure is not null)
            {
                if (failed++ < 10) failures.AppendLine($"{input.Name}: {outcome.Failure}\n--- input ---\n{input.Text}\n---");
            }
            else if (outcome.Accepted) { accepted++; byFormat[input.Format] = (a + 1, r); }
            else { refused++; byFormat[input.Format] = (a, r + 1); }
        }
        output.WriteLine($"fuzz: {count} inputs (seed {seed}): {accepted} accepted with the invariants kept, {refused} refused with an input error, {failed} failures");
        foreach (var (format, (a, r)) in byFormat.OrderBy(kv => kv.Key)) output.WriteLine($"  {format}: {a} accepted, {r} refused");
        output.WriteLine($"  slowest input: {slowest.Name}, {slowest.Seconds:0.000} s");
        Assert.True(failed == 0, $"{failed} of {count} inputs crashed or broke an invariant; the first ones:\n{failures}");
        // A harness whose mutations were all refused, or all harmless, would test little: both must occur for every format.
        foreach (var format in Enum.GetValues<FuzzFormat>())
        {
            var (a, r) = byFormat.GetValueOrDefault(format);
            Assert.True(a > 0 && r > 0, $"{format}: {a} accepted, {r} refused; the mutations should produce both");
        }
    }
}
