using System.Globalization;
using System.Text;
using SpinSim.Core.Engine;
using SpinSim.Core.Errors;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Traces;
using SpinSim.Core.Units;
using SpinSim.Formats;
using SpinSim.Formats.Delimited;
using SpinSim.Formats.Fitting;
using SpinSim.Formats.Jcamp;
using SpinSim.Formats.SpinSystems;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Fuzz;

/// <summary>The formats the fuzzer feeds, each to its reader.</summary>
public enum FuzzFormat { SpinSystemToml, SpinSystemJson, FitSetup, Jcamp, Delimited }

/// <summary>One input: a name (as a file name, for messages), its format and its text.</summary>
public sealed record FuzzInput(string Name, FuzzFormat Format, string Text);

/// <summary>What became of one input: a result that keeps the invariants, a designated input error, or a failure.</summary>
/// <param name="Refusal">The input error's message, when the input was refused.</param>
/// <param name="Failure">What went wrong, when the input crashed SpinSim or broke an invariant; null otherwise.</param>
public sealed record FuzzOutcome(string? Refusal, string? Failure)
{
    public bool Accepted => Refusal is null && Failure is null;
}

/// <summary>
/// The fuzz harness: mutated copies of the project's own example files (spin systems in TOML and JSON, the demo's fit
/// setups, spectra written by SpinSim's own writers), each run in-process through its reader, the model, and for spin
/// systems the engine and a small simulation. Every input must give either a result that keeps the invariants (finite
/// lines, the sum rule N 2^(N-1) per observed isotope, integrals equal to the counts; a finite trace) or an
/// <see cref="InputException"/>; anything else is a failure. Runs stay short because the engine refuses, from its
/// resource estimate and before any work, systems above <see cref="Budget"/>: no timeout is involved.
/// </summary>
public static class InputFuzzer
{
    /// <summary>The engine's budgets for fuzzed systems: small, so that every accepted input is quick.</summary>
    public static EngineOptions Budget { get; } = EngineOptions.Default with { TimeBudgetSeconds = 0.1, MemoryBudgetBytes = 64L << 20 };

    /// <summary>Points of the small simulation run on every system that reads.</summary>
    public const int SimulationPoints = 1024;

    /// <summary>Relative tolerance of the sum rule and of the integrals (exact invariants; rounding only).</summary>
    public const double Tolerance = 1e-8;

    /// <summary>The seed corpus: every example system (TOML and its JSON form), the demo's fit setups and three spectrum files.</summary>
    public static IReadOnlyList<FuzzInput> Seeds()
    {
        var root = ReferenceData.RepositoryRoot;
        var seeds = new List<FuzzInput>();
        foreach (var file in Directory.GetFiles(Path.Combine(root, "spin-systems"), "*.toml").Concat(Directory.GetFiles(Path.Combine(root, "src", "SpinSim.Cli", "Demo"), "truth-*.toml")).Order(StringComparer.Ordinal))
        {
            var text = File.ReadAllText(file);
            seeds.Add(new(Path.GetFileName(file), FuzzFormat.SpinSystemToml, text));
            var document = SpinSystemToml.Parse(text, file);
            seeds.Add(new(Path.ChangeExtension(Path.GetFileName(file), ".json"), FuzzFormat.SpinSystemJson, SpinSystemJson.Write(document.System, document.DefaultWidth)));
        }
        foreach (var file in Directory.GetFiles(Path.Combine(root, "src", "SpinSim.Cli", "Demo"), "fit-*.toml").Order(StringComparer.Ordinal))
            seeds.Add(new(Path.GetFileName(file), FuzzFormat.FitSetup, File.ReadAllText(file)));

        var vinyl = SpinSystemToml.Parse(File.ReadAllText(Path.Combine(root, "spin-systems", "vinyl.toml")), "vinyl.toml").System;
        var trace = SpectrumSimulator.Simulate(vinyl, SpectrumEngine.Compute(vinyl), new SimulationSettings(new WidthHz(1), Lineshape.Lorentzian, Points: 300)).Trace;
        foreach (var form in new[] { JcampForm.Affn, JcampForm.DifDup })
        {
            var w = new StringWriter();
            JcampWriter.Write(trace, w, form, []);
            seeds.Add(new($"vinyl-{form}.jdx".ToLowerInvariant(), FuzzFormat.Jcamp, w.ToString()));
        }
        var csv = new StringWriter();
        SpectrumCsvWriter.Write(trace, csv);
        seeds.Add(new("vinyl.csv", FuzzFormat.Delimited, csv.ToString()));
        return seeds;
    }

    /// <summary>The fit setups are read against this system (the demo's AA'BB' start values).</summary>
    private static readonly Lazy<SpinSystem> FitSystem = new(() => SpinSystemToml.Parse(
        File.ReadAllText(Path.Combine(ReferenceData.RepositoryRoot, "spin-systems", "para-ring-aabb.toml")), "para-ring-aabb.toml").System);

    /// <summary><paramref name="count"/> mutated inputs from the seeds, the same for the same seed.</summary>
    public static IEnumerable<FuzzInput> Inputs(int seed, int count)
    {
        var seeds = Seeds();
        var random = new Random(seed);
        for (var n = 0; n < count; n++)
        {
            var origin = seeds[random.Next(seeds.Count)];
            yield return origin with { Name = $"fuzz-{seed}-{n}-{origin.Name}", Text = Mutate(origin.Text, random) };
        }
    }

    // Numbers that sit on or beyond a limit, or break arithmetic: zero, signs, tiny, huge, not finite, the count limit.
    private static readonly string[] Numbers =
    [
        "0", "-0", "1", "-1", "2", "3", "9", "63", "64", "65", "100", "1000", "1001", "7.05", "300e6", "984", "1e-300", "9e-324",
        "1.7E308", "-1.7e308", "1e16", "9337203685477580", "nan", "inf", "-inf", "0.5", "1e5", "1e7", "2e7", "-40", "31", "0.001",
    ];

    // Characters that mean something in TOML, JSON, JCAMP-DX or CSV, some that do not, a control and a non-ASCII one.
    private const string Alphabet = "0123456789+-.,;:=#$%@?[]{}\"' \t\nABCDEFGHIJKLMNOPQRSTUVWXYZabcdefxyz_\u00e9\u0000";

    public static string Mutate(string text, Random random)
    {
        var steps = random.Next(3) == 0 ? random.Next(2, 5) : 1;
        for (var s = 0; s < steps && text.Length > 0; s++)
            text = random.Next(10) switch
            {
                0 or 1 or 2 => ReplaceNumber(text, random),
                3 => WithLines(text, lines => lines.RemoveAt(random.Next(lines.Count))),
                4 => WithLines(text, lines => { var i = random.Next(lines.Count); lines.Insert(i, lines[i]); }),
                5 => WithLines(text, lines => { var (a, b) = (random.Next(lines.Count), random.Next(lines.Count)); (lines[a], lines[b]) = (lines[b], lines[a]); }),
                6 => text.Insert(random.Next(text.Length), Alphabet[random.Next(Alphabet.Length)].ToString()),
                7 => text.Remove(random.Next(text.Length), 1),
                8 => text[..random.Next(text.Length)],
                _ => ReplaceString(text, random),
            };
        return text;
    }

    private static string ReplaceNumber(string text, Random random)
    {
        var spans = NumberSpans(text);
        if (spans.Count == 0) return text;
        var (start, length) = spans[random.Next(spans.Count)];
        var replacement = random.Next(4) == 0
            ? (random.NextDouble() * 2000 - 1000).ToString("G6", CultureInfo.InvariantCulture)
            : Numbers[random.Next(Numbers.Length)];
        return text[..start] + replacement + text[(start + length)..];
    }

    /// <summary>Replaces a quoted text (an id, an isotope, a key) with another quoted text of the same file, or an empty one.</summary>
    private static string ReplaceString(string text, Random random)
    {
        var quoted = new List<(int Start, int Length)>();
        for (var i = 0; i < text.Length; i++)
        {
            if (text[i] != '"') continue;
            var end = text.IndexOf('"', i + 1);
            if (end < 0) break;
            quoted.Add((i, end - i + 1));
            i = end;
        }
        if (quoted.Count == 0) return text;
        var (start, length) = quoted[random.Next(quoted.Count)];
        var (otherStart, otherLength) = quoted[random.Next(quoted.Count)];
        var replacement = random.Next(5) == 0 ? "\"\"" : text.Substring(otherStart, otherLength);
        return text[..start] + replacement + text[(start + length)..];
    }

    private static List<(int Start, int Length)> NumberSpans(string text)
    {
        var spans = new List<(int, int)>();
        for (var i = 0; i < text.Length; i++)
        {
            if (!char.IsAsciiDigit(text[i]) || (i > 0 && (char.IsAsciiLetterOrDigit(text[i - 1]) || text[i - 1] == '.'))) continue;
            var j = i;
            while (j < text.Length && (char.IsAsciiDigit(text[j]) || text[j] is '.' or 'e' or 'E' || (text[j] is '-' or '+' && text[j - 1] is 'e' or 'E'))) j++;
            spans.Add((i, j - i));
            i = j;
        }
        return spans;
    }

    private static string WithLines(string text, Action<List<string>> change)
    {
        var lines = text.Split('\n').ToList();
        change(lines);
        return string.Join('\n', lines);
    }

    /// <summary>Runs one input through its reader, the model and (for systems) the engine and a small simulation. Never throws.</summary>
    public static FuzzOutcome Check(FuzzInput input)
    {
        try
        {
            var failure = input.Format switch
            {
                FuzzFormat.SpinSystemToml => CheckSystem(SpinSystemToml.Parse(input.Text, input.Name)),
                FuzzFormat.SpinSystemJson => CheckSystem(SpinSystemJson.Parse(input.Text, input.Name)),
                FuzzFormat.FitSetup => CheckFitSetup(input),
                FuzzFormat.Jcamp => CheckTrace(JcampReader.Parse(input.Text, input.Name)),
                _ => CheckTrace(DelimitedReader.Parse(input.Text, input.Name)),
            };
            return new FuzzOutcome(null, failure);
        }
        catch (InputException e)
        {
            var failure = string.IsNullOrWhiteSpace(e.Problem) ? "an input error without a message" : null;
            return new FuzzOutcome(e.Message, failure);
        }
        catch (Exception e)
        {
            return new FuzzOutcome(null, $"{e.GetType().Name}: {e.Message}\n{e.StackTrace}");
        }
    }

    private static string? CheckSystem(SpinSystemDocument document)
    {
        var system = document.System;
        var lines = SpectrumEngine.Compute(system, Budget);
        foreach (var line in lines.Lines)
            if (!double.IsFinite(line.FrequencyHz) || !double.IsFinite(line.Intensity) || line.Intensity < 0)
                return $"line at {line.FrequencyHz} Hz with intensity {line.Intensity}";

        // Sum rule, exact: Tr(F+ F-) = N 2^(N-1) for N observed spin-1/2 nuclei, times 2^M for M unobserved ones.
        var observed = system.ObservedNucleusCount;
        var all = system.Nuclei.Sum(n => n.Count);
        var expected = observed * Math.Pow(2, all - 1);
        var total = lines.Lines.Sum(l => l.Intensity);
        if (Math.Abs(total - expected) > Tolerance * Math.Max(expected, 1))
            return $"sum rule: total intensity {total:R}, expected {observed} x 2^{all - 1} = {expected:R}";

        // Integrals, exact: each observed entry's share is Tr(F+ I-_e) = count_e 2^(N-1).
        var integrals = SpectrumSimulator.Integrals(system, lines);
        foreach (var integral in integrals)
            if (Math.Abs(integral.Value - integral.Count) > Tolerance * Math.Max(observed, 1))
                return $"integral of {integral.Id} is {integral.Value:R}, its count is {integral.Count}";

        var width = document.DefaultWidth ?? new WidthHz(1);
        var simulated = SpectrumSimulator.Simulate(system, lines, new SimulationSettings(width, Lineshape.Lorentzian, Points: SimulationPoints));
        return FirstNonFinite(simulated.Trace);
    }

    private static string? CheckFitSetup(FuzzInput input)
    {
        var section = SpinSystemToml.ParseFitFile(input.Text, input.Name);
        var settings = FitSetupReader.Read(section, FitSystem.Value, 1);
        var parameters = settings.Setup.BuildParameters(FitSystem.Value, 1, 1.0);
        var layout = new ParameterLayout(parameters, settings.Setup.Ties);
        return layout.FreeCount >= 0 ? null : "negative free count";
    }

    private static string? CheckTrace(SpectrumTrace trace)
    {
        TraceSummary.From(trace);
        return FirstNonFinite(trace);
    }

    private static string? FirstNonFinite(SpectrumTrace trace)
    {
        for (var i = 0; i < trace.Count; i++)
            if (!double.IsFinite(trace.ShiftPpm[i]) || !double.IsFinite(trace.Intensity[i]))
                return $"trace point {i}: {trace.ShiftPpm[i]} ppm, intensity {trace.Intensity[i]}";
        return null;
    }
}
