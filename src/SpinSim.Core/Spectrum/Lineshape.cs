// Voigt width: J. J. Olivero and R. L. Longbothum, J. Quant. Spectrosc. Radiat. Transfer 17, 233 (1977).
namespace SpinSim.Core.Spectrum;

/// <summary>The profile of a single line.</summary>
public enum LineshapeKind
{
    /// <summary>Lifetime (T2) broadening: the natural NMR lineshape.</summary>
    Lorentzian,

    /// <summary>Inhomogeneous broadening, or a Gaussian apodisation.</summary>
    Gaussian,

    /// <summary>A Lorentzian convolved with a Gaussian; see <see cref="Lineshape.Voigt"/> for how one width is split.</summary>
    Voigt,
}

/// <summary>
/// An area-normalised line profile whose width is always the total full width at half maximum (FWHM) in Hz,
/// the width one reads off a spectrum. Densities are in 1/Hz: a line of area A contributes A x density.
/// </summary>
/// <remarks>
/// A Voigt line has two component widths, Lorentzian f_L and Gaussian f_G. It is described here by its
/// total FWHM f_V and its Gaussian share s = f_G / (f_L + f_G): s = 0 is a pure Lorentzian, s = 1 a pure
/// Gaussian, and the default s = 1/2 gives equal components. The components are chosen so that the total
/// FWHM by Olivero and Longbothum, f_V = 0.5346 f_L + sqrt(0.2166 f_L^2 + f_G^2), equals the width asked
/// for; the true Voigt FWHM then matches it to about their stated 0.02 % (0.024 % at worst, near
/// f_L / f_G = 0.3, by the tests' root-finding and an mpmath check). For s = 1/2, f_L = f_G = f_V / 1.6376.
/// </remarks>
public sealed record Lineshape
{
    /// <summary>Gaussian share giving equal Lorentzian and Gaussian component widths: the default Voigt.</summary>
    public const double EqualComponents = 0.5;

    // 2 sqrt(2 ln 2): FWHM over sigma of a Gaussian.
    private static readonly double FwhmPerSigma = 2 * Math.Sqrt(2 * Math.Log(2));
    private static readonly double SqrtTwoPi = Math.Sqrt(2 * Math.PI);
    private static readonly double Sqrt2 = Math.Sqrt(2);

    private Lineshape(LineshapeKind kind, double gaussianShare)
    {
        Kind = kind;
        GaussianShare = gaussianShare;
    }

    public LineshapeKind Kind { get; }

    /// <summary>f_G / (f_L + f_G): 0 for a Lorentzian, 1 for a Gaussian, between for a Voigt.</summary>
    public double GaussianShare { get; }

    public static Lineshape Lorentzian { get; } = new(LineshapeKind.Lorentzian, 0);

    public static Lineshape Gaussian { get; } = new(LineshapeKind.Gaussian, 1);

    /// <summary>A Voigt profile with the given Gaussian share f_G / (f_L + f_G), from 0 to 1.</summary>
    /// <exception cref="ArgumentOutOfRangeException">The share is outside [0, 1] or not a number.</exception>
    public static Lineshape Voigt(double gaussianShare = EqualComponents) =>
        gaussianShare is >= 0 and <= 1
            ? new(LineshapeKind.Voigt, gaussianShare)
            : throw new ArgumentOutOfRangeException(nameof(gaussianShare), gaussianShare,
                "the Gaussian share f_G / (f_L + f_G) must lie between 0 (Lorentzian) and 1 (Gaussian)");

    /// <summary>The names by which files and command options choose a lineshape, in the order they are listed.</summary>
    public static IReadOnlyList<string> Names { get; } = ["lorentzian", "gaussian", "voigt"];

    /// <summary>The names as a phrase for help texts and error messages: "lorentzian, gaussian or voigt".</summary>
    public static string NameList => string.Join(", ", Names.Take(Names.Count - 1)) + " or " + Names[^1];

    /// <summary>This shape's name in <see cref="Names"/>.</summary>
    public string Name => Names[(int)Kind];

    /// <summary>
    /// The lineshape called <paramref name="name"/> (one of <see cref="Names"/>, any case); a Voigt gets
    /// <paramref name="gaussianShare"/>. False for any other name.
    /// </summary>
    public static bool TryParse(string? name, double gaussianShare, out Lineshape shape)
    {
        var index = Names.ToList().FindIndex(n => string.Equals(n, name?.Trim(), StringComparison.OrdinalIgnoreCase));
        shape = index < 0 ? Lorentzian : (LineshapeKind)index == LineshapeKind.Voigt ? Voigt(gaussianShare) : FromKind((LineshapeKind)index);
        return index >= 0;
    }

    /// <summary>The profile of a line of total FWHM <paramref name="fwhmHz"/>, with <paramref name="extraLorentzianHz"/> of Lorentzian broadening added.</summary>
    /// <param name="tabulated">Evaluate a Voigt's absorption from the shared table (<see cref="VoigtKernel"/>, 1e-13 of the peak) rather than the Faddeeva function: for drawing many points.</param>
    public LineProfile Profile(double fwhmHz, double extraLorentzianHz = 0, bool tabulated = false) =>
        new(this, fwhmHz, extraLorentzianHz, tabulated);

    /// <summary>The profile for a kind alone; a Voigt gets equal Lorentzian and Gaussian components.</summary>
    public static Lineshape FromKind(LineshapeKind kind) => kind switch
    {
        LineshapeKind.Lorentzian => Lorentzian,
        LineshapeKind.Gaussian => Gaussian,
        LineshapeKind.Voigt => Voigt(),
        _ => throw new ArgumentOutOfRangeException(nameof(kind), kind, "unknown lineshape"),
    };

    /// <summary>The Lorentzian and Gaussian component FWHMs, in Hz, of a line whose total FWHM is <paramref name="fwhmHz"/>.</summary>
    public (double LorentzianFwhmHz, double GaussianFwhmHz) Components(double fwhmHz)
    {
        double share = GaussianShare;
        // The formula gives 1.000003 f_L for a pure Lorentzian; the pure shapes keep the width as given.
        if (share == 0) return (fwhmHz, 0);
        if (share == 1) return (0, fwhmHz);
        double l = 1 - share;
        // Olivero-Longbothum width of components (1 - s, s).
        double unitWidth = 0.5346 * l + Math.Sqrt(0.2166 * l * l + share * share);
        double scale = fwhmHz / unitWidth;
        return (l * scale, share * scale);
    }

    /// <summary>The profile at <paramref name="offsetHz"/> from the line centre, in 1/Hz, for total FWHM <paramref name="fwhmHz"/>.</summary>
    public double DensityPerHz(double offsetHz, double fwhmHz) => Profile(fwhmHz).Absorption(offsetHz);

    /// <summary>Im z = f_L / (2 sigma sqrt 2) = sqrt(ln 2) f_L / f_G of a Voigt, the same for every width.</summary>
    internal double VoigtReducedLorentzianWidth => Math.Sqrt(Math.Log(2)) * (1 - GaussianShare) / GaussianShare;

    public override string ToString() =>
        Kind == LineshapeKind.Voigt ? $"Voigt (Gaussian share {GaussianShare:0.###})" : Kind.ToString();

    /// <summary>(1/pi) (G/2) / (offset^2 + (G/2)^2) for FWHM G, in 1/Hz.</summary>
    public static double LorentzianDensityPerHz(double offsetHz, double fwhmHz) => Lorentzian.Profile(fwhmHz).Absorption(offsetHz);

    /// <summary>exp(-offset^2 / (2 sigma^2)) / (sigma sqrt(2 pi)), sigma = FWHM / (2 sqrt(2 ln 2)), in 1/Hz.</summary>
    public static double GaussianDensityPerHz(double offsetHz, double fwhmHz) => Gaussian.Profile(fwhmHz).Absorption(offsetHz);

    /// <summary>
    /// The Voigt profile Re w(z) / (sigma sqrt(2 pi)), z = (offset + i f_L / 2) / (sigma sqrt 2), in 1/Hz,
    /// from its component FWHMs in Hz. Either component may be zero, not both.
    /// </summary>
    public static double VoigtDensityPerHz(double offsetHz, double lorentzianFwhmHz, double gaussianFwhmHz) =>
        VoigtDensityPerHz(offsetHz, (lorentzianFwhmHz, gaussianFwhmHz));

    /// <summary>Olivero and Longbothum's total FWHM of a Voigt profile in Hz, good to 0.02 % as they state (0.024 % at worst as checked here).</summary>
    public static double OliveroLongbothumFwhmHz(double lorentzianFwhmHz, double gaussianFwhmHz) =>
        0.5346 * lorentzianFwhmHz + Math.Sqrt(0.2166 * lorentzianFwhmHz * lorentzianFwhmHz + gaussianFwhmHz * gaussianFwhmHz);

    /// <summary>The standard deviation, in Hz, of a Gaussian of the given FWHM.</summary>
    public static double GaussianSigmaHz(double fwhmHz) => fwhmHz / FwhmPerSigma;

    private static double VoigtDensityPerHz(double offsetHz, (double LorentzianFwhmHz, double GaussianFwhmHz) widths)
    {
        var (lorentzian, gaussian) = widths;
        if (gaussian == 0) return LorentzianDensityPerHz(offsetHz, lorentzian);
        if (lorentzian == 0) return GaussianDensityPerHz(offsetHz, gaussian);
        double sigma = GaussianSigmaHz(gaussian);
        double scale = 1 / (sigma * Sqrt2);
        return Faddeeva.RealPart(offsetHz * scale, 0.5 * lorentzian * scale) / (sigma * SqrtTwoPi);
    }
}
