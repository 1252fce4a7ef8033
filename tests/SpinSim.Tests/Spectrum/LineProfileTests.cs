using SpinSim.Core.Spectrum;

namespace SpinSim.Tests.Spectrum;

/// <summary>The one line profile: dispersion against closed forms, derivatives against central differences, names.</summary>
public class LineProfileTests
{
    public static TheoryData<string, double, double> Shapes => new()
    {
        { "lorentzian", 0.5, 0 },
        { "lorentzian", 0.5, 1.3 },
        { "gaussian", 0.5, 0 },
        { "voigt", 0.5, 0 },
        { "voigt", 0.2, 0.7 },
    };

    [Fact]
    public void LorentzianDispersion_IsTheClosedForm()
    {
        // Source: the Lorentzian dispersion (1/pi) x / (x^2 + (G/2)^2), the imaginary part of i / (pi (x + iG/2)) (closed form).
        var profile = Lineshape.Lorentzian.Profile(1.4);
        foreach (var x in new[] { -3.0, -0.2, 0, 0.5, 40 })
            Assert.Equal(x / Math.PI / (x * x + 0.49), profile.Dispersion(x), 1e-15);
    }

    [Fact]
    public void GaussianDispersion_IsDawsonsIntegral()
    {
        // Source: for a real argument Im w(x) = (2 / sqrt(pi)) F(x), F Dawson's integral; F(1) = 0.5380795069127684
        // (Abramowitz and Stegun, table 7.5; value from memory, confirmed with mpmath.erfi: F(x) = sqrt(pi)/2 exp(-x^2) erfi(x)).
        var profile = Lineshape.Gaussian.Profile(2.0);
        var sigma = Lineshape.GaussianSigmaHz(2.0);
        var expected = 2 / Math.Sqrt(Math.PI) * 0.5380795069127684 / (sigma * Math.Sqrt(2 * Math.PI));
        Assert.Equal(expected, profile.Dispersion(sigma * Math.Sqrt(2)), 1e-14);
    }

    [Theory]
    [MemberData(nameof(Shapes))]
    public void AbsorptionAndPhased_AgreeWithTheComplexProfile(string name, double share, double broadeningHz)
    {
        // Exact invariant: A and the phased profile are the real part of e^(i phi) (A + i D).
        Assert.True(Lineshape.TryParse(name, share, out var shape));
        var profile = shape.Profile(1.1, broadeningHz);
        var tabulated = shape.Profile(1.1, broadeningHz, tabulated: true);
        var phase = PhaseRotation.FromDegrees(23);
        foreach (var x in new[] { -7.0, -0.9, 0, 0.3, 2.2, 150 })
        {
            var value = profile.At(x);
            var scale = profile.At(0).Real;
            Assert.Equal(value.Real, profile.Absorption(x), 1e-15 * scale);
            Assert.Equal(value.Real, tabulated.Absorption(x), 1e-13 * scale);
            Assert.Equal(value.Real * phase.Cos - value.Imaginary * phase.Sin, profile.Phased(x, phase), 1e-15 * scale);
            Assert.Equal(profile.Phased(x, phase), profile.Slopes(x, phase, true, true).Value, 1e-15 * scale);
        }
    }

    [Theory]
    [MemberData(nameof(Shapes))]
    public void Slopes_AgreeWithCentralDifferences(string name, double share, double broadeningHz)
    {
        // Exact invariant: each derivative is the limit of the difference quotient; central differences with step 1e-5
        // are good to about 1e-9 of the peak here.
        Assert.True(Lineshape.TryParse(name, share, out var shape));
        const double width = 1.1, phaseDeg = 23, h = 1e-5;
        var phase = PhaseRotation.FromDegrees(phaseDeg);
        var profile = shape.Profile(width, broadeningHz);
        var peak = Math.Abs(profile.At(0).Real);
        foreach (var x in new[] { -4.0, -0.7, 0, 0.25, 1.9, 30 })
        {
            var slopes = profile.Slopes(x, phase, true, true);
            var byOffset = (profile.Phased(x + h, phase) - profile.Phased(x - h, phase)) / (2 * h);
            var byWidth = (shape.Profile(width + h, broadeningHz).Phased(x, phase) - shape.Profile(width - h, broadeningHz).Phased(x, phase)) / (2 * h);
            var hr = h * 180 / Math.PI;
            var byPhase = (profile.Phased(x, PhaseRotation.FromDegrees(phaseDeg + hr)) - profile.Phased(x, PhaseRotation.FromDegrees(phaseDeg - hr))) / (2 * h);
            Assert.True(Math.Abs(slopes.ByOffset - byOffset) < 1e-8 * peak, $"{shape} at {x}: by offset {slopes.ByOffset} vs {byOffset}");
            Assert.True(Math.Abs(slopes.ByWidth - byWidth) < 1e-8 * peak, $"{shape} at {x}: by width {slopes.ByWidth} vs {byWidth}");
            Assert.True(Math.Abs(slopes.ByPhase - byPhase) < 1e-8 * peak, $"{shape} at {x}: by phase {slopes.ByPhase} vs {byPhase}");
        }
    }

    [Fact]
    public void Names_ParseInAnyCase_AndListEveryShape()
    {
        Assert.Equal(["lorentzian", "gaussian", "voigt"], Lineshape.Names);
        Assert.Equal("lorentzian, gaussian or voigt", Lineshape.NameList);
        foreach (var name in Lineshape.Names)
        {
            Assert.True(Lineshape.TryParse(name.ToUpperInvariant(), 0.3, out var shape));
            Assert.Equal(name, shape.Name);
        }
        Assert.True(Lineshape.TryParse("voigt", 0.3, out var voigt));
        Assert.Equal(0.3, voigt.GaussianShare);
        Assert.False(Lineshape.TryParse("cauchy", 0.5, out _));
        Assert.False(Lineshape.TryParse(null, 0.5, out _));
    }
}
