using System.Globalization;
using SpinSim.Core.Engine;
using SpinSim.Core.Model;

namespace SpinSim.Formats.Lines;

/// <summary>
/// The transition table: header <c>frequency_hz,shift_ppm,intensity,origin</c>; frequencies relative to 0 ppm at the
/// field used; origin names the nuclei that carry at least a quarter of each line's spin flip (joined by '+').
/// </summary>
public static class LineListCsv
{
    public const string Header = "frequency_hz,shift_ppm,intensity,origin";

    public static void Write(TextWriter writer, LineList lines, SpinSystem system)
    {
        var inv = CultureInfo.InvariantCulture;
        writer.WriteLine(Header);
        for (var i = 0; i < lines.Lines.Count; i++)
        {
            var l = lines.Lines[i];
            var origin = string.Join('+', lines.DominantEntries(i).Select(e => system.Nuclei[e].Id));
            writer.Write(l.FrequencyHz.ToString("F6", inv));
            writer.Write(',');
            writer.Write(l.ShiftPpm.ToString("F8", inv));
            writer.Write(',');
            writer.Write(l.Intensity.ToString("G10", inv));
            writer.Write(',');
            writer.WriteLine(origin.Contains(',') ? $"\"{origin}\"" : origin);
        }
    }
}
