// Rounding of a value to its standard uncertainty: ISO GUM (JCGM 100:2008) 7.2.2 (concise notation) and 7.2.6 (at most two significant digits of the uncertainty).
using System.Globalization;

namespace SpinSim.Core.Reporting;

/// <summary>
/// A value with its standard uncertainty, written the way papers write it: the uncertainty rounded to one or two
/// significant digits and the value rounded to the same decimal place, the uncertainty in parentheses standing for the
/// last digits ("7.3520(1)" means 7.3520 ± 0.0001). Every table, figure, report and data line formats through here.
/// </summary>
/// <remarks>
/// How many digits the uncertainty keeps: the GUM asks for at most two (7.2.6). Which of one or two follows the common
/// practice of the Particle Data Group's rounding rule (recalled from memory, Review of Particle Physics, introduction):
/// the three leading digits of the uncertainty from 100 to 354 keep two digits, 355 to 949 keep one, and 950 to 999
/// round up to 1000 and keep two ("0.0097" becomes "0.010").
/// </remarks>
public readonly record struct UncertainValue(double Value, double Uncertainty)
{
    /// <summary>True when the uncertainty is a finite positive number, so rounding can follow it.</summary>
    public bool HasUncertainty => double.IsFinite(Uncertainty) && Uncertainty > 0;

    /// <summary>
    /// Decimal places the value is rounded to: where the last kept digit of the uncertainty stands. Negative for
    /// uncertainties of 10 or more when the rounding lands left of the decimal point (tens, hundreds).
    /// Null when there is no usable uncertainty.
    /// </summary>
    public int? Decimals
    {
        get
        {
            if (!HasUncertainty) return null;
            var (digits, exponent) = Significant(Uncertainty);
            return digits - 1 - exponent;
        }
    }

    /// <summary>
    /// The concise form "7.3520(1)"; without an uncertainty, the value with <paramref name="fallbackDecimals"/> places.
    /// Uses the hyphen-minus unless <paramref name="trueMinus"/>.
    /// </summary>
    public string Concise(int fallbackDecimals = 4, bool trueMinus = false)
    {
        if (!double.IsFinite(Value)) return Value.ToString(CultureInfo.InvariantCulture);
        if (Decimals is not { } places) return Minus(Round(Value, fallbackDecimals), trueMinus);
        // The bracket holds the uncertainty in units of the value's last digit; left of the decimal point it is written out.
        var digits = places is >= 0 and <= 20 && Uncertainty < 1e8
            ? (long)Math.Round((decimal)Uncertainty * (decimal)Math.Pow(10, places), MidpointRounding.AwayFromZero)
            : (long)Math.Round(Uncertainty * Math.Pow(10, places), MidpointRounding.AwayFromZero);
        if (places < 0) digits *= (long)Math.Pow(10, -places);
        return Minus(Round(Value, places), trueMinus) + "(" + digits.ToString(CultureInfo.InvariantCulture) + ")";
    }

    /// <summary>The value alone, rounded as in <see cref="Concise"/> (to its uncertainty, else <paramref name="fallbackDecimals"/>).</summary>
    public string RoundedValue(int fallbackDecimals = 4, bool trueMinus = false) =>
        Minus(Round(Value, Decimals ?? fallbackDecimals), trueMinus);

    /// <summary>The uncertainty alone, rounded to its one or two significant digits ("0.0017"); empty without one.</summary>
    public string RoundedUncertainty()
    {
        return Decimals is { } places ? Round(Uncertainty, places) : "";
    }

    /// <summary><paramref name="value"/> rounded to <paramref name="decimals"/> places (negative: to tens, hundreds), invariant culture.</summary>
    public static string Round(double value, int decimals)
    {
        // Through decimal, which holds the shortest decimal form of the double: 8.45 rounds to 8.5 as written,
        // not to 8.4 as its binary neighbour 8.4499999... would.
        if (decimals >= 0 && Math.Abs(value) < 1e15)
            return Math.Round((decimal)value, Math.Min(decimals, 15), MidpointRounding.AwayFromZero).ToString("F" + Math.Min(decimals, 15), CultureInfo.InvariantCulture);
        if (decimals >= 0) return value.ToString("F" + Math.Min(decimals, 15), CultureInfo.InvariantCulture);
        var unit = Math.Pow(10, -decimals);
        return (Math.Round(value / unit, MidpointRounding.AwayFromZero) * unit).ToString("F0", CultureInfo.InvariantCulture);
    }

    private static string Minus(string text, bool trueMinus) => trueMinus ? Typography.TrueMinus(text) : text;

    // Significant digits kept (1 or 2) and the decimal exponent of the leading digit after rounding.
    private static (int Digits, int Exponent) Significant(double u)
    {
        var exponent = (int)Math.Floor(Math.Log10(u));
        var leading = (int)Math.Round(u / Math.Pow(10, exponent - 2), MidpointRounding.AwayFromZero);
        if (leading >= 1000) { exponent++; leading /= 10; } // 9.996e-3 read as 1000e-5
        if (leading <= 354) return (2, exponent);
        if (leading <= 949) return (1, exponent);
        return (2, exponent + 1);
    }
}
