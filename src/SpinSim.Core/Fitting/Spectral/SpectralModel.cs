using SpinSim.Core.Engine;
using SpinSim.Core.LinearAlgebra;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>
/// The least-squares model of a spectrum fit: free values -> spin system -> lines at each trace's field -> trace on the
/// fitted points, with scale, polynomial baseline, frequency offset, zero- and first-order phase per trace. Residual = model - data.
/// Each parameter enters through its kind's <see cref="ParameterKindInfo"/> (the spin system, or the <see cref="TraceState"/>
/// of one trace); what a trace value does to a line, and that line's derivatives, are here.
/// The Jacobian is analytic where the engine can differentiate the lines (one diagonalisation per evaluation);
/// otherwise its columns are central differences, for which line lists are cached by their shift and coupling values
/// so that derivatives in the other parameters cost no diagonalisation. <see cref="Residuals"/> and <see cref="Model"/>
/// may run on several threads at once; <see cref="TryJacobian"/> reuses its buffers and may not. One instance per fit
/// start and stage.
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

    // Analytic spin columns: the engine's line derivatives by each shift and coupling of the layout (in Hz), and for
    // each full parameter the derivative it takes (-1 for other kinds).
    private readonly SpinParameter[] _derivatives;
    private readonly int[] _derivativeOf;
    private readonly bool _analytic;
    private double[] _columns = [];
    private readonly Workspace _workspace = new();

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
            .Where(i => ParameterKindInfo.Of(layout.Parameters[i].Kind).IsSpin).ToArray();
        // Intensity of one uncoupled nucleus, 2^(N-1): the unit of line areas and of the negligible-line threshold.
        _singleNucleus = Math.Pow(2, system.Nuclei.Sum(n => n.Count) - 1);
        _offsets = new int[data.Count + 1];
        for (var d = 0; d < data.Count; d++) _offsets[d + 1] = _offsets[d] + data[d].Count;

        _derivativeOf = Enumerable.Repeat(-1, layout.Parameters.Count).ToArray();
        var derivatives = new List<SpinParameter>();
        foreach (var i in _spinParameters)
        {
            _derivativeOf[i] = derivatives.Count;
            derivatives.Add(ParameterKindInfo.Of(layout.Parameters[i].Kind).EngineDerivative!(system, layout.Parameters[i]));
        }
        _derivatives = derivatives.ToArray();
        // Line derivatives come from the whole system diagonalised as one (a split plan depends on structure only, so the
        // start decides), and widths per entry follow the lines' origins, which the derivatives do not carry.
        _analytic = !engine.PoolWeakLines && SpectrumEngine.PlanFor(system, engine).IsExact
            && !layout.Parameters.Any(p => p.Kind == ParameterKind.LinewidthHz && p.Index >= 0);
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
    /// Free values the minimiser holds in this run (its bounds coincide): their Jacobian columns are left at zero
    /// instead of computed, since nothing reads them.
    /// </summary>
    public bool[] Held { get; set; } = [];

    private bool IsHeld(int free) => Held.Length > free && Held[free];

    /// <summary>
    /// Scale and baseline columns are exact (the model is linear in them). Shift, coupling, common width, offset and
    /// phase (both orders) columns are analytic when the engine can give line derivatives (<see cref="AnalyticColumns"/>); otherwise,
    /// and for widths per entry, they are central differences of the model (which for widths, offsets and phases reuse
    /// the cached line lists).
    /// </summary>
    public bool TryJacobian(ReadOnlySpan<double> parameters, ReadOnlySpan<double> residuals, double[,] jacobian)
    {
        var x = parameters.ToArray();
        var full = _layout.Expand(x);
        var differenced = new List<int>();
        var analytic = new List<int>();
        for (var f = 0; f < x.Length; f++)
        {
            var members = _layout.MembersOf(f).Select(i => _layout.Parameters[i]).ToArray();
            if (IsHeld(f))
            {
                for (var r = 0; r < ResidualCount; r++) jacobian[r, f] = 0;
                continue;
            }
            if (_analytic && members.All(m => ParameterKindInfo.Of(m.Kind).AnalyticColumn(m)))
            {
                analytic.Add(f);
                continue;
            }
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

        var spinFailed = false;
        if (analytic.Count > 0)
        {
            foreach (var f in analytic)
                for (var r = 0; r < ResidualCount; r++) jacobian[r, f] = 0;
            for (var d = 0; d < _data.Count && !spinFailed; d++) spinFailed = !AnalyticColumns(full, d, jacobian);
        }
        if (spinFailed) return false;

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

    /// <summary>
    /// Adds the exact derivatives of dataset <paramref name="d"/>'s model by every free shift, coupling, common width,
    /// offset and phase to <paramref name="jacobian"/>, from one engine run with line derivatives. Each line contributes
    /// dI_eff/dθ · v + I_eff dν/dθ · ∂v/∂ν for a shift or coupling θ, where v = k τ is its rendered unit-area profile
    /// (k with phase, τ the window taper) and I_eff its intensity after the weak-line fade, and I_eff ∂v/∂θ for the
    /// others. The window's dependence on intensity and width is included, so the columns are those of exactly the
    /// function <see cref="Residuals"/> evaluates. False when the system cannot be built.
    /// </summary>
    private bool AnalyticColumns(double[] full, int d, double[,] jacobian)
    {
        LineList lines;
        SpinSystem system;
        try
        {
            system = SystemAt(full, d);
            lines = SpectrumEngine.ComputeWithDerivatives(system, _engine, _derivatives);
        }
        catch (SpinSystemException) { return false; }
        var data = _data[d];
        var values = Values(full, d);
        var (offsetHz, globalWidth) = (values.OffsetHz, values.GlobalWidth);
        if (!(globalWidth > 0)) return false;
        // The per-trace terms with a column of their own, in the order of their slots after the spin derivatives.
        var terms = LineTerms.Select(k => Column(values.SourceOf(k))).ToArray();
        var areaScale = values.Scale / _singleNucleus / data.Normalisation;
        var count = _derivatives.Length;
        // One column of the fitted points per spin derivative, then one per line term (kept between calls: at full
        // resolution it is megabytes, and the Jacobian is asked for at every accepted step).
        var slots = count + LineTerms.Length;
        var columns = _columns.Length >= data.Count * slots ? _columns : _columns = new double[data.Count * slots];
        Array.Clear(columns, 0, data.Count * slots);
        var work = _workspace;
        var a = new double[count];
        var b = new double[count];
        var c = new double[count];
        var active = new int[count];
        // Only the derivatives of free, unheld values are needed.
        var wanted = new bool[count];
        foreach (var i in _spinParameters)
            if (Column(i) >= 0) wanted[_derivativeOf[i]] = true;
        // A line whose intensity and moment move by less than this (per Hz of the parameter) is left out of a column:
        // 1e-9 of one nucleus's line, far below anything the minimiser or the covariance can see.
        var negligible = 1e-9 * _singleNucleus;
        var profile = _shape.Profile(globalWidth, _broadeningHz);
        var wantedTerms = new LineTermsWanted(terms[0] >= 0, terms[2] >= 0, terms[3] >= 0);
        var others = terms.Any(t => t >= 0);
        var ramp = values.Ramp(data);
        for (var l = 0; l < lines.Lines.Count; l++)
        {
            var (effective, fade, dEffective) = Faded(lines.Lines[l].Intensity);
            if (effective == 0) continue;
            // Window half-width R = cutoff(I_eff) (L + G), with cutoff = 100 sqrt(I_eff / single) between its limits.
            var share = effective / _singleNucleus;
            var cutoff = CutoffFor(effective);
            var dReach = UncappedCutoff(effective) > MinimumCutoffWidths && share < 1 ? profile.WidthScaleHz * CutoffWidths * 0.5 / Math.Sqrt(share) / _singleNucleus : 0;
            var di = lines.Derivatives!.IntensityOf(l);
            var dm = lines.Derivatives.MomentOf(l);
            var activeCount = 0;
            for (var g = 0; g < count; g++)
            {
                if (!wanted[g] || (Math.Abs(di[g]) < negligible && Math.Abs(dm[g]) < negligible)) continue;
                a[activeCount] = areaScale * dEffective * di[g];
                b[activeCount] = -areaScale * fade * dm[g];
                c[activeCount] = a[activeCount] * effective * dReach;
                active[activeCount++] = g;
            }
            if (activeCount == 0 && !others) continue;
            var centreHz = lines.Lines[l].FrequencyHz + offsetHz;
            AddLineDerivatives(data.Hz, columns, count, centreHz, cutoff, profile, ramp.At(centreHz), ramp, wantedTerms,
                active.AsSpan(0, activeCount), a, b, c, areaScale * effective, work);
        }

        // Chain rule to the free values: a shift in ppm moves its entry by the entry's observe frequency in Hz.
        var row0 = _offsets[d];
        foreach (var i in _spinParameters)
        {
            var f = Column(i);
            if (f < 0) continue;
            var p = _layout.Parameters[i];
            var factor = p.Kind == ParameterKind.ShiftPpm ? system.Nuclei[p.Index].Isotope.ObserveMHz(system.Field) : 1.0;
            var g = _derivativeOf[i];
            for (var k = 0; k < data.Count; k++) jacobian[row0 + k, f] += factor * columns[g * data.Count + k];
        }
        for (var t = 0; t < terms.Length; t++)
            if (terms[t] >= 0)
                for (var k = 0; k < data.Count; k++) jacobian[row0 + k, terms[t]] += columns[(count + t) * data.Count + k];
        return true;
    }

    /// <summary>The per-trace terms that act on each line and have analytic columns: width, offset, phase, phase slope.</summary>
    private static readonly ParameterKind[] LineTerms =
        [ParameterKind.LinewidthHz, ParameterKind.OffsetHz, ParameterKind.PhaseDeg, ParameterKind.PhaseDegPerPpm];

    private readonly record struct LineTermsWanted(bool Width, bool Phase, bool PhaseSlope);

    /// <summary>The Jacobian column of full parameter <paramref name="index"/>: its free index, or -1 when it is absent, fixed or held.</summary>
    private int Column(int index) => index >= 0 && _layout.FreeIndexOf(index) is var f && f >= 0 && !IsHeld(f) ? f : -1;

    /// <summary>
    /// For one line at <paramref name="centreHz"/> whose rendered profile is v = k(x - centre, φ(centre)) τ(|x - centre|, R)
    /// (k of unit area with phase, φ the phase ramp's value at the centre, τ the taper of <see cref="AddLine"/>, R its
    /// window's half-width): with v_x = -∂v/∂centre (which includes the ramp's turn of the phase as the line moves), adds
    /// a_n v + b_n v_x + c_n ∂v/∂R to the column of spin derivative <paramref name="active"/>[n], and e ∂v/∂w, -e v_x,
    /// e ∂v/∂φ (per degree) and e ∂v/∂φ · lever (per degree per ppm) to the width, offset, phase and phase-slope columns,
    /// over the line's window. <paramref name="columns"/> holds one column of the fitted points per slot (spin
    /// derivatives, then <see cref="LineTerms"/>).
    /// </summary>
    private static void AddLineDerivatives(double[] hz, double[] columns, int slots, double centreHz, double cutoff, LineProfile q,
        PhaseRotation phase, PhaseRamp ramp, LineTermsWanted wanted, ReadOnlySpan<int> active, double[] a, double[] b, double[] c, double e, Workspace work)
    {
        var reach = q.WindowHz(cutoff);
        var first = LowerBound(hz, centreHz - reach);
        var last = LowerBound(hz, centreHz + reach);
        var length = last - first;
        if (length <= 0) return;
        var points = hz.Length;
        var taperStart = TaperStart * reach;
        var v = work.V(length);
        var vx = work.Vx(length);
        var vr = work.Vr(length);
        var vw = work.Vw(length);
        var vp = work.Vp(length);
        var tapered = false;
        // Radians of phase per Hz the line moves; the phase derivative is needed for it and for either phase column.
        var turnPerHz = ramp.DegPerHz * (Math.PI / 180);
        var byPhaseWanted = wanted.Phase || wanted.PhaseSlope || turnPerHz != 0;
        for (var j = 0; j < length; j++)
        {
            var dx = hz[first + j] - centreHz;
            var (k, slope, byWidth, byPhase) = q.Slopes(dx, phase, wanted.Width, byPhaseWanted);
            var distance = Math.Abs(dx);
            double taper = 1, taperByDistance = 0, taperByReach = 0;
            if (distance > taperStart)
            {
                var t = (distance - taperStart) / (reach - taperStart);
                var smoothSlope = 6 * t * (1 - t);
                taper = 1 - SmoothStep(t);
                taperByDistance = -smoothSlope / (reach - taperStart);
                taperByReach = smoothSlope * 5 * distance / (reach * reach);
                tapered = true;
            }
            v[j] = k * taper;
            vx[j] = slope * taper + k * taperByDistance * Math.Sign(dx) - byPhase * taper * turnPerHz;
            vr[j] = k * taperByReach;
            vw[j] = byWidth * taper + vr[j] * cutoff * q.WidthScalePerWidth;
            vp[j] = byPhase * taper * (Math.PI / 180);
        }
        for (var n = 0; n < active.Length; n++)
        {
            var column = columns.AsSpan(active[n] * points + first, length);
            SmallDense.AddScaled(column, a[n], v, b[n], vx);
            if (tapered && c[n] != 0) SmallDense.AddScaled(column, c[n], vr, 0, vr);
        }
        if (wanted.Width) SmallDense.AddScaled(columns.AsSpan(slots * points + first, length), e, vw, 0, vw);
        SmallDense.AddScaled(columns.AsSpan((slots + 1) * points + first, length), -e, vx, 0, vx);
        if (wanted.Phase) SmallDense.AddScaled(columns.AsSpan((slots + 2) * points + first, length), e, vp, 0, vp);
        if (wanted.PhaseSlope) SmallDense.AddScaled(columns.AsSpan((slots + 3) * points + first, length), e * ramp.LeverPpm(centreHz), vp, 0, vp);
    }

    /// <summary>Scratch profiles of one line, reused from line to line.</summary>
    private sealed class Workspace
    {
        private double[] _v = [], _vx = [], _vr = [], _vw = [], _vp = [];
        public Span<double> V(int n) => Ensure(ref _v, n);
        public Span<double> Vx(int n) => Ensure(ref _vx, n);
        public Span<double> Vr(int n) => Ensure(ref _vr, n);
        public Span<double> Vw(int n) => Ensure(ref _vw, n);
        public Span<double> Vp(int n) => Ensure(ref _vp, n);

        private static Span<double> Ensure(ref double[] array, int n)
        {
            if (array.Length < n) array = new double[Math.Max(n, 2 * array.Length)];
            return array.AsSpan(0, n);
        }
    }

    private double[] Baseline(double[] full, int d)
    {
        var b = new double[_data[d].Count];
        AddBaseline(_data[d], Values(full, d).Baseline, b);
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
        var v = Values(full, d);
        var areaScale = v.Scale / _singleNucleus / data.Normalisation;
        var ramp = v.Ramp(data);
        y.Clear();
        for (var l = 0; l < lines.Lines.Count; l++)
        {
            var width = v.PerEntryWidthOrNull is { } perEntry ? lines.WeightedByOrigin(l, perEntry) : v.GlobalWidth;
            if (!(width > 0)) return false;
            var (effective, _, _) = Faded(lines.Lines[l].Intensity);
            if (effective == 0) continue;
            var centreHz = lines.Lines[l].FrequencyHz + v.OffsetHz;
            AddLine(data.Hz, y, centreHz, effective * areaScale, width, CutoffFor(effective), ramp.At(centreHz));
        }
        AddBaseline(data, v.Baseline, y);
        return true;
    }

    /// <summary>
    /// The values that shape trace <paramref name="d"/> at <paramref name="full"/>: each parameter of that trace (or
    /// shared) enters as its kind says, and the full index of each analytic per-trace value is kept for its column.
    /// </summary>
    private TraceState Values(double[] full, int d)
    {
        var state = new TraceState(_system.Nuclei.Count);
        for (var i = 0; i < full.Length; i++)
        {
            var p = _layout.Parameters[i];
            if (p.Dataset >= 0 && p.Dataset != d) continue;
            var info = ParameterKindInfo.Of(p.Kind);
            if (info.EntersTrace is null) continue;
            info.EntersTrace(state, p, full[i]);
            if (info.AnalyticColumn(p)) state.Sources[p.Kind] = i;
        }
        state.CompletePerEntryWidths();
        return state;
    }

    /// <summary>
    /// The intensity a line is drawn with: none below <see cref="NegligibleIntensity"/> of one nucleus, faded in by a
    /// smooth step s up to ten times that, in full above; with s and dI_eff/dI = s + I s'(I) for the derivatives.
    /// </summary>
    private (double Effective, double Fade, double Slope) Faded(double intensity)
    {
        var relative = intensity / _singleNucleus;
        if (relative < NegligibleIntensity) return (0, 0, 0);
        if (relative >= 10 * NegligibleIntensity) return (intensity, 1, 1);
        var t = (10 * NegligibleIntensity - relative) / (9 * NegligibleIntensity);
        var fade = 1 - SmoothStep(t);
        return (intensity * fade, fade, fade + intensity * 6 * t * (1 - t) / (9 * NegligibleIntensity * _singleNucleus));
    }

    /// <summary>Half-width of a line's window in linewidths, for a line drawn with intensity <paramref name="effective"/> (see <see cref="CutoffWidths"/>).</summary>
    private double CutoffFor(double effective) => Math.Max(MinimumCutoffWidths, UncappedCutoff(effective));

    private double UncappedCutoff(double effective) => CutoffWidths * Math.Sqrt(Math.Min(1, effective / _singleNucleus));

    private void AddLine(double[] hz, Span<double> y, double centreHz, double area, double widthHz, double cutoffWidths, PhaseRotation phase)
    {
        var profile = _shape.Profile(widthHz, _broadeningHz);
        var reach = profile.WindowHz(cutoffWidths);
        var first = LowerBound(hz, centreHz - reach);
        var last = LowerBound(hz, centreHz + reach);
        var taper = TaperStart * reach;
        // The core of the window needs no taper; only the two outer bands do.
        var coreFirst = LowerBound(hz, centreHz - taper);
        var coreLast = LowerBound(hz, centreHz + taper);
        for (var i = coreFirst; i < coreLast; i++)
            y[i] += area * profile.Phased(hz[i] - centreHz, phase);
        for (var i = first; i < coreFirst; i++)
        {
            var dx = hz[i] - centreHz;
            y[i] += area * profile.Phased(dx, phase) * Taper(-dx, taper, reach);
        }
        for (var i = coreLast; i < last; i++)
        {
            var dx = hz[i] - centreHz;
            y[i] += area * profile.Phased(dx, phase) * Taper(dx, taper, reach);
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

    /// <summary>The system with the spin values of <paramref name="full"/>, at the field of dataset <paramref name="d"/>.</summary>
    private SpinSystem SystemAt(double[] full, int d) =>
        _layout.ApplySpin(_system, full).WithField(new Units.FieldMHz(_data[d].ObserveMHz / _system.Observed.FrequencyRatioPercent * 100));

    private LineList LinesFor(double[] full, int d)
    {
        var key = string.Join(",", _spinParameters.Select(i => BitConverter.DoubleToInt64Bits(full[i])));
        var cache = _cache[d];
        if (cache.TryGetValue(key, out var cached)) return cached;
        var lines = SpectrumEngine.Compute(SystemAt(full, d), _engine);
        if (cache.Count > 256) cache.Clear();
        cache[key] = lines;
        return lines;
    }
}
