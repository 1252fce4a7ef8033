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

    // Builds with --artifacts-path put the test binaries outside the repository, so the folder of
    // this source file (recorded at compile time) is the second place to look.
    private static string FindRepositoryRoot()
    {
        var start = ThisSourceFolder();
        return SolutionAbove(AppContext.BaseDirectory) ?? SolutionAbove(start)
            ?? throw new InvalidOperationException($"SpinSim.sln not found above {AppContext.BaseDirectory} or {start}");
    }

    private static string? SolutionAbove(string folder)
    {
        var dir = string.IsNullOrEmpty(folder) ? null : new DirectoryInfo(folder);
        while (dir is not null && !File.Exists(Path.Combine(dir.FullName, "SpinSim.sln")))
            dir = dir.Parent;
        return dir?.FullName;
    }

    private static string ThisSourceFolder([System.Runtime.CompilerServices.CallerFilePath] string path = "") =>
        Path.GetDirectoryName(path) ?? "";

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
