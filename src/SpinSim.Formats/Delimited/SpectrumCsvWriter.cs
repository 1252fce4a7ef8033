using System.Globalization;
using SpinSim.Core.Traces;

namespace SpinSim.Formats.Delimited;

/// <summary>
/// Writes a trace as comma-separated text with the header <c>shift_ppm,intensity</c>, points in the trace's order.
/// Comment lines (starting with '#') may come first; SpinSim's own reader skips them.
/// </summary>
public static class SpectrumCsvWriter
{
    public const string Header = "shift_ppm,intensity";

    public static void Write(SpectrumTrace trace, TextWriter writer, IEnumerable<string>? comments = null)
    {
        var inv = CultureInfo.InvariantCulture;
        foreach (var c in comments ?? []) writer.WriteLine("# " + c);
        writer.WriteLine(Header);
        for (var i = 0; i < trace.Count; i++)
        {
            writer.Write(trace.ShiftPpm[i].ToString("R", inv));
            writer.Write(',');
            writer.WriteLine(trace.Intensity[i].ToString("R", inv));
        }
    }
}
