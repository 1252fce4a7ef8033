using SpinSim.Core.Processing;
using SpinSim.Core.Traces;
using SpinSim.Formats.Delimited;
using SpinSim.Formats.Jcamp;

namespace SpinSim.Formats;

/// <summary>Reads a trace from any supported file, choosing the reader by extension.</summary>
public static class SpectrumFiles
{
    public static IReadOnlyList<string> JcampExtensions { get; } = [".jdx", ".dx", ".jcamp"];

    public static IReadOnlyList<string> DelimitedExtensions { get; } = [".csv", ".tsv", ".txt"];

    /// <summary>
    /// .jdx, .dx, .jcamp: JCAMP-DX (an FID is processed with <paramref name="processing"/>, defaults when null);
    /// .csv, .tsv, .txt: delimited text read with <paramref name="options"/> (for .tsv without options, tab-separated).
    /// Extensions compare case-insensitively.
    /// </summary>
    /// <exception cref="SpectrumFileException">Unknown extension, or the file cannot be read as a trace.</exception>
    public static SpectrumTrace Read(string path, DelimitedOptions? options = null, ProcessingOptions? processing = null) =>
        ReadData(path, options).ToTrace(processing);

    /// <summary>The file as read: a spectrum, or an FID not yet processed.</summary>
    /// <exception cref="SpectrumFileException">Unknown extension, or the file cannot be read.</exception>
    public static MeasuredData ReadData(string path, DelimitedOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(path);
        var extension = Path.GetExtension(path).ToLowerInvariant();
        if (JcampExtensions.Contains(extension))
            return JcampReader.ReadData(path);
        if (DelimitedExtensions.Contains(extension))
        {
            var o = options ?? (extension == ".tsv" ? new DelimitedOptions { Separator = ColumnSeparator.Tab } : new DelimitedOptions());
            return new MeasuredData(DelimitedReader.Read(path, o));
        }
        throw new SpectrumFileException(path, null,
            $"unknown file type '{extension}': expected JCAMP-DX ({string.Join(", ", JcampExtensions)}) or delimited text ({string.Join(", ", DelimitedExtensions)}); rename the file or convert it");
    }

    /// <summary>The whole text of a spectrum file; any failure to open it becomes a <see cref="SpectrumFileException"/> naming the file.</summary>
    internal static string ReadText(string path)
    {
        try
        {
            return File.ReadAllText(path);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or ArgumentException or NotSupportedException or System.Security.SecurityException)
        {
            throw new SpectrumFileException(path, null, $"cannot open the file: {e.Message}", e);
        }
    }
}
