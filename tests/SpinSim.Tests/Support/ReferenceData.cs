using System.Runtime.CompilerServices;

namespace SpinSim.Tests.Support;

/// <summary>
/// Locates ../shared/reference-data as ../shared/README.md describes: beside the repository root,
/// or at SPINSIM_REFERENCE_DATA. With SPINSIM_REQUIRE_REFERENCE_DATA=1 a missing folder is a failure.
/// </summary>
public static class ReferenceData
{
    private static readonly Lazy<string?> Root = new(Locate);

    public static string? Folder => Root.Value;

    public static bool Required => Environment.GetEnvironmentVariable("SPINSIM_REQUIRE_REFERENCE_DATA") == "1";

    /// <summary>Full path of a file under reference-data; fails the test when the folder is absent.</summary>
    public static string PathOf(params string[] parts)
    {
        var root = Folder ?? throw new InvalidOperationException(
            "reference data not found: expected ../shared/reference-data beside the repository root or SPINSIM_REFERENCE_DATA");
        var path = Path.Combine([root, .. parts]);
        if (!File.Exists(path) && !Directory.Exists(path))
            throw new FileNotFoundException($"reference data file missing: {path}");
        return path;
    }

    public static string RepositoryRoot { get; } = FindRepositoryRoot();

    // Built with --artifacts-path the binaries live outside the repository, so fall back to where this
    // source file was compiled from.
    private static string FindRepositoryRoot([CallerFilePath] string sourceFile = "") =>
        FindAbove(AppContext.BaseDirectory) ?? FindAbove(Path.GetDirectoryName(sourceFile))
        ?? throw new InvalidOperationException($"SpinSim.sln not found above {AppContext.BaseDirectory} or {sourceFile}");

    private static string? FindAbove(string? start)
    {
        var dir = string.IsNullOrEmpty(start) ? null : new DirectoryInfo(start);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "SpinSim.sln")))
            dir = dir.Parent;
        return dir?.FullName;
    }

    private static string? Locate()
    {
        var fromEnv = Environment.GetEnvironmentVariable("SPINSIM_REFERENCE_DATA");
        if (!string.IsNullOrEmpty(fromEnv) && Directory.Exists(fromEnv)) return fromEnv;
        var beside = Path.GetFullPath(Path.Combine(RepositoryRoot, "..", "shared", "reference-data"));
        return Directory.Exists(beside) ? beside : null;
    }
}

/// <summary>A fact that needs ../shared/reference-data: skipped with a reason when the folder is absent,
/// unless SPINSIM_REQUIRE_REFERENCE_DATA=1, where it runs and fails.</summary>
public sealed class ReferenceFactAttribute : FactAttribute
{
    public ReferenceFactAttribute()
    {
        if (ReferenceData.Folder is null && !ReferenceData.Required)
            Skip = "reference data not found (../shared/reference-data or SPINSIM_REFERENCE_DATA); set SPINSIM_REQUIRE_REFERENCE_DATA=1 to make this a failure";
    }
}

/// <summary>A theory that needs ../shared/reference-data; see <see cref="ReferenceFactAttribute"/>.</summary>
public sealed class ReferenceTheoryAttribute : TheoryAttribute
{
    public ReferenceTheoryAttribute()
    {
        if (ReferenceData.Folder is null && !ReferenceData.Required)
            Skip = "reference data not found (../shared/reference-data or SPINSIM_REFERENCE_DATA); set SPINSIM_REQUIRE_REFERENCE_DATA=1 to make this a failure";
    }
}
