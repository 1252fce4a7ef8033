using SpinSim.Core.Errors;

namespace SpinSim.Formats.Output;

/// <summary>
/// Writes outputs so that nothing is lost: the content goes to a temporary file beside the target and is moved
/// into place only when complete; a target that is one of the run's inputs is refused.
/// </summary>
public static class AtomicFile
{
    public static void Write(string path, Action<TextWriter> write, IEnumerable<string>? inputs = null)
    {
        using var outputs = new StagedOutputs(inputs ?? []);
        outputs.Add(path, write);
        outputs.Commit();
    }

    /// <summary>Writes bytes (images, PDF) or, through <see cref="Write"/>, text.</summary>
    public static void WriteBytes(string path, Action<Stream> write, IEnumerable<string>? inputs = null)
    {
        using var outputs = new StagedOutputs(inputs ?? []);
        outputs.AddBytes(path, write);
        outputs.Commit();
    }
}

/// <summary>
/// The outputs of one run, all or none: <see cref="Check"/> refuses a target before any work (an input, a missing
/// folder, a path given twice); each output is rendered to a temporary file beside its target; <see cref="Commit"/>
/// moves them all into place only when every one is complete. Disposing without committing deletes the temporary files,
/// so a command that fails leaves no output behind.
/// </summary>
public sealed class StagedOutputs(IEnumerable<string> inputs) : IDisposable
{
    private readonly HashSet<string> _inputs = inputs.Select(Path.GetFullPath).ToHashSet(StringComparer.Ordinal);
    private readonly HashSet<string> _targets = new(StringComparer.Ordinal);
    private readonly List<(string Temp, string Full, string Path)> _staged = [];

    /// <summary>Refuses a target that is an input, lies in a missing folder or is already a target of this run.</summary>
    /// <exception cref="OutputFileException">The target cannot be written.</exception>
    public void Check(string path)
    {
        var full = Full(path);
        if (_inputs.Contains(full))
            throw new OutputFileException(path, "this output would overwrite one of the inputs", "Choose another output file name");
        if (_targets.Contains(full))
            throw new OutputFileException(path, "this file is named for two outputs", "Give each output its own file name");
        var dir = System.IO.Path.GetDirectoryName(full)!;
        if (!Directory.Exists(dir))
            throw new OutputFileException(path, $"the folder {dir} does not exist", "Create the folder first or choose another path");
    }

    public void Add(string path, Action<TextWriter> write) => AddBytes(path, stream =>
    {
        using var writer = new StreamWriter(stream, new System.Text.UTF8Encoding(false), leaveOpen: true);
        write(writer);
    });

    /// <summary>Renders one output to its temporary file.</summary>
    public void AddBytes(string path, Action<Stream> write)
    {
        Check(path);
        var full = Full(path);
        var temp = System.IO.Path.Combine(System.IO.Path.GetDirectoryName(full)!, $".{System.IO.Path.GetFileName(full)}.{Environment.ProcessId}.{Guid.NewGuid():N}.tmp");
        _targets.Add(full);
        _staged.Add((temp, full, path));
        try
        {
            using var stream = File.Create(temp);
            write(stream);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new OutputFileException(path, $"cannot write the file ({e.Message})", "Check the folder's permissions and free space");
        }
    }

    /// <summary>Moves every staged output into place; returns the paths as given.</summary>
    public IReadOnlyList<string> Commit()
    {
        var done = new List<string>();
        foreach (var (temp, full, path) in _staged)
        {
            try { File.Move(temp, full, overwrite: true); }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                throw new OutputFileException(path, $"cannot move the finished file into place ({e.Message})", "Check the folder's permissions and free space");
            }
            done.Add(path);
        }
        _staged.Clear();
        return done;
    }

    public void Dispose()
    {
        foreach (var (temp, _, _) in _staged)
        {
            try { if (File.Exists(temp)) File.Delete(temp); } catch (IOException) { } catch (UnauthorizedAccessException) { }
        }
        _staged.Clear();
    }

    private static string Full(string path)
    {
        // Checked here, so that Path.GetFullPath has nothing to throw about.
        if (string.IsNullOrWhiteSpace(path) || path.Contains('\0'))
            throw new OutputFileException(path, "not a usable file name", "Choose another output file name");
        return System.IO.Path.GetFullPath(path);
    }
}

/// <summary>An output that cannot be written; names the file and the fix.</summary>
public sealed class OutputFileException(string path, string problem, string fix) : InputException(path, null, problem, fix);
