using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Double;
using MathNet.Numerics.LinearAlgebra.Factorization;

namespace SpinSim.Core.LinearAlgebra;

/// <summary>MathNet.Numerics' managed dense algebra: always available, slower than native LAPACK.</summary>
public sealed class ManagedBackend : IDenseBackend
{
    public static ManagedBackend Instance { get; } = new();

    public string Name => "managed (MathNet.Numerics)";

    public void SymmetricEigen(int n, double[] matrix, double[] eigenvalues)
    {
        if (n == 1) { eigenvalues[0] = matrix[0]; matrix[0] = 1.0; return; }
        // MathNet reads the whole matrix; mirror the lower triangle so callers may fill only that.
        for (var j = 0; j < n; j++)
            for (var i = j + 1; i < n; i++)
                matrix[j + i * n] = matrix[i + j * n];
        var evd = DenseMatrix.OfColumnMajor(n, n, matrix).Evd(Symmetricity.Symmetric);
        var values = evd.EigenValues;
        var vectors = evd.EigenVectors;
        var order = Enumerable.Range(0, n).OrderBy(i => values[i].Real).ToArray();
        var v = vectors.AsColumnMajorArray() ?? vectors.ToColumnMajorArray();
        for (var c = 0; c < n; c++)
        {
            eigenvalues[c] = values[order[c]].Real;
            Array.Copy(v, order[c] * n, matrix, c * n, n);
        }
    }

    public void MultiplyTransposedA(int m, int n, int k, double[] a, double[] b, double[] c)
    {
        if ((long)m * n * k <= SmallDense.Limit) { SmallDense.MultiplyTransposedA(m, n, k, a, b, c); return; }
        var am = DenseMatrix.OfColumnMajor(k, m, a);
        var bm = DenseMatrix.OfColumnMajor(k, n, b);
        var cm = new DenseMatrix(m, n, c);
        am.TransposeThisAndMultiply(bm, cm);
    }
}
