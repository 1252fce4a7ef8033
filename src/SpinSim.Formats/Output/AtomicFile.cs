namespace SpinSim.Formats.Output;

/// <summary>
/// Writes outputs so that nothing is lost: the content goes to a temporary file beside the target and is moved
/// into place only when complete; a target that is one of the run's inputs is refused.
/// </summary>
public static class AtomicFile
{
    public static void Write(string path, Action<TextWriter> write, IEnumerable<string>? inputs = null) =>
        WriteBytes(path, stream =>
        {
            using var writer = new StreamWriter(stream, new System.Text.UTF8Encoding(false), leaveOpen: true);
            write(writer);
        }, inputs);

    /// <summary>Writes bytes (images, PDF) or, through <see cref="Write"/>, text.</summary>
    public static void WriteBytes(string path, Action<Stream> write, IEnumerable<string>? inputs = null)
    {
        var full = Path.GetFullPath(path);
        foreach (var input in inputs ?? [])
            if (string.Equals(Path.GetFullPath(input), full, StringComparison.Ordinal))
                throw new OutputFileException(path, "this output would overwrite one of the inputs", "Choose another output file name");
        var dir = Path.GetDirectoryName(full)!;
        if (!Directory.Exists(dir))
            throw new OutputFileException(path, $"the folder {dir} does not exist", "Create the folder first or choose another path");
        var temp = Path.Combine(dir, $".{Path.GetFileName(full)}.{Environment.ProcessId}.tmp");
        try
        {
            using (var stream = File.Create(temp)) write(stream);
            File.Move(temp, full, overwrite: true);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            TryDelete(temp);
            throw new OutputFileException(path, $"cannot write the file ({e.Message})", "Check the folder's permissions and free space");
        }
        catch
        {
            TryDelete(temp);
            throw;
        }
    }

    private static void TryDelete(string path)
    {
        try { if (File.Exists(path)) File.Delete(path); } catch (IOException) { }
    }
}

/// <summary>An output that cannot be written; names the file and the fix.</summary>
public sealed class OutputFileException(string path, string problem, string fix) : Exception($"{path}: {problem}. {fix}")
{
    public string FilePath { get; } = path;
}
