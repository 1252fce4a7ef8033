using BenchmarkDotNet.Attributes;
using SpinSim.Core.Traces;
using SpinSim.Formats.Jcamp;

namespace SpinSim.Benchmarks;

/// <summary>Reading a 65,536-point 1H spectrum written by SpinSim, in plain (AFFN) and compressed (DIFDUP) form.</summary>
[MemoryDiagnoser]
public class JcampReadBenchmarks
{
    [Params(JcampForm.Affn, JcampForm.DifDup)]
    public JcampForm Form { get; set; }

    private string _text = "";

    [GlobalSetup]
    public void Setup()
    {
        const int n = 65536;
        var random = new Random(1);
        var ppm = Enumerable.Range(0, n).Select(i => 12.0 - 13.0 * i / (n - 1)).ToArray();
        // Invented trace: a few Lorentzian lines on noise.
        var y = ppm.Select(p => 1.0 / (1 + Math.Pow((p - 7.26) / 0.002, 2)) + 0.5 / (1 + Math.Pow((p - 1.2) / 0.002, 2)) + 1e-3 * random.NextDouble()).ToArray();
        var trace = new SpectrumTrace(ppm, y, 400.13, "1H", TraceOrigin.Describe("benchmark trace"));
        var writer = new StringWriter();
        JcampWriter.Write(trace, writer, Form, []);
        _text = writer.ToString();
    }

    [Benchmark]
    public int Read() => JcampReader.Parse(_text, "benchmark.jdx").Count;
}
