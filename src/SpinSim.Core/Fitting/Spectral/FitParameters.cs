using SpinSim.Core.Errors;
using SpinSim.Core.Model;

namespace SpinSim.Core.Fitting.Spectral;

/// <summary>What a fit parameter stands for. Units are in the names; everything else about a kind is in its <see cref="ParameterKindInfo"/>.</summary>
public enum ParameterKind { ShiftPpm, JHz, LinewidthHz, Scale, Baseline, OffsetHz, PhaseDeg }

/// <summary>
/// Everything the fitter and the reports need to know about one kind of parameter, in one place: its name in reports,
/// its unit and printed precision, whether it is a spin parameter (shift or coupling, moved by the random starts and
/// compared in Hz), and its finite-difference step. A new kind adds one entry to <see cref="Of"/>.
/// </summary>
/// <param name="Key">The kind as the JSON report names it, e.g. <c>shift_ppm</c>.</param>
/// <param name="ValueFormat">.NET format of a value in the printed table.</param>
/// <param name="HzPerUnit">Hz per unit of the value at a given observe frequency (MHz) for the spin kinds; null for the others.</param>
/// <param name="DifferenceStep">Absolute step for a central difference, from the value and the observe frequency (MHz).</param>
public sealed record ParameterKindInfo(
    ParameterKind Kind,
    string Key,
    string Unit,
    string ValueFormat,
    Func<double, double>? HzPerUnit,
    Func<double, double, double> DifferenceStep)
{
    /// <summary>Shifts and couplings: what the spin Hamiltonian is made of.</summary>
    public bool IsSpin => HzPerUnit is not null;

    private static readonly ParameterKindInfo[] All =
    [
        new(ParameterKind.ShiftPpm, "shift_ppm", "ppm", "0.000000", mhz => mhz, (_, mhz) => 1e-4 / mhz),
        new(ParameterKind.JHz, "j_hz", "Hz", "0.0000", _ => 1, (_, _) => 1e-4),
        new(ParameterKind.LinewidthHz, "linewidth_hz", "Hz", "0.0000", null, (_, _) => 1e-4),
        new(ParameterKind.Scale, "scale", "", "G5", null, (v, _) => 1e-6 * Math.Max(1, Math.Abs(v))),
        new(ParameterKind.Baseline, "baseline", "", "G5", null, (v, _) => 1e-6 * Math.Max(1, Math.Abs(v))),
        new(ParameterKind.OffsetHz, "offset_hz", "Hz", "0.0000", null, (_, _) => 1e-4),
        new(ParameterKind.PhaseDeg, "phase_deg", "deg", "0.0000", null, (_, _) => 1e-3),
    ];

    /// <summary>The description of <paramref name="kind"/>.</summary>
    public static ParameterKindInfo Of(ParameterKind kind) => All[(int)kind];
}

/// <summary>
/// One named parameter of a spectrum fit. Names: <c>shift:ID</c>, <c>j:A-B</c>, <c>linewidth</c> or
/// <c>linewidth:ID</c>, and per trace <c>scale</c>, <c>baseline0</c>.., <c>offset_hz</c>, <c>phase_deg</c> (with
/// <c>@2</c>, <c>@3</c> appended for the second, third trace of a joint fit).
/// </summary>
/// <param name="Nuclei">Ids the parameter belongs to; empty for global ones.</param>
/// <param name="Dataset">Index of the trace a per-trace parameter belongs to, -1 for shared ones.</param>
/// <param name="Index">Entry index (shift, per-nucleus width), coupling index (J), or polynomial order (baseline).</param>
public sealed record FitParameter(
    string Name,
    ParameterKind Kind,
    IReadOnlyList<string> Nuclei,
    int Dataset,
    int Index,
    double Start,
    double Lower,
    double Upper,
    bool Vary)
{
    public string Unit => ParameterKindInfo.Of(Kind).Unit;

    /// <summary>True when the bounds come from the user's setup rather than the defaults.</summary>
    public bool BoundsGiven { get; init; }

    /// <summary>Why a parameter the setup would vary is held instead (null when it is not).</summary>
    public string? HeldBecause { get; init; }
}

/// <summary>
/// The full parameter list and how free values map onto it: parameters tied together share one free value;
/// fixed parameters keep their start value.
/// </summary>
public sealed class ParameterLayout
{
    private readonly int[] _freeOf; // parameter -> free index, -1 when fixed

    public ParameterLayout(IReadOnlyList<FitParameter> parameters, IReadOnlyList<IReadOnlyList<string>> ties)
    {
        Parameters = parameters;
        var byName = parameters.Select((p, i) => (p.Name, i)).ToDictionary(t => t.Name, t => t.i, StringComparer.Ordinal);
        var group = Enumerable.Range(0, parameters.Count).ToArray();
        foreach (var tie in ties)
        {
            var members = tie.Select(n => byName.TryGetValue(n, out var i) ? i
                : throw new InputException(null, null, $"tie names unknown parameter \"{n}\"", "Tie parameters of this system (shift:ID, j:A-B, linewidth)")).ToArray();
            var kinds = members.Select(m => parameters[m].Kind).Distinct().Count();
            if (kinds > 1) throw new InputException(null, null, $"tie [{string.Join(", ", tie)}] mixes parameters of different kinds", "Tie shifts with shifts and couplings with couplings");
            foreach (var m in members) Relabel(group, group[m], group[members[0]]);
        }
        _freeOf = Enumerable.Repeat(-1, parameters.Count).ToArray();
        var free = new List<int>();
        var representative = new Dictionary<int, int>();
        for (var i = 0; i < parameters.Count; i++)
        {
            if (!parameters[i].Vary) continue;
            if (!representative.TryGetValue(group[i], out var f))
            {
                f = free.Count;
                representative[group[i]] = f;
                free.Add(i);
            }
            _freeOf[i] = f;
        }
        FreeRepresentatives = free;
        Groups = group;
    }

    public IReadOnlyList<FitParameter> Parameters { get; }

    /// <summary>For each free value, the first parameter it stands for.</summary>
    public IReadOnlyList<int> FreeRepresentatives { get; }

    internal int[] Groups { get; }

    public int FreeCount => FreeRepresentatives.Count;

    public int FreeIndexOf(int parameter) => _freeOf[parameter];

    /// <summary>Parameters that share free value <paramref name="free"/>.</summary>
    public IEnumerable<int> MembersOf(int free) => Enumerable.Range(0, Parameters.Count).Where(i => _freeOf[i] == free);

    public double[] Expand(ReadOnlySpan<double> free)
    {
        var full = new double[Parameters.Count];
        for (var i = 0; i < full.Length; i++) full[i] = _freeOf[i] >= 0 ? free[_freeOf[i]] : Parameters[i].Start;
        return full;
    }

    public double[] FreeStart() => FreeRepresentatives.Select(i => Parameters[i].Start).ToArray();

    /// <summary>Bounds of each free value: the tightest of its members' bounds.</summary>
    public (double[] Lower, double[] Upper) FreeBounds()
    {
        var lower = new double[FreeCount];
        var upper = new double[FreeCount];
        for (var f = 0; f < FreeCount; f++)
        {
            lower[f] = MembersOf(f).Max(i => Parameters[i].Lower);
            upper[f] = MembersOf(f).Min(i => Parameters[i].Upper);
        }
        return (lower, upper);
    }

    private static void Relabel(int[] group, int from, int to)
    {
        if (from == to) return;
        for (var i = 0; i < group.Length; i++) if (group[i] == from) group[i] = to;
    }

    /// <summary>Applies the shift and coupling values of <paramref name="full"/> to <paramref name="system"/>.</summary>
    public SpinSystem ApplySpin(SpinSystem system, ReadOnlySpan<double> full)
    {
        var nuclei = system.Nuclei.ToArray();
        var couplings = system.Couplings.ToArray();
        for (var i = 0; i < Parameters.Count; i++)
        {
            var p = Parameters[i];
            if (p.Kind == ParameterKind.ShiftPpm) nuclei[p.Index] = nuclei[p.Index] with { Shift = new(full[i]) };
            else if (p.Kind == ParameterKind.JHz) couplings[p.Index] = couplings[p.Index] with { J = new(full[i]) };
        }
        return SpinSystem.Create(system.Field, nuclei, couplings, system.Title, system.Observed);
    }
}
