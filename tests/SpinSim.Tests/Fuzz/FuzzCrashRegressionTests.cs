using SpinSim.Formats.SpinSystems;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Fuzz;

/// <summary>
/// Every file in ../shared/reference-data/fuzz-crashes/ (inputs, minimised by mutation fuzzing of the example files,
/// that crashed SpinSim or gave wrong results; SOURCES.md) runs through the fuzz harness: each must give a result that
/// keeps the invariants or an input error, and the ones listed below must give exactly the outcome stated.
/// </summary>
public class FuzzCrashRegressionTests
{
    /// <summary>What each known file must give: a refusal containing the text, or (null) a result.</summary>
    public static readonly IReadOnlyDictionary<string, string?> Expected = new Dictionary<string, string?>
    {
        // field_mhz = 1.7E308: refused by the field's hard limit.
        ["crash_engine_AggregateException_ManagedBackend.SymmetricEigen.min"] = "outside the 0.001 to 1E+07 MHz",
        // shift_ppm = 9337203685477580: refused by the shift's hard limit.
        ["crash_engine_AggregateException_SubspectrumSolver.Transitions.min"] = "beyond the +-1E+04 ppm",
        // {"a":"","a":""}: the duplicate key is named with its line.
        ["crash_read_ArgumentException_SpinSystemJson.Check.min"] = "line 1: the key \"a\" is given twice",
        // "title": [] and a duplicate empty key: the duplicate is found first, in the line scan.
        ["crash_read_InvalidOperationException_SpinSystemJson.Parse.min"] = "is given twice",
        // observe = "13C" with no 13C nuclei: the empty spectrum is refused, not framed.
        ["crash_simulate_ArgumentException_SpectrumGrid.WindowFor.min"] = "has no 13C lines",
        // field_mhz = 9e-324: refused by the field's hard limit.
        ["crash_simulate_ArgumentOutOfRangeException_SpectrumGrid.Finite.min"] = "outside the 0.001 to 1E+07 MHz",
        // count = 64, the limit: simulated, with the sum rule and integrals exact (the binomials past 2^63 are exact).
        ["wrong_engine_NonFiniteLine_SpectrumEngine.Compute.min"] = null,
        // count = 100: refused by the count limit.
        ["wrong_engine_SumRule_SpectrumEngine.Compute.min"] = "more than 64 equivalent nuclei",
    };

    [ReferenceFact]
    public void Every_file_gives_a_correct_result_or_the_designated_input_error()
    {
        var files = Directory.GetFiles(ReferenceData.PathOf("fuzz-crashes")).Order(StringComparer.Ordinal).ToArray();
        Assert.NotEmpty(files);
        var problems = new List<string>();
        foreach (var file in files)
        {
            var text = File.ReadAllText(file);
            var name = Path.GetFileName(file);
            var format = text.TrimStart().StartsWith('{') ? FuzzFormat.SpinSystemJson : FuzzFormat.SpinSystemToml;
            var outcome = InputFuzzer.Check(new FuzzInput(name, format, text));
            if (outcome.Failure is not null) problems.Add($"{name}: {outcome.Failure}");
            else if (Expected.TryGetValue(name, out var expected))
            {
                if (expected is null && !outcome.Accepted) problems.Add($"{name}: refused ({outcome.Refusal}), expected a result");
                if (expected is not null && outcome.Refusal?.Contains(expected) != true)
                    problems.Add($"{name}: {(outcome.Accepted ? "accepted" : $"refused with \"{outcome.Refusal}\"")}, expected a refusal with \"{expected}\"");
                if (outcome.Refusal is { } refusal && !refusal.StartsWith(name, StringComparison.Ordinal) && !refusal.Contains("lines"))
                    problems.Add($"{name}: the refusal \"{refusal}\" does not name the file");
            }
        }
        Assert.True(problems.Count == 0, string.Join("\n", problems));
    }

    [ReferenceFact]
    public void The_set_of_64_gives_integrals_equal_to_the_counts()
    {
        // The file that showed non-finite lines: OCH2 and CH3 (one each, coupled) and Z, 64 equivalent nuclei, at 6 MHz.
        var document = SpinSystemToml.Parse(File.ReadAllText(ReferenceData.PathOf("fuzz-crashes", "wrong_engine_NonFiniteLine_SpectrumEngine.Compute.min")), "f.toml");
        var lines = SpinSim.Core.Engine.SpectrumEngine.Compute(document.System);
        var integrals = SpinSim.Core.Spectrum.SpectrumSimulator.Integrals(document.System, lines).ToDictionary(i => i.Id, i => i.Value);
        // Exact invariant: each entry integrates to its count.
        Assert.Equal(1.0, integrals["OCH2"], 9);
        Assert.Equal(1.0, integrals["CH3"], 9);
        Assert.Equal(64.0, integrals["Z"], 9);
        // Exact invariant: Tr(F+ F-) = N 2^(N-1) with N = 66: 66 x 2^65 = 66 x 36,893,488,147,419,103,232 = 2,434,970,217,729,660,813,312.
        Assert.Equal(2.434970217729660813312e21, lines.TotalIntensity, 2.434970217729660813312e21 * 1e-12);
    }
}
