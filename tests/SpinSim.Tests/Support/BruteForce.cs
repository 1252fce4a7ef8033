using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Double;
using SpinSim.Core.Model;

namespace SpinSim.Tests.Support;

/// <summary>
/// Independent reference for the engine: the full 2^N product space built from Kronecker products of single-spin
/// operators, diagonalised at once, no blocks, no composite particles. Only for small systems.
/// </summary>
public static class BruteForce
{
    public sealed record RefLine(double FrequencyHz, double Intensity);

    public static List<RefLine> Lines(SpinSystem system, double floor = 1e-10, double mergeHz = 1e-6)
    {
        // Expand sets into single spins.
        var spins = new List<(double Nu, Isotope Iso, int Entry)>();
        for (var entry = 0; entry < system.Nuclei.Count; entry++)
            for (var k = 0; k < system.Nuclei[entry].Count; k++)
                spins.Add((system.FrequencyHz(entry), system.Nuclei[entry].Isotope, entry));
        var n = spins.Count;
        var dim = 1 << n;
        var jEntries = system.CouplingMatrixHz();

        Matrix<double> Op(int which, Matrix<double> single)
        {
            Matrix<double> m = DenseMatrix.CreateIdentity(1);
            for (var k = 0; k < n; k++) m = m.KroneckerProduct(k == which ? single : DenseMatrix.CreateIdentity(2));
            return m;
        }
        // Basis |alpha> = (1,0), |beta> = (0,1).
        var iz = DenseMatrix.OfArray(new[,] { { 0.5, 0 }, { 0, -0.5 } });
        var iplus = DenseMatrix.OfArray(new[,] { { 0.0, 1 }, { 0, 0 } });
        var iminus = DenseMatrix.OfArray(new[,] { { 0.0, 0 }, { 1, 0 } });
        var z = Enumerable.Range(0, n).Select(k => Op(k, iz)).ToArray();
        var p = Enumerable.Range(0, n).Select(k => Op(k, iplus)).ToArray();
        var mi = Enumerable.Range(0, n).Select(k => Op(k, iminus)).ToArray();

        Matrix<double> h = new DenseMatrix(dim, dim);
        for (var k = 0; k < n; k++) h += spins[k].Nu * z[k];
        for (var a = 0; a < n; a++)
            for (var b = a + 1; b < n; b++)
            {
                var j = spins[a].Entry == spins[b].Entry ? 0 : jEntries[spins[a].Entry, spins[b].Entry];
                if (j == 0) continue;
                h += j * (z[a] * z[b]);
                if (spins[a].Iso == spins[b].Iso)
                    h += 0.5 * j * (p[a] * mi[b] + mi[a] * p[b]);
            }
        Matrix<double> fMinus = new DenseMatrix(dim, dim);
        for (var k = 0; k < n; k++) if (spins[k].Iso == system.Observed) fMinus += mi[k];

        var evd = h.Evd(Symmetricity.Symmetric);
        var v = evd.EigenVectors;
        var e = evd.EigenValues.Select(c => c.Real).ToArray();
        var t = v.TransposeThisAndMultiply(fMinus * v); // t[b, a] = <b|F-|a>
        var total = system.ObservedNucleusCount * Math.Pow(2, n - 1);
        var raw = new List<RefLine>();
        for (var a = 0; a < dim; a++)
            for (var b = 0; b < dim; b++)
            {
                var i = t[b, a] * t[b, a];
                if (i > floor * total) raw.Add(new RefLine(e[a] - e[b], i));
            }
        raw.Sort((x, y) => x.FrequencyHz.CompareTo(y.FrequencyHz));
        var merged = new List<RefLine>();
        foreach (var r in raw)
        {
            if (merged.Count > 0 && r.FrequencyHz - merged[^1].FrequencyHz <= mergeHz)
            {
                var last = merged[^1];
                var sum = last.Intensity + r.Intensity;
                merged[^1] = new RefLine((last.FrequencyHz * last.Intensity + r.FrequencyHz * r.Intensity) / sum, sum);
            }
            else merged.Add(r);
        }
        return merged;
    }
}
