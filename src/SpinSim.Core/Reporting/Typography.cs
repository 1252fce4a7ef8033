using System.Globalization;

namespace SpinSim.Core.Reporting;

/// <summary>The typeset forms that papers use and plain text lacks: the minus sign, mass numbers, counts.</summary>
public static class Typography
{
    /// <summary>U+2212, the minus sign of typeset text; a hyphen-minus reads as a dash in print.</summary>
    public const char Minus = '\u2212';

    /// <summary>U+2032, the prime of AA′BB′ and of the id HA′.</summary>
    public const char Prime = '\u2032';

    /// <summary>Hyphen-minus signs of <paramref name="text"/> (a formatted number) replaced by the true minus sign.</summary>
    public static string TrueMinus(string text) => text.Replace('-', Minus);

    /// <summary>"1H" as "¹H": mass numbers are written as superscripts.</summary>
    public static string Isotope(string symbol)
    {
        var digits = symbol.TakeWhile(char.IsAsciiDigit).Count();
        return string.Concat(symbol[..digits].Select(c => "⁰¹²³⁴⁵⁶⁷⁸⁹"[c - '0'])) + symbol[digits..];
    }

    /// <summary>A count as subscript digits, "₂".</summary>
    public static string Subscript(int n) => string.Concat(n.ToString(CultureInfo.InvariantCulture).Select(c => "₀₁₂₃₄₅₆₇₈₉"[c - '0']));

    /// <summary>An id written with an ASCII apostrophe ("HA'") with the prime instead ("HA′").</summary>
    public static string Primes(string id) => id.Replace('\'', Prime);
}
