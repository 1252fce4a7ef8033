using SpinSim.Core.Fitting;
using SpinSim.Tests.Support;
using Xunit.Abstractions;

namespace SpinSim.Tests.Fitting;

/// <summary>
/// The minimiser against the certified results of the NIST StRD nonlinear-regression sets (NIST StRD nonlinear
/// regression, ITL): from each start it must reach the certified values and standard deviations, or say that it
/// did not converge. A wrong answer reported as converged fails.
/// </summary>
public class NistStrdTests(ITestOutputHelper output)
{
    private static readonly LeastSquaresOptions Tight = new()
    {
        GradientTolerance = 1e-15, StepTolerance = 1e-15, FunctionTolerance = 1e-15, MaxIterations = 10_000,
    };

    public static TheoryData<string, int> Runs()
    {
        var data = new TheoryData<string, int>();
        foreach (var name in NistStrdFile.AllNames) { data.Add(name, 1); data.Add(name, 2); }
        return data;
    }

    internal sealed record Outcome(NistStrdFile File, int Start, LeastSquaresResult Result, double ParameterDigits, double StandardDeviationDigits)
    {
        /// <summary>Significant digits the certificate requires: 6 for lower and average difficulty, 4 for higher.</summary>
        public int RequiredDigits => File.Difficulty == NistDifficulty.Higher ? 4 : 6;

        public bool ReachesCertified => ParameterDigits >= RequiredDigits && StandardDeviationDigits >= RequiredDigits;

        public override string ToString() =>
            $"{File.Name,-9} {File.Difficulty,-7} start {Start}: {(Result.Converged ? "converged" : "NOT converged"),-13} {Result.Reason,-17} " +
            $"steps {Result.Iterations,5}  digits b {ParameterDigits,5:F1}  sd {StandardDeviationDigits,5:F1}  RSS {Result.ResidualSumOfSquares:E4}  rank {Result.Rank}  {Result.Message}";
    }

    internal static Outcome Fit(string name, int start, bool analytic = true)
    {
        var file = NistStrdFile.Load(name);
        var model = new NistStrdModel(file) { UseAnalyticJacobian = analytic };
        var result = LevenbergMarquardt.Minimise(model, start == 1 ? file.Start1 : file.Start2, Tight);

        // Lanczos1's certified RSS (1.4e-25) cannot be reproduced from its printed 13-digit data (SOURCES.md quirk),
        // so its certified standard deviations, which carry that RSS, are compared after dividing by the residual
        // standard deviation: SD / s = sqrt(diag (J^T J)^-1) depends on the parameters alone.
        double ourScale = 1, certifiedScale = 1;
        if (name == "Lanczos1")
            (ourScale, certifiedScale) = (Math.Sqrt(result.ResidualVariance), file.CertifiedResidualStandardDeviation);

        double parameterDigits = double.PositiveInfinity, sdDigits = double.PositiveInfinity;
        for (int j = 0; j < file.ParameterCount; j++)
        {
            parameterDigits = Math.Min(parameterDigits, Digits(result.Parameters[j], file.Certified[j]));
            sdDigits = Math.Min(sdDigits, Digits(result.StandardErrors[j] / ourScale, file.CertifiedStandardDeviations[j] / certifiedScale));
        }
        return new Outcome(file, start, result, parameterDigits, sdDigits);
    }

    /// <summary>Log relative error, the digits-in-agreement measure NIST uses for StRD; 0 for NaN.</summary>
    private static double Digits(double value, double certified)
    {
        double lre = -Math.Log10(Math.Abs(value - certified) / Math.Abs(certified));
        return double.IsNaN(lre) ? 0 : Math.Min(lre, 15);
    }

    [ReferenceTheory]
    [MemberData(nameof(Runs))]
    public void AnalyticJacobianConvergesToTheCertifiedValues(string name, int start)
    {
        var outcome = Fit(name, start);
        output.WriteLine(outcome.ToString());
        // Every one of the 54 runs converges with the analytic Jacobian (measured 2026-12-02); one that stops short is a regression.
        Assert.True(outcome.Result.Converged, $"{name} start {start} did not converge: {outcome.Result.Message}");
        // Every certified set has finite certified standard deviations (NIST StRD nonlinear regression, ITL), so a
        // converged fit that leaves a direction undetermined is a wrong answer.
        Assert.Equal(outcome.File.ParameterCount, outcome.Result.Rank);
        AssertCertified(outcome);
    }

    /// <summary>
    /// With a differenced Jacobian a saturated parameter can have a column that is exactly zero in floating point
    /// (BoxBOD from start 1 runs its exponent to about 110): the minimiser may then stop, but it must flag the
    /// parameter as undetermined rather than print a finite standard error for it.
    /// </summary>
    [ReferenceTheory]
    [MemberData(nameof(Runs))]
    public void DifferencedJacobianReachesTheCertifiedValuesOrSaysWhyNot(string name, int start)
    {
        var outcome = Fit(name, start, analytic: false);
        output.WriteLine(outcome.ToString());
        // Every run converges with differences too (measured 2026-12-02); where a column vanishes, the null space must say so.
        Assert.True(outcome.Result.Converged, $"{name} start {start} did not converge: {outcome.Result.Message}");
        if (outcome.Result.NullSpace.Count > 0)
        {
            Assert.All(Enumerable.Range(0, outcome.File.ParameterCount).Where(j => outcome.Result.Undetermined[j]),
                j => Assert.Equal(double.PositiveInfinity, outcome.Result.StandardErrors[j]));
            return;
        }
        AssertCertified(outcome);
    }

    private static void AssertCertified(Outcome outcome)
    {
        var (name, start) = (outcome.File.Name, outcome.Start);
        // NIST StRD nonlinear regression, ITL: certified parameter values.
        Assert.True(outcome.ParameterDigits >= outcome.RequiredDigits,
            $"{name} start {start}: converged to parameters with only {outcome.ParameterDigits:F1} correct digits");
        // NIST StRD nonlinear regression, ITL: certified standard deviations (s^2 = RSS / (n - p); for Rat43 that is
        // the certified residual SD with 11 degrees of freedom, not the 9 its header states).
        Assert.True(outcome.StandardDeviationDigits >= outcome.RequiredDigits,
            $"{name} start {start}: standard deviations with only {outcome.StandardDeviationDigits:F1} correct digits");
    }

    [ReferenceFact]
    public void EveryLowerDifficultySetConvergesFromBothStarts()
    {
        foreach (var name in NistStrdFile.AllNames)
        {
            var file = NistStrdFile.Load(name);
            if (file.Difficulty != NistDifficulty.Lower) continue;
            foreach (var start in new[] { 1, 2 })
            {
                var outcome = Fit(name, start);
                Assert.True(outcome.Result.Converged, $"{name} start {start}: {outcome.Result.Message}");
                // NIST StRD nonlinear regression, ITL: certified values and standard deviations to 6 digits.
                Assert.True(outcome.ReachesCertified, outcome.ToString());
            }
        }
    }

    /// <summary>
    /// The tally across all 27 sets and both starts, printed as a table. With analytic Jacobians every one of
    /// the 54 runs reached the certified values (NIST StRD nonlinear regression, ITL) when this was written; the
    /// floor below guards against a regression without pinning rounding-level behaviour of the hardest sets.
    /// </summary>
    [ReferenceFact]
    public void TallyOfRunsReachingTheCertifiedValues()
    {
        var outcomes = NistStrdFile.AllNames.SelectMany(name => new[] { Fit(name, 1), Fit(name, 2) }).ToList();
        foreach (var o in outcomes) output.WriteLine(o.ToString());
        int reached = outcomes.Count(o => o.Result.Converged && o.ReachesCertified);
        int honestFailures = outcomes.Count(o => !o.Result.Converged);
        output.WriteLine($"{reached} of {outcomes.Count} runs reach the certified values; {honestFailures} report no convergence");
        Assert.Equal(outcomes.Count, reached + honestFailures);
        Assert.True(reached >= 52, $"only {reached} of 54 runs reach the certified values");
    }
}
