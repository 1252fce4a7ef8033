using System.Numerics;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>
/// The least-squares model of a spectrum fit: free values -> spin system -> lines at each trace's field -> trace on the
/// fitted points, with scale, polynomial baseline, frequency offset and zero-order phase per trace. Residual = model - data.
/// Line lists are cached by their shift and coupling values, so derivatives in the other parameters cost no
/// diagonalisation. Safe for the parallel Jacobian columns; one instance per fit start.
/// </summary>
internal sealed class SpectralModel : ILeastSquaresModel
{
    /// <summary>
    /// A line of the intensity of one uncoupled nucleus is evaluated within this many widths of its centre (its Lorentzian
    /// tail beyond holds 0.32 % of its area and is below 2.5e-5 of its height; the fitted baseline takes up most of it). Weaker lines get a window shrunk by the
    /// square root of their relative intensity, which keeps the neglected tail below the same fraction of a single
    /// nucleus's height, down to <see cref="MinimumCutoffWidths"/>; weak combination lines then cost almost nothing.
    /// </summary>
    private const double CutoffWidths = 100;

    private const double MinimumCutoffWidths = 3;

    /// <summary>
    /// Lines weaker than this fraction of a single nucleus's intensity are left out, and those up to ten times stronger
    /// fade in smoothly, so that no line appears or vanishes abruptly as parameters move (a step would corrupt the
    /// finite-difference derivatives). At 1e-7 of one nucleus they lie far below any measured noise.
    /// </summary>
    internal const double NegligibleIntensity = 1e-7;

    /// <summary>
    /// Over the outer part of the cut-off window contributions fade out smoothly (a smooth step), so that the model stays
    /// differentiable when a line moves and points enter or leave its window; a hard edge would put steps into the
    /// finite-difference derivatives.
    /// </summary>
    private const double TaperStart = 0.8;

    private readonly SpinSystem _system;
    private readonly ParameterLayout _layout;
    private readonly IReadOnlyList<PreparedData> _data;
    private readonly Lineshape _shape;
    private readonly EngineOptions _engine;
    private readonly double _broadeningHz;
    private readonly System.Collections.Concurrent.ConcurrentDictionary<string, LineList>[] _cache;
    private readonly int[] _offsets;
    private readonly int[] _spinParameters;
    private readonly double _singleNucleus;

    public SpectralModel(SpinSystem system, ParameterLayout layout, IReadOnlyList<PreparedData> data, Lineshape shape, EngineOptions engine, double broadeningHz)
    {
        _system = system;
        _layout = layout;
        _data = data;
        _shape = shape;
        _engine = engine;
        _broadeningHz = broadeningHz;
        _cache = data.Select(_ => new System.Collections.Concurrent.ConcurrentDictionary<string, LineList>()).ToArray();
        _spinParameters = Enumerable.Range(0, layout.Parameters.Count)
            .Where(i => layout.Parameters[i].Kind is ParameterKind.ShiftPpm or ParameterKind.JHz).ToArray();
        // Intensity of one uncoupled nucleus, 2^(N-1): the unit of line areas and of the negligible-line threshold.
        _singleNucleus = Math.Pow(2, system.Nuclei.Sum(n => n.Count) - 1);
        _offsets = new int[data.Count + 1];
        for (var d = 0; d < data.Count; d++) _offsets[d + 1] = _offsets[d] + data[d].Count;
    }

    public int ParameterCount => _layout.FreeCount;
    public int ResidualCount => _offsets[^1];
    public IReadOnlyList<PreparedData> Data => _data;

    public void Residuals(ReadOnlySpan<double> parameters, Span<double> residuals)
    {
        var full = _layout.Expand(parameters);
        for (var d = 0; d < _data.Count; d++)
        {
            var span = residuals.Slice(_offsets[d], _data[d].Count);
            if (!TryModel(full, d, span)) { residuals.Fill(double.NaN); return; }
            var y = _data[d].Y;
            for (var i = 0; i < span.Length; i++) span[i] -= y[i];
        }
    }

    /// <summary>Difference steps per free value (absolute), set by the fitter.</summary>
    public double[] Steps { get; set; } = [];

    /// <summary>
    /// Scale and baseline columns are exact (the model is linear in them); the others are central differences of the
    /// model, which for widths, offsets and phases reuse the cached line lists.
    /// </summary>
    public bool TryJacobian(ReadOnlySpan<double> parameters, ReadOnlySpan<double> residuals, double[,] jacobian)
    {
        var x = parameters.ToArray();
        var full = _layout.Expand(x);
        var differenced = new List<int>();
        for (var f = 0; f < x.Length; f++)
        {
            var members = _layout.MembersOf(f).Select(i => _layout.Parameters[i]).ToArray();
            if (members.All(m => m.Kind == ParameterKind.Baseline))
            {
                for (var r = 0; r < ResidualCount; r++) jacobian[r, f] = 0;
                foreach (var m in members)
                {
                    var power = _data[m.Dataset].BaselinePower(m.Index);
                    for (var i = 0; i < power.Length; i++) jacobian[_offsets[m.Dataset] + i, f] += power[i];
                }
                continue;
            }
            if (members.All(m => m.Kind == ParameterKind.Scale) && x[f] != 0)
            {
                for (var r = 0; r < ResidualCount; r++) jacobian[r, f] = 0;
                foreach (var m in members)
                {
                    var data = _data[m.Dataset];
                    var baseline = Baseline(full, m.Dataset);
                    for (var i = 0; i < data.Count; i++)
                    {
                        var k = _offsets[m.Dataset] + i;
                        jacobian[k, f] += (residuals[k] + data.Y[i] - baseline[i]) / x[f];
                    }
                }
                continue;
            }
            differenced.Add(f);
        }

        // The differenced columns are independent: spread them over the cores (each with its own buffers).
        Parallel.ForEach(differenced, column =>
        {
            var at = (double[])x.Clone();
            var plus = new double[ResidualCount];
            var minus = new double[ResidualCount];
            var h = Steps.Length == at.Length ? Steps[column] : 1e-6 * Math.Max(1, Math.Abs(at[column]));
            var keep = at[column];
            at[column] = keep + h;
            Residuals(at, plus);
            at[column] = keep - h;
            Residuals(at, minus);
            for (var r = 0; r < ResidualCount; r++) jacobian[r, column] = (plus[r] - minus[r]) / (2 * h);
        });
        return true;
    }

    private double[] Baseline(double[] full, int d)
    {
        var b = new double[_data[d].Count];
        var terms = Enumerable.Range(0, full.Length)
            .Where(k => _layout.Parameters[k].Kind == ParameterKind.Baseline && _layout.Parameters[k].Dataset == d)
            .Select(k => (_layout.Parameters[k].Index, full[k])).ToList();
        AddBaseline(_data[d], terms, b);
        return b;
    }

    /// <summary>Adds the polynomial sum of value x^order to <paramref name="y"/>, by Horner's rule (no Math.Pow per point).</summary>
    private static void AddBaseline(PreparedData data, List<(int Order, double Value)> terms, Span<double> y)
    {
        if (terms.Count == 0) return;
        var coefficients = new double[terms.Max(t => t.Order) + 1];
        foreach (var (order, value) in terms) coefficients[order] += value;
        var x = data.BaselineX;
        for (var i = 0; i < y.Length; i++)
        {
            var v = 0.0;
            for (var k = coefficients.Length - 1; k >= 0; k--) v = v * x[i] + coefficients[k];
            y[i] += v;
        }
    }

    /// <summary>The model of dataset <paramref name="d"/> at the fitted points, in normalised units.</summary>
    public double[] Model(double[] full, int d)
    {
        var y = new double[_data[d].Count];
        if (!TryModel(full, d, y)) Array.Fill(y, double.NaN);
        return y;
    }

    public LineList Lines(double[] full, int d) => LinesFor(full, d);

    private bool TryModel(double[] full, int d, Span<double> y)
    {
        LineList lines;
        try { lines = LinesFor(full, d); }
        catch (SpinSystemException) { return false; }
        var data = _data[d];
        double scale = 1, offsetHz = 0, phaseDeg = 0, globalWidth = double.NaN;
        var baseline = new List<(int Order, double Value)>();
        var perEntryWidth = new double[_system.Nuclei.Count];
        var hasPerEntry = false;
        for (var i = 0; i < full.Length; i++)
        {
            var p = _layout.Parameters[i];
            if (p.Dataset >= 0 && p.Dataset != d) continue;
            switch (p.Kind)
            {
                case ParameterKind.Scale: scale = full[i]; break;
                case ParameterKind.OffsetHz: offsetHz = full[i]; break;
                case ParameterKind.PhaseDeg: phaseDeg = full[i]; break;
                case ParameterKind.Baseline: baseline.Add((p.Index, full[i])); break;
                case ParameterKind.LinewidthHz when p.Index < 0: globalWidth = full[i]; break;
                case ParameterKind.LinewidthHz: perEntryWidth[p.Index] = full[i]; hasPerEntry = true; break;
            }
        }
        if (hasPerEntry)
            for (var e = 0; e < perEntryWidth.Length; e++)
                if (perEntryWidth[e] == 0) perEntryWidth[e] = double.IsNaN(globalWidth) ? 1.0 : globalWidth;

        var areaScale = scale / _singleNucleus / data.Normalisation;
        var cos = Math.Cos(phaseDeg * Math.PI / 180);
        var sin = Math.Sin(phaseDeg * Math.PI / 180);
        y.Clear();
        for (var l = 0; l < lines.Lines.Count; l++)
        {
            var width = hasPerEntry ? lines.WeightedByOrigin(l, perEntryWidth) : globalWidth;
            if (!(width > 0)) return false;
            var intensity = lines.Lines[l].Intensity;
            var relative = intensity / _singleNucleus;
            if (relative < NegligibleIntensity) continue;
            if (relative < 10 * NegligibleIntensity) intensity *= 1 - SmoothStep((10 * NegligibleIntensity - relative) / (9 * NegligibleIntensity));
            var cutoff = Math.Max(MinimumCutoffWidths, CutoffWidths * Math.Sqrt(Math.Min(1, intensity / _singleNucleus)));
            AddLine(data.Hz, y, lines.Lines[l].FrequencyHz + offsetHz, intensity * areaScale, width, cutoff, cos, sin);
        }
        AddBaseline(data, baseline, y);
        return true;
    }

    private void AddLine(double[] hz, Span<double> y, double centreHz, double area, double widthHz, double cutoffWidths, double cos, double sin)
    {
        var (lorentzian, gaussian) = _shape.Components(widthHz);
        lorentzian += _broadeningHz;
        var reach = cutoffWidths * (lorentzian + gaussian);
        var first = LowerBound(hz, centreHz - reach);
        var last = LowerBound(hz, centreHz + reach);
        var taper = TaperStart * reach;
        if (gaussian == 0)
        {
            var half = lorentzian / 2;
            var h2 = half * half;
            var a = area / Math.PI;
            var absorption = half * cos;
            // The core of the window needs no taper; only the two outer bands do.
            var coreFirst = LowerBound(hz, centreHz - taper);
            var coreLast = LowerBound(hz, centreHz + taper);
            for (var i = coreFirst; i < coreLast; i++)
            {
                var dx = hz[i] - centreHz;
                y[i] += a / (dx * dx + h2) * (absorption - dx * sin);
            }
            for (var i = first; i < coreFirst; i++)
            {
                var dx = hz[i] - centreHz;
                y[i] += a / (dx * dx + h2) * (absorption - dx * sin) * Taper(-dx, taper, reach);
            }
            for (var i = coreLast; i < last; i++)
            {
                var dx = hz[i] - centreHz;
                y[i] += a / (dx * dx + h2) * (absorption - dx * sin) * Taper(dx, taper, reach);
            }
            return;
        }
        var sigma = Lineshape.GaussianSigmaHz(gaussian);
        var norm = area / (sigma * Math.Sqrt(2 * Math.PI));
        var denominator = sigma * Math.Sqrt(2);
        for (var i = first; i < last; i++)
        {
            var w = Faddeeva.W(new Complex((hz[i] - centreHz) / denominator, lorentzian / 2 / denominator));
            y[i] += norm * (w.Real * cos - w.Imaginary * sin) * Taper(Math.Abs(hz[i] - centreHz), taper, reach);
        }
    }

    private static double Taper(double distance, double start, double end) =>
        distance <= start ? 1 : distance >= end ? 0 : 1 - SmoothStep((distance - start) / (end - start));

    /// <summary>3t^2 - 2t^3: 0 at 0, 1 at 1, flat at both ends (continuous first derivative).</summary>
    private static double SmoothStep(double t) => t * t * (3 - 2 * t);

    private static int LowerBound(double[] sorted, double value)
    {
        int lo = 0, hi = sorted.Length;
        while (lo < hi)
        {
            var mid = (lo + hi) >> 1;
            if (sorted[mid] < value) lo = mid + 1; else hi = mid;
        }
        return lo;
    }

    private LineList LinesFor(double[] full, int d)
    {
        var key = string.Join(",", _spinParameters.Select(i => BitConverter.DoubleToInt64Bits(full[i])));
        var cache = _cache[d];
        if (cache.TryGetValue(key, out var cached)) return cached;
        var system = _layout.ApplySpin(_system, full).WithField(new Units.FieldMHz(_data[d].ObserveMHz / _system.Observed.FrequencyRatioPercent * 100));
        var lines = SpectrumEngine.Compute(system, _engine);
        if (cache.Count > 256) cache.Clear();
        cache[key] = lines;
        return lines;
    }
}
