// Faddeeva derivative w'(z) = -2z w(z) + 2i/sqrt(pi): M. Abramowitz and I. A. Stegun, Handbook of Mathematical Functions, 7.1.20 (numbered from memory).
using System.Numerics;
using System.Runtime.CompilerServices;

namespace SpinSim.Core.Spectrum;

/// <summary>
/// A zero-order phase phi applied to a line: the observed profile is Re[e^(i phi) (A + i D)] = A cos phi - D sin phi,
/// with A the absorption and D the dispersion.
/// </summary>
public readonly record struct PhaseRotation(double Cos, double Sin)
{
    /// <summary>No phase error: pure absorption.</summary>
    public static PhaseRotation None { get; } = new(1, 0);

    public static PhaseRotation FromDegrees(double phaseDeg)
    {
        var (sin, cos) = Math.SinCos(phaseDeg * Math.PI / 180);
        return new PhaseRotation(cos, sin);
    }

    /// <summary>Re[e^(i phi) v] for v = A + i D.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Apply(Complex value) => value.Real * Cos - value.Imaginary * Sin;

    /// <summary>d/dphi Re[e^(i phi) v] per radian, = Re[i e^(i phi) v] = -(A sin phi + D cos phi).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double ApplyByPhase(Complex value) => -(value.Real * Sin + value.Imaginary * Cos);
}

/// <summary>
/// A phased profile k(x) = Re[e^(i phi)(A + i D)](x) at one offset x from the line centre, with its derivatives; all in 1/Hz
/// (per Hz of offset or width, per radian of phase). The derivative by the line's centre is -<see cref="ByOffset"/>.
/// </summary>
public readonly record struct ProfileSlopes(double Value, double ByOffset, double ByWidth, double ByPhase);

/// <summary>
/// One line's profile: a <see cref="Lineshape"/> at one total FWHM, optionally with extra Lorentzian broadening. Gives
/// absorption and dispersion (area-normalised, in 1/Hz), their derivatives by position, width and phase, and the width
/// scale in which windows about the line are measured. Everything that draws lines (the trace synthesiser, the
/// synthetic phase error, the fit model and its analytic Jacobian) evaluates them here.
/// </summary>
/// <remarks>
/// The complex profile P = A + i D is i / (pi (x + i h)) for a Lorentzian of half-width h, and
/// w((x + i h) / (sigma sqrt 2)) / (sigma sqrt(2 pi)) with the Faddeeva function w for a Gaussian (h = 0) or Voigt,
/// so that both tend to the same far wing. Width derivatives hold the Gaussian share fixed: both components scale
/// with the width asked for, the extra broadening does not.
/// </remarks>
public readonly struct LineProfile
{
    private static readonly double TwoOverSqrtPi = 2 / Math.Sqrt(Math.PI);
    private static readonly double SqrtTwoPi = Math.Sqrt(2 * Math.PI);

    private readonly double _half;        // Lorentzian half-width, broadening included
    private readonly double _sigma;       // Gaussian standard deviation; 0 for a Lorentzian
    private readonly double _reduce;      // 1 / (sigma sqrt 2): Hz to the Faddeeva argument
    private readonly double _norm;        // 1 / (sigma sqrt(2 pi))
    private readonly double _halfPerWidth, _sigmaPerWidth;
    private readonly VoigtKernel? _kernel;

    internal LineProfile(Lineshape shape, double fwhmHz, double extraLorentzianHz, bool tabulated)
    {
        var (lorentzian, gaussian) = shape.Components(fwhmHz);
        FwhmHz = fwhmHz;
        LorentzianFwhmHz = lorentzian + extraLorentzianHz;
        GaussianFwhmHz = gaussian;
        _half = LorentzianFwhmHz / 2;
        _sigma = gaussian > 0 ? Lineshape.GaussianSigmaHz(gaussian) : 0;
        _reduce = _sigma > 0 ? 1 / (_sigma * Math.Sqrt(2)) : 0;
        _norm = _sigma > 0 ? 1 / (_sigma * SqrtTwoPi) : 0;
        _halfPerWidth = lorentzian / fwhmHz / 2;
        _sigmaPerWidth = _sigma / fwhmHz;
        WidthScalePerWidth = (lorentzian + gaussian) / fwhmHz;
        // The tabulated Voigt (real part only) serves absorption where many points of one shape are drawn.
        // Its reduced half-width depends on the share alone, so every width of one shape reuses one table.
        _kernel = tabulated && extraLorentzianHz == 0 && _sigma > 0 && _half > 0 ? VoigtKernel.For(shape.VoigtReducedLorentzianWidth) : null;
    }

    /// <summary>The total FWHM asked for, in Hz, without extra broadening.</summary>
    public double FwhmHz { get; }

    /// <summary>Lorentzian component FWHM in Hz, extra broadening included; 0 for a Gaussian.</summary>
    public double LorentzianFwhmHz { get; }

    /// <summary>Gaussian component FWHM in Hz; 0 for a Lorentzian.</summary>
    public double GaussianFwhmHz { get; }

    /// <summary>
    /// The width, in Hz, in which windows about the line are measured: the sum of the component FWHMs (at least the true
    /// FWHM), so that a window of K widths holds the far wing down to the same fraction for every shape.
    /// </summary>
    public double WidthScaleHz => LorentzianFwhmHz + GaussianFwhmHz;

    /// <summary>d(<see cref="WidthScaleHz"/>)/d(<see cref="FwhmHz"/>).</summary>
    public double WidthScalePerWidth { get; }

    /// <summary>Half-width, in Hz, of a window of <paramref name="widths"/> width scales about the centre.</summary>
    public double WindowHz(double widths) => widths * WidthScaleHz;

    /// <summary>True for a pure Gaussian, whose wings fall faster than any power (a window of a few widths holds it all).</summary>
    public bool IsGaussian => _half == 0;

    /// <summary>The Gaussian standard deviation in Hz; 0 for a Lorentzian.</summary>
    public double SigmaHz => _sigma;

    /// <summary>A + i D at <paramref name="offsetHz"/> from the centre, in 1/Hz.</summary>
    public Complex At(double offsetHz)
    {
        if (_sigma == 0)
        {
            var q = Math.PI * (offsetHz * offsetHz + _half * _half);
            return new Complex(_half / q, offsetHz / q);
        }
        return Faddeeva.W(new Complex(offsetHz * _reduce, _half * _reduce)) * _norm;
    }

    /// <summary>The absorption A (the area-normalised lineshape) at <paramref name="offsetHz"/>, in 1/Hz.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Absorption(double offsetHz)
    {
        if (_sigma == 0) return _half / (Math.PI * (offsetHz * offsetHz + _half * _half));
        var x = offsetHz * _reduce;
        if (_half == 0) return _norm * Math.Exp(-x * x);
        return _norm * (_kernel is { } kernel ? kernel.RealPart(x) : Faddeeva.RealPart(x, _half * _reduce));
    }

    /// <summary>The dispersion D at <paramref name="offsetHz"/>, in 1/Hz (odd in the offset).</summary>
    public double Dispersion(double offsetHz) => At(offsetHz).Imaginary;

    /// <summary>Re[e^(i phi)(A + i D)] at <paramref name="offsetHz"/>, in 1/Hz.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public double Phased(double offsetHz, PhaseRotation phase)
    {
        if (_sigma == 0) return (_half * phase.Cos - offsetHz * phase.Sin) / (Math.PI * (offsetHz * offsetHz + _half * _half));
        return phase.Sin == 0 ? phase.Cos * Absorption(offsetHz) : phase.Apply(At(offsetHz));
    }

    /// <summary>
    /// Adds <paramref name="scale"/> x <see cref="Phased"/> at the offsets <paramref name="firstOffsetHz"/> + j
    /// <paramref name="stepHz"/> to <paramref name="target"/>[j], for every j of the span: the drawing loop of a line's
    /// near field, vectorised (System.Numerics.Vector) for the Lorentzian, whose value is a rational function, for
    /// pure Gaussian absorption (the vector exponential), and for tabulated Voigt absorption (<see cref="VoigtKernel.AddRealPart"/>).
    /// </summary>
    public void AddPhased(Span<double> target, double firstOffsetHz, double stepHz, double scale, PhaseRotation phase)
    {
        var j = 0;
        if (_sigma == 0)
        {
            // scale (h cos - x sin) / (pi (x^2 + h^2)), as a * (b - x sin) / (x^2 + h^2) with a = scale / pi, b = h cos.
            double a = scale / Math.PI, b = _half * phase.Cos, sin = phase.Sin, h2 = _half * _half;
            var width = Vector<double>.Count;
            if (Vector.IsHardwareAccelerated && target.Length >= width)
            {
                var steps = StepRamp(stepHz);
                var (va, vb, vsin, vh2) = (new Vector<double>(a), new Vector<double>(b), new Vector<double>(sin), new Vector<double>(h2));
                for (; j <= target.Length - width; j += width)
                {
                    var x = new Vector<double>(firstOffsetHz + j * stepHz) + steps;
                    var value = va * (vb - x * vsin) / (x * x + vh2);
                    (new Vector<double>(target.Slice(j, width)) + value).CopyTo(target.Slice(j, width));
                }
            }
            for (; j < target.Length; j++)
            {
                var x = firstOffsetHz + j * stepHz;
                target[j] += a * (b - x * sin) / (x * x + h2);
            }
            return;
        }
        if (_half == 0 && phase.Sin == 0)
        {
            // Pure Gaussian absorption: scale cos norm exp(-(x reduce)^2), with the vector exponential.
            double a = scale * phase.Cos * _norm, r = _reduce;
            var width = Vector<double>.Count;
            if (Vector.IsHardwareAccelerated && target.Length >= width)
            {
                var steps = StepRamp(stepHz);
                var (va, vr) = (new Vector<double>(a), new Vector<double>(r));
                for (; j <= target.Length - width; j += width)
                {
                    var u = (new Vector<double>(firstOffsetHz + j * stepHz) + steps) * vr;
                    (new Vector<double>(target.Slice(j, width)) + va * Vector.Exp(-(u * u))).CopyTo(target.Slice(j, width));
                }
            }
            for (; j < target.Length; j++)
            {
                var u = (firstOffsetHz + j * stepHz) * r;
                target[j] += a * Math.Exp(-u * u);
            }
            return;
        }
        if (_kernel is { } kernel && phase.Sin == 0)
        {
            // Tabulated Voigt absorption: scale cos norm Re w((x + i h) reduce), vectorised in the kernel.
            kernel.AddRealPart(target, firstOffsetHz * _reduce, stepHz * _reduce, scale * phase.Cos * _norm);
            return;
        }
        for (; j < target.Length; j++) target[j] += scale * Phased(firstOffsetHz + j * stepHz, phase);
    }

    /// <summary>0, step, 2 step, ... across one vector: the offsets of a vector's points from its first.</summary>
    private static Vector<double> StepRamp(double stepHz)
    {
        Span<double> ramp = stackalloc double[Vector<double>.Count];
        for (var k = 0; k < ramp.Length; k++) ramp[k] = k * stepHz;
        return new Vector<double>(ramp);
    }

    /// <summary>
    /// The phased profile at <paramref name="offsetHz"/> with its derivatives by offset (always), by width (when
    /// <paramref name="byWidth"/>) and by phase per radian (when <paramref name="byPhase"/>; otherwise those are 0).
    /// </summary>
    public ProfileSlopes Slopes(double offsetHz, PhaseRotation phase, bool byWidth, bool byPhase)
    {
        double dx = offsetHz, cos = phase.Cos, sin = phase.Sin;
        if (_sigma == 0)
        {
            // k = (h cos - x sin) / (pi (x^2 + h^2)).
            var q2 = dx * dx + _half * _half;
            var numerator = _half * cos - dx * sin;
            var k = numerator / (Math.PI * q2);
            var slope = (-sin * q2 - 2 * dx * numerator) / (Math.PI * q2 * q2);
            var width = byWidth ? (cos * q2 - 2 * _half * numerator) / (Math.PI * q2 * q2) * _halfPerWidth : 0;
            var turn = byPhase ? -(_half * sin + dx * cos) / (Math.PI * q2) : 0;
            return new ProfileSlopes(k, slope, width, turn);
        }
        // k = Re[w e^(i phi)] / (sigma sqrt(2 pi)) with z = (x + i h) / (sigma sqrt 2).
        var z = new Complex(dx * _reduce, _half * _reduce);
        var w = Faddeeva.W(z);
        var dw = -2 * z * w + new Complex(0, TwoOverSqrtPi);
        var rotation = new Complex(cos, sin);
        var wr = w * rotation;
        var dwr = dw * rotation;
        var value = _norm * wr.Real;
        var bySlope = _norm * dwr.Real * _reduce;
        double byW = 0;
        if (byWidth)
        {
            // dz/dh = i / (sigma sqrt 2); d/d(sigma) acts on the norm (-k / sigma) and on z (-z / sigma).
            var byHalf = -_norm * dwr.Imaginary * _reduce;
            var bySigma = -value / _sigma - _norm * (dwr * z).Real / _sigma;
            byW = byHalf * _halfPerWidth + bySigma * _sigmaPerWidth;
        }
        return new ProfileSlopes(value, bySlope, byW, byPhase ? -_norm * wr.Imaginary : 0);
    }
}
