using SpinSim.Core.Processing;

namespace SpinSim.Formats.Fitting;

/// <summary>A known line set to its shift: the line seen near <see cref="SeenPpm"/> is moved to <see cref="TruePpm"/>.</summary>
public readonly record struct ReferenceLine(double SeenPpm, double TruePpm);

/// <summary>
/// How measured data are turned into the trace that is fitted: the FID processing (each value null where SpinSim
/// chooses) and an optional re-referencing. Read from the [fit] table and its [fit.fid] part, and overridden value by
/// value from the command line.
/// </summary>
public sealed record MeasuredDataSettings
{
    public WindowShape? Window { get; init; }
    public double? WindowHz { get; init; }
    public int? Points { get; init; }
    public double? FilterDelayPoints { get; init; }
    public double? ZeroOrderPhaseDeg { get; init; }
    public double? FirstOrderPhaseDeg { get; init; }
    public int? BaselineOrder { get; init; }
    public ReferenceLine? Reference { get; init; }

    /// <summary>These settings with every value that <paramref name="over"/> gives taking its place.</summary>
    public MeasuredDataSettings OverriddenBy(MeasuredDataSettings over) => new()
    {
        Window = over.Window ?? Window,
        WindowHz = over.WindowHz ?? WindowHz,
        Points = over.Points ?? Points,
        FilterDelayPoints = over.FilterDelayPoints ?? FilterDelayPoints,
        ZeroOrderPhaseDeg = over.ZeroOrderPhaseDeg ?? ZeroOrderPhaseDeg,
        FirstOrderPhaseDeg = over.FirstOrderPhaseDeg ?? FirstOrderPhaseDeg,
        BaselineOrder = over.BaselineOrder ?? BaselineOrder,
        Reference = over.Reference ?? Reference,
    };

    /// <summary>The Core processing options: SpinSim's defaults where nothing was given.</summary>
    public ProcessingOptions Processing()
    {
        var o = new ProcessingOptions();
        return o with
        {
            Window = Window ?? o.Window,
            WindowHz = WindowHz ?? (Window == WindowShape.Gaussian ? DefaultGaussianHz : o.WindowHz),
            Points = Points,
            FilterDelayPoints = FilterDelayPoints,
            ZeroOrderPhaseDeg = ZeroOrderPhaseDeg,
            FirstOrderPhaseDeg = FirstOrderPhaseDeg ?? (ZeroOrderPhaseDeg is null ? null : 0),
            BaselineOrder = BaselineOrder,
        };
    }

    /// <summary>A Gaussian window chosen without a width gets this one (Hz; common practice, no source).</summary>
    public const double DefaultGaussianHz = 1.0;

    /// <summary>"exponential", "gaussian" or "none", as users write them.</summary>
    public static WindowShape? ParseWindow(string text) => text.Trim().ToLowerInvariant() switch
    {
        "exponential" => WindowShape.Exponential,
        "gaussian" => WindowShape.Gaussian,
        "none" => WindowShape.None,
        _ => null,
    };
}
