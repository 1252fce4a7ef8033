namespace SpinSim.Core.LinearAlgebra;

/// <summary>
/// The one seam for the dense linear algebra that dominates the engine's cost. Matrices are column-major
/// arrays. Implementations must be safe to call from several threads at once on different arrays.
/// </summary>
public interface IDenseBackend
{
    /// <summary>Human-readable name, shown in verbose output.</summary>
    string Name { get; }

    /// <summary>
    /// Eigen-decomposition of the real symmetric n x n matrix in <paramref name="matrix"/> (only the lower triangle
    /// is read). On return <paramref name="matrix"/> holds the orthonormal eigenvectors as columns and
    /// <paramref name="eigenvalues"/> the eigenvalues in ascending order.
    /// </summary>
    void SymmetricEigen(int n, double[] matrix, double[] eigenvalues);

    /// <summary>C (m x n) = A^T B with A (k x m) and B (k x n), all column-major.</summary>
    void MultiplyTransposedA(int m, int n, int k, double[] a, double[] b, double[] c);
}
