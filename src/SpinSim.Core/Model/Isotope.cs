namespace SpinSim.Core.Model;

/// <summary>
/// A spin-1/2 isotope that SpinSim can place in a spin system. Frequencies of other nuclei follow from the
/// IUPAC frequency ratios Xi (Harris et al., Pure Appl. Chem. 73, 1795, 2001), expressed as a percentage
/// of the 1H frequency of TMS in the same field.
/// </summary>
public sealed record Isotope(string Symbol, double FrequencyRatioPercent)
{
    public static readonly Isotope H1 = new("1H", 100.0);
    public static readonly Isotope C13 = new("13C", 25.145020);
    public static readonly Isotope N15 = new("15N", 10.136767);
    public static readonly Isotope F19 = new("19F", 94.094011);
    public static readonly Isotope P31 = new("31P", 40.480742);

    public static IReadOnlyList<Isotope> Known { get; } = [H1, C13, N15, F19, P31];

    /// <summary>Accepts "1H", "H1", "h", "19F", "F19", "fluorine-19" style spellings (case-insensitive).</summary>
    public static bool TryParse(string text, out Isotope isotope)
    {
        var key = new string(text.Where(char.IsLetterOrDigit).ToArray()).ToUpperInvariant();
        isotope = key switch
        {
            "1H" or "H1" or "H" or "PROTON" => H1,
            "13C" or "C13" => C13,
            "15N" or "N15" => N15,
            "19F" or "F19" or "FLUORINE19" => F19,
            "31P" or "P31" or "PHOSPHORUS31" => P31,
            _ => null!,
        };
        return isotope is not null;
    }

    /// <summary>Observe frequency of this isotope in MHz at a field stated as the 1H frequency.</summary>
    public double ObserveMHz(Units.FieldMHz field) => field.Value * FrequencyRatioPercent / 100.0;

    public override string ToString() => Symbol;
}
