using System.Runtime.InteropServices;

namespace SpinSim.Core.LinearAlgebra;

/// <summary>
/// LAPACK dsyevd and BLAS dgemm called directly from the system OpenBLAS (Debian: libopenblas0-pthread,
/// library libopenblas.so.0), through its Fortran symbols. MathNet's own OpenBLAS provider needs a wrapper
/// library that is not shipped for Linux, hence the direct calls.
/// </summary>
public sealed unsafe class OpenBlasBackend : IDenseBackend
{
    private const string Library = "libopenblas.so.0";

    public string Name => "native OpenBLAS (libopenblas.so.0: dsyevd, dgemm)";

    [DllImport(Library, EntryPoint = "dsyevd_")]
    private static extern void Dsyevd(byte* jobz, byte* uplo, int* n, double* a, int* lda, double* w,
        double* work, int* lwork, int* iwork, int* liwork, int* info, nint jobzLength, nint uploLength);

    [DllImport(Library, EntryPoint = "openblas_set_num_threads")]
    private static extern void SetThreadCount(int count);

    [DllImport(Library, EntryPoint = "dgemm_")]
    private static extern void Dgemm(byte* transa, byte* transb, int* m, int* n, int* k, double* alpha,
        double* a, int* lda, double* b, int* ldb, double* beta, double* c, int* ldc, nint transaLength, nint transbLength);

    /// <summary>Returns the backend when the library loads and answers a 2 x 2 problem correctly, otherwise null.</summary>
    public static OpenBlasBackend? TryLoad()
    {
        try
        {
            // SpinSim runs blocks in parallel itself; OpenBLAS's own threads would only compete with them.
            SetThreadCount(1);
            var backend = new OpenBlasBackend();
            var a = new[] { 2.0, 1.0, 1.0, 2.0 };
            var w = new double[2];
            backend.SymmetricEigen(2, a, w);
            return Math.Abs(w[0] - 1.0) < 1e-12 && Math.Abs(w[1] - 3.0) < 1e-12 ? backend : null;
        }
        catch (Exception e) when (e is DllNotFoundException or EntryPointNotFoundException or BadImageFormatException or InvalidOperationException)
        {
            return null;
        }
    }

    /// <summary>Below this size the managed solver is faster than the call overhead of LAPACK.</summary>
    private const int SmallBlock = 32;

    public void SymmetricEigen(int n, double[] matrix, double[] eigenvalues)
    {
        if (n <= SmallBlock) { ManagedBackend.Instance.SymmetricEigen(n, matrix, eigenvalues); return; }
        byte jobz = (byte)'V', uplo = (byte)'L';
        int lda = n, info = 0, lwork = -1, liwork = -1, iworkQuery = 0;
        double workQuery = 0;
        fixed (double* a = matrix, w = eigenvalues)
        {
            Dsyevd(&jobz, &uplo, &n, a, &lda, w, &workQuery, &lwork, &iworkQuery, &liwork, &info, 1, 1);
            if (info != 0) throw new InvalidOperationException($"dsyevd workspace query failed (info {info})");
            lwork = (int)workQuery;
            liwork = iworkQuery;
            // The workspace (about 2 n^2 doubles: 190 MB at n = 3432) is native and freed at once, so it neither
            // waits for a garbage collection nor counts towards the managed heap of a large run.
            var work = (double*)NativeMemory.Alloc((nuint)lwork, sizeof(double));
            var iwork = (int*)NativeMemory.Alloc((nuint)liwork, sizeof(int));
            try
            {
                Dsyevd(&jobz, &uplo, &n, a, &lda, w, work, &lwork, iwork, &liwork, &info, 1, 1);
            }
            finally
            {
                NativeMemory.Free(work);
                NativeMemory.Free(iwork);
            }
        }
        if (info != 0) throw new InvalidOperationException($"dsyevd failed to converge (info {info}) on a {n} x {n} block");
    }

    public void MultiplyTransposedA(int m, int n, int k, double[] a, double[] b, double[] c)
    {
        if ((long)m * n * k <= SmallBlock * SmallBlock * SmallBlock) { ManagedBackend.Instance.MultiplyTransposedA(m, n, k, a, b, c); return; }
        byte ta = (byte)'T', tb = (byte)'N';
        double alpha = 1.0, beta = 0.0;
        int lda = k, ldb = k, ldc = m;
        fixed (double* pa = a, pb = b, pc = c)
            Dgemm(&ta, &tb, &m, &n, &k, &alpha, pa, &lda, pb, &ldb, &beta, pc, &ldc, 1, 1);
    }
}
