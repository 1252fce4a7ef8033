// Method: first-order (Rayleigh-Schrödinger) perturbation theory of the eigenstates; frequencies by the Hellmann-Feynman theorem (R. P. Feynman, Phys. Rev. 56, 340, 1939).
namespace SpinSim.Core.Engine;

/// <summary>
/// A shift or coupling the engine can differentiate the lines by: the rotating-frame frequency of entry
/// <see cref="EntryA"/> in Hz when <see cref="EntryB"/> is -1, otherwise the coupling between the two entries in Hz.
/// </summary>
public readonly record struct SpinParameter(int EntryA, int EntryB = -1)
{
    public bool IsShift => EntryB < 0;
}

/// <summary>
/// Derivatives of every line of a <see cref="LineList"/> with respect to each <see cref="SpinParameter"/>:
/// dI/dθ and I·dν/dθ (the derivative of the line's first moment with its intensity held), per line and parameter.
/// Frequencies follow the Hellmann-Feynman theorem (first-order perturbation theory: dE_a/dθ = &lt;a|dH/dθ|a&gt;);
/// intensities follow the first-order change of the eigenvectors, with degenerate eigenstates treated together so
/// that sums over coincident lines are exact.
/// </summary>
public sealed class LineDerivatives
{
    private readonly double[] _intensity;
    private readonly double[] _moment;

    public LineDerivatives(IReadOnlyList<SpinParameter> parameters, double[] intensity, double[] moment)
    {
        if (intensity.Length != moment.Length || (parameters.Count > 0 && intensity.Length % parameters.Count != 0))
            throw new ArgumentException("derivative arrays must hold one row of parameters per line");
        Parameters = parameters;
        _intensity = intensity;
        _moment = moment;
    }

    public IReadOnlyList<SpinParameter> Parameters { get; }

    /// <summary>dI/dθ_k of line <paramref name="line"/>, one value per parameter.</summary>
    public ReadOnlySpan<double> IntensityOf(int line) => _intensity.AsSpan(line * Parameters.Count, Parameters.Count);

    /// <summary>I·dν/dθ_k (Hz per unit of θ, times intensity) of line <paramref name="line"/>, one value per parameter.</summary>
    public ReadOnlySpan<double> MomentOf(int line) => _moment.AsSpan(line * Parameters.Count, Parameters.Count);
}
