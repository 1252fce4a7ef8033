namespace SpinSim.Formats.SpinSystems;

/// <summary>Reads a spin system from a .toml or .json file, chosen by extension.</summary>
public static class SpinSystemFiles
{
    /// <summary>The text of an input file; a file that cannot be read is a <see cref="SpinSystemFileException"/>.</summary>
    internal static string ReadText(string path, string what = "the file")
    {
        try { return File.ReadAllText(path); }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new SpinSystemFileException(path, null, $"cannot read {what} ({e.Message})", "Check the path and the file's permissions");
        }
    }

    public static SpinSystemDocument Read(string path)
    {
        if (!File.Exists(path))
            throw new SpinSystemFileException(path, null, "file not found", "Check the path; example systems are in spin-systems/");
        return Path.GetExtension(path).ToLowerInvariant() switch
        {
            ".json" => SpinSystemJson.Read(path),
            ".toml" => SpinSystemToml.Read(path),
            var ext => throw new SpinSystemFileException(path, null, $"unknown spin-system file type \"{ext}\"", "Use a .toml file (SpinSim's schema) or a .json file"),
        };
    }
}
