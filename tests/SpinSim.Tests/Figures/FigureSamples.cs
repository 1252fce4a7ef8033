using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Reporting;
using SpinSim.Core.Traces;
using SpinSim.Figures;
using SpinSim.Figures.Plots;

namespace SpinSim.Tests.Figures;

/// <summary>Synthetic spectra for the figure tests: sums of Lorentzians, not measured data.</summary>
internal static class FigureSamples
{
    /// <summary>Peaks (ppm, height); the first is the tallest.</summary>
    public static readonly (double Ppm, double Height)[] Peaks = [(7.26, 1.0), (3.50, 0.6), (1.20, 0.8), (1.25, 0.7)];

    public const double TallestPpm = 7.26;

    /// <summary>0 to 10 ppm stored from high to low, as many files store it, so figures must not rely on order.</summary>
    public static SpectrumTrace Trace(double observeMHz = 400, int points = 8192, double widthPpm = 0.01, double noise = 0)
    {
        var random = new Random(42);
        var ppm = new double[points];
        var y = new double[points];
        for (var i = 0; i < points; i++)
        {
            ppm[i] = 10.0 - 10.0 * i / (points - 1);
            y[i] = Lorentzians(ppm[i], widthPpm, 0) + noise * (random.NextDouble() - 0.5);
        }
        return new SpectrumTrace(ppm, y, observeMHz, "1H", TraceOrigin.Describe("synthetic test trace"));
    }

    public static double Lorentzians(double ppm, double widthPpm, double shiftPpm)
    {
        var sum = 0.0;
        var g = widthPpm / 2;
        foreach (var (p, h) in Peaks) sum += h * g * g / ((ppm - p - shiftPpm) * (ppm - p - shiftPpm) + g * g);
        return sum;
    }

    public static IReadOnlyList<StickLine> Sticks() => Peaks.Select(p => new StickLine(p.Ppm, p.Height)).ToArray();

    public static IReadOnlyList<ShiftLabel> Labels() =>
        [new("H1", 7.26), new("H2", 3.50), new("CH3 (a)", 1.20), new("CH3 (b)", 1.25)];

    public static FitFigureData Fit(int parameters = 5)
    {
        var measured = Trace(noise: 0.01);
        var fitted = measured.ShiftPpm.Select(p => Lorentzians(p, 0.0105, 0.0004)).ToArray();
        var residual = measured.Intensity.Zip(fitted, (m, f) => m - f).ToArray();
        var rows = Enumerable.Range(0, parameters)
            .Select(i => new ParameterRow($"δ(H{i + 1})/ppm", $"{7.26 - i * 0.9:0.0000}(3)", "", ParameterGroup.Spin))
            .ToArray();
        return new FitFigureData(measured, fitted, residual, rows, "Fit of a synthetic spectrum");
    }

    /// <summary>Where figure tests drop their files when SPINSIM_FIGURE_OUT names a folder, for a person to look at.</summary>
    public static void Keep(string name, byte[] bytes)
    {
        var folder = Environment.GetEnvironmentVariable("SPINSIM_FIGURE_OUT");
        if (string.IsNullOrEmpty(folder)) return;
        Directory.CreateDirectory(folder);
        File.WriteAllBytes(Path.Combine(folder, name), bytes);
    }
}
