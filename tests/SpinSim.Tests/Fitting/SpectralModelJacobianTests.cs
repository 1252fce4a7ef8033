using SpinSim.Core.Engine;
using SpinSim.Core.Fitting.Spectral;
using SpinSim.Core.Model;
using SpinSim.Core.Spectrum;
using SpinSim.Core.Units;

namespace SpinSim.Tests.Fitting;

/// <summary>
/// The fit model's analytic Jacobian (shift and coupling columns from the engine's line derivatives through lineshape,
/// phase, phase ramp, offset, fade and window taper; width, offset, phase, phase slope, scale and baseline columns) against
/// central differences
/// of the model's own residuals. Systems and traces are invented.
/// </summary>
public class SpectralModelJacobianTests
{
    /// <summary>Invented 8-spin fragment with a methyl at 100 MHz.</summary>
    private static SpinSystem EightSpins() => SpinSystem.Create(new FieldMHz(100),
        [new("Me", 1.18, 3), new("CH", 2.45), new("Ha", 1.72), new("Hb", 1.61), new("Hv", 5.78), new("Ht", 5.05)],
        [new("Me", "CH", 6.9), new("CH", "Ha", 7.8), new("CH", "Hb", 5.9), new("Ha", "Hb", -13.7), new("Ha", "Hv", 6.8), new("Hb", "Hv", 7.3),
         new("Hv", "Ht", 17.0)]);

    public static TheoryData<string, string, double> Cases() => new()
    {
        { "eight", "lorentzian", 0 },
        { "eight", "lorentzian", 3.0 },
        { "eight", "voigt", 0 },
        { "aabb", "lorentzian", 0 },
        { "abx", "voigt", 1.5 },
    };

    [Theory]
    [MemberData(nameof(Cases))]
    public void ColumnsAgreeWithCentralDifferences(string name, string shape, double broadeningHz)
    {
        var truth = name switch { "eight" => EightSpins(), "aabb" => SpectrumFitTestData.AaBb(), _ => SpectrumFitTestData.Abx() };
        var trace = SpectrumFitTestData.Synthetic(truth, 0.8, 8192, 0.01, 3, phaseDeg: 4);
        var setup = new FitSetup { FitOffset = true, FitFirstOrderPhase = true, BaselineOrder = 1, Ties = name == "aabb" ? SpectrumFitTestData.AaBbTies : [] };
        // Evaluate away from the truth, with a phase, a phase slope and an offset set, so that every term of the derivative
        // is in play (the slope turns each line's phase as the line moves, which enters every shift and coupling column).
        var start = SpectrumFitTestData.Perturbed(truth, i => 0.7 * (i % 2 == 0 ? 1 : -1), i => 1.03);
        var regions = FitSetup.DefaultRegions(start, trace.ObserveMHz!.Value, 0.8);
        var parameters = setup.BuildParameters(start, 1, 0.8).Select(p => p.Kind switch
        {
            ParameterKind.OffsetHz => p with { Start = 0.3 },
            ParameterKind.PhaseDeg => p with { Start = 6 },
            ParameterKind.PhaseDegPerPpm => p with { Start = 9 },
            _ => p,
        }).ToList();
        var layout = new ParameterLayout(parameters, setup.Ties);
        var data = PreparedData.From(new FitDataset(trace, regions, []));
        var engine = EngineOptions.Default with { RelativeIntensityFloor = SpectralModel.NegligibleIntensity / 10 / start.ObservedNucleusCount, PoolWeakLines = false };
        var lineshape = shape == "voigt" ? Lineshape.Voigt() : Lineshape.Lorentzian;
        var model = new SpectralModel(start, layout, [data], lineshape, engine, broadeningHz);

        var x = layout.FreeStart();
        var residuals = new double[model.ResidualCount];
        model.Residuals(x, residuals);
        var jacobian = new double[model.ResidualCount, model.ParameterCount];
        Assert.True(model.TryJacobian(x, residuals, jacobian));

        for (var f = 0; f < layout.FreeCount; f++)
        {
            var h = layout.Parameters[layout.FreeRepresentatives[f]].Kind switch
            {
                ParameterKind.ShiftPpm => 1e-4 / data.ObserveMHz, // 1e-4 Hz
                ParameterKind.JHz or ParameterKind.LinewidthHz or ParameterKind.OffsetHz => 1e-4,
                ParameterKind.PhaseDeg or ParameterKind.PhaseDegPerPpm => 1e-3,
                _ => 1e-6,
            };
            var plus = new double[model.ResidualCount];
            var minus = new double[model.ResidualCount];
            var at = (double[])x.Clone();
            at[f] = x[f] + h;
            model.Residuals(at, plus);
            at[f] = x[f] - h;
            model.Residuals(at, minus);
            double norm = 0, error = 0;
            for (var r = 0; r < model.ResidualCount; r++)
            {
                var numeric = (plus[r] - minus[r]) / (2 * h);
                norm += numeric * numeric;
                error += (jacobian[r, f] - numeric) * (jacobian[r, f] - numeric);
            }
            Assert.True(Math.Sqrt(error) < 1e-5 * Math.Sqrt(norm),
                $"{name} {shape} column {layout.Parameters[layout.FreeRepresentatives[f]].Name}: |analytic - differences| = {Math.Sqrt(error):G3}, |column| = {Math.Sqrt(norm):G3}");
        }
    }
}
