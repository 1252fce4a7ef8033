using MathNet.Numerics.LinearAlgebra;
using SpinSim.Core.Fitting;

namespace SpinSim.Tests.Fitting;

/// <summary>
/// The Householder triangularisation behind every Levenberg-Marquardt step, checked by exact invariants of A = Q R with
/// Q orthogonal (no outside values needed): R is upper triangular, R^T R = A^T A, R^T (Q^T r) = A^T r, and the singular
/// values of A agree with MathNet's SVD of A itself.
/// </summary>
public class ScaledJacobianSvdTests
{
    public static TheoryData<int, int, int> Shapes => new() { { 5, 1, 1 }, { 12, 4, 2 }, { 200, 9, 3 }, { 2000, 13, 4 } };

    [Theory]
    [MemberData(nameof(Shapes))]
    public void The_triangle_and_the_rotated_residuals_keep_the_normal_equations(int m, int n, int seed)
    {
        var random = new Random(seed);
        var jacobian = new double[m, n + 1];
        // Columns of very different sizes and one nearly dependent pair, as fits have.
        for (var i = 0; i < m; i++)
            for (var j = 0; j <= n; j++) jacobian[i, j] = (random.NextDouble() - 0.5) * Math.Pow(10, j % 4);
        if (n > 1) for (var i = 0; i < m; i++) jacobian[i, 1] = jacobian[i, 0] * 10 + 1e-6 * (random.NextDouble() - 0.5);
        var residuals = Enumerable.Range(0, m).Select(_ => random.NextDouble() - 0.5).ToArray();
        // Column n is left out (not free), and the free columns are scaled.
        var free = Enumerable.Range(0, n).ToArray();
        var scale = free.Select(j => 0.5 + j).ToArray();

        var (r, qtr) = ScaledJacobianSvd.Triangularise(jacobian, residuals, free, scale);

        var a = Matrix<double>.Build.Dense(m, n, (i, c) => jacobian[i, c] / scale[c]);
        var triangle = Matrix<double>.Build.DenseOfColumnMajor(n, n, r);
        for (var c = 0; c < n; c++)
            for (var i = c + 1; i < n; i++) Assert.Equal(0.0, triangle[i, c]);
        var ata = a.TransposeThisAndMultiply(a);
        var rtr = triangle.TransposeThisAndMultiply(triangle);
        Assert.True((ata - rtr).FrobeniusNorm() <= 1e-12 * ata.FrobeniusNorm(), $"R^T R differs from A^T A by {(ata - rtr).FrobeniusNorm():G3}");
        var atr = a.TransposeThisAndMultiply(Vector<double>.Build.Dense(residuals));
        var rtq = triangle.TransposeThisAndMultiply(Vector<double>.Build.Dense(qtr));
        Assert.True((atr - rtq).L2Norm() <= 1e-12 * a.FrobeniusNorm() * Vector<double>.Build.Dense(residuals).L2Norm());

        var svd = ScaledJacobianSvd.Decompose(jacobian, residuals, free, scale);
        var reference = a.Svd(false).S;
        for (var c = 0; c < n; c++) Assert.Equal(reference[c], svd.S[c], 1e-12 * reference[0]);
    }
}
