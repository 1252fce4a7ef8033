using System.Text;
using System.Text.RegularExpressions;
using SpinSim.Formats;
using SpinSim.Formats.Jcamp;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Formats.Jcamp;

/// <summary>
/// Mutated copies of valid files (seeded, so a failure can be replayed): each either reads or throws
/// SpectrumFileException with a message; nothing else escapes, and a trace that reads has the point count its
/// NPOINTS states (or one off, with the warning that says so). Speed is measured by JcampReadBenchmarks, not here.
/// </summary>
public class JcampReaderFuzzTests
{
    private const int CasesPerFile = 1500;

    [Fact]
    public void Mutated_writer_output_reads_or_fails_cleanly()
    {
        var small = JcampSamples.Write(JcampSamples.Synthetic(400, seed: 3), JcampForm.DifDup, "fuzz seed file");
        Fuzz(small, seed: 20240601);
    }

    [ReferenceFact]
    public void Mutated_isobutanol_file_reads_or_fails_cleanly()
    {
        // Source file: isobutanol-1h-300mhz-sqzdif.jdx (SOURCES.md), 7 kB, SQZ+DIF.
        Fuzz(File.ReadAllText(ReferenceData.PathOf("jcamp", "isobutanol-1h-300mhz-sqzdif.jdx")), seed: 1988);
    }

    private static void Fuzz(string original, int seed)
    {
        var random = new Random(seed);
        int read = 0, refused = 0;
        for (var n = 0; n < CasesPerFile; n++)
        {
            var mutated = Mutate(original, random);
            var name = $"fuzz-{seed}-{n}.jdx";
            try
            {
                var trace = JcampReader.Parse(mutated, name);
                read++;
                AssertNotSilentlyShortened(mutated, trace, n, seed);
            }
            catch (SpectrumFileException e)
            {
                refused++;
                Assert.Equal(name, e.FilePath);
                Assert.False(string.IsNullOrWhiteSpace(e.Problem), $"case {n}: empty message");
                Assert.True(e.Line is null or > 0, $"case {n}: line {e.Line}");
            }
            catch (Exception e) when (e is not Xunit.Sdk.XunitException)
            {
                Assert.Fail($"case {n} (seed {seed}) threw {e.GetType().Name}: {e}");
            }
        }
        Assert.Equal(CasesPerFile, read + refused);
        Assert.True(read > 0 && refused > 0, $"read {read}, refused {refused}: the mutations should produce both");
    }

    private static void AssertNotSilentlyShortened(string text, SpinSim.Core.Traces.SpectrumTrace trace, int n, int seed)
    {
        var stated = Regex.Matches(text, @"^##NPOINTS=\s*([0-9]+)\s*$", RegexOptions.Multiline);
        if (stated.Count != 1) return;
        var points = int.Parse(stated[0].Groups[1].Value);
        if (trace.Count == points) return;
        Assert.True(Math.Abs(trace.Count - points) == 1 && trace.Origin.Warnings.Any(w => w.Contains("NPOINTS")),
            $"case {n} (seed {seed}): read {trace.Count} points where NPOINTS says {points}, without a warning");
    }

    private static string Mutate(string text, Random random)
    {
        var steps = random.Next(4) == 0 ? random.Next(2, 5) : 1;
        for (var s = 0; s < steps && text.Length > 0; s++)
            text = random.Next(7) switch
            {
                0 => text[..random.Next(text.Length)],
                1 => Replace(text, random.Next(text.Length), RandomChar(random)),
                2 => WithLines(text, lines => { var (a, b) = (random.Next(lines.Count), random.Next(lines.Count)); (lines[a], lines[b]) = (lines[b], lines[a]); }),
                3 => WithLines(text, lines => lines.RemoveAt(random.Next(lines.Count))),
                4 => WithLines(text, lines => { var i = random.Next(lines.Count); lines.Insert(i, lines[i]); }),
                5 => text.Insert(random.Next(text.Length), RandomChar(random).ToString()),
                _ => Replace(text, random.Next(text.Length), "0123456789"[random.Next(10)]),
            };
        return text;
    }

    // Mostly characters that mean something in JCAMP-DX, some that do not, and a few control and non-ASCII ones.
    private const string Alphabet = "0123456789+-., ;=#$%@?ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz\t\r\n()!\u00e9\u0000\u00ff";

    private static char RandomChar(Random random) => Alphabet[random.Next(Alphabet.Length)];

    private static string Replace(string text, int at, char c) =>
        new StringBuilder(text) { [at] = c }.ToString();

    private static string WithLines(string text, Action<List<string>> change)
    {
        var lines = text.Split('\n').ToList();
        change(lines);
        return string.Join('\n', lines);
    }
}
