namespace SpinSim.Core.LinearAlgebra;

/// <summary>Chooses the dense backend once per process: native OpenBLAS when it loads, otherwise managed.</summary>
public static class DenseBackends
{
    private static readonly Lazy<IDenseBackend> Best = new(() => (IDenseBackend?)OpenBlasBackend.TryLoad() ?? ManagedBackend.Instance);

    /// <summary>The fastest backend that works on this machine.</summary>
    public static IDenseBackend Default => Best.Value;

    public static bool NativeAvailable => Best.Value is OpenBlasBackend;
}
