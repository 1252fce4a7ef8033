using SpinSim.Core.Fitting;
using SpinSim.Tests.Support;

namespace SpinSim.Tests.Fitting;

/// <summary>The model functions of the NIST StRD nonlinear-regression sets (NIST StRD nonlinear regression, ITL),
/// each with its analytic gradient with respect to b.</summary>
public static class NistStrdModels
{
    /// <summary>Returns f(b; x) and writes df/db into <paramref name="grad"/>.</summary>
    public delegate double Function(ReadOnlySpan<double> b, double[] x, Span<double> grad);

    /// <summary>Nelson's certified fit is of log(y), as its file states.</summary>
    public static bool FitsLogOfResponse(string name) => name == "Nelson";

    public static Function For(string name) => name switch
    {
        "Misra1a" or "BoxBOD" => Exponential1,
        "Chwirut1" or "Chwirut2" => Chwirut,
        "Lanczos1" or "Lanczos2" or "Lanczos3" => Lanczos,
        "Gauss1" or "Gauss2" or "Gauss3" => Gauss,
        "DanWood" => DanWood,
        "Misra1b" => Misra1b,
        "Kirby2" => Kirby2,
        "Hahn1" or "Thurber" => Rational33,
        "Nelson" => Nelson,
        "MGH17" => Mgh17,
        "Misra1c" => Misra1c,
        "Misra1d" => Misra1d,
        "Roszman1" => Roszman1,
        "ENSO" => Enso,
        "MGH09" => Mgh09,
        "Rat42" => Rat42,
        "MGH10" => Mgh10,
        "Eckerle4" => Eckerle4,
        "Rat43" => Rat43,
        "Bennett5" => Bennett5,
        _ => throw new ArgumentException("no model for " + name),
    };

    // y = b1*(1-exp[-b2*x])
    private static double Exponential1(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], e = Math.Exp(-b[1] * x);
        g[0] = 1 - e; g[1] = b[0] * x * e;
        return b[0] * (1 - e);
    }

    // y = exp[-b1*x]/(b2+b3*x)
    private static double Chwirut(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], d = b[1] + b[2] * x, f = Math.Exp(-b[0] * x) / d;
        g[0] = -x * f; g[1] = -f / d; g[2] = -x * f / d;
        return f;
    }

    // y = b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)
    private static double Lanczos(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], f = 0;
        for (int k = 0; k < 6; k += 2)
        {
            double e = Math.Exp(-b[k + 1] * x);
            g[k] = e; g[k + 1] = -x * b[k] * e;
            f += b[k] * e;
        }
        return f;
    }

    // y = b1*exp(-b2*x) + b3*exp(-(x-b4)**2/b5**2) + b6*exp(-(x-b7)**2/b8**2)
    private static double Gauss(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], e = Math.Exp(-b[1] * x);
        g[0] = e; g[1] = -x * b[0] * e;
        double f = b[0] * e;
        for (int k = 2; k < 8; k += 3)
        {
            double a = b[k], c = b[k + 1], w = b[k + 2], u = x - c, q = Math.Exp(-u * u / (w * w));
            g[k] = q; g[k + 1] = a * q * 2 * u / (w * w); g[k + 2] = a * q * 2 * u * u / (w * w * w);
            f += a * q;
        }
        return f;
    }

    // y = b1*x**b2
    private static double DanWood(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], p = Math.Pow(x, b[1]);
        g[0] = p; g[1] = b[0] * p * Math.Log(x);
        return b[0] * p;
    }

    // y = b1 * (1-(1+b2*x/2)**(-2))
    private static double Misra1b(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], u = 1 + b[1] * x / 2;
        g[0] = 1 - 1 / (u * u); g[1] = b[0] * x / (u * u * u);
        return b[0] * g[0];
    }

    // y = (b1 + b2*x + b3*x**2) / (1 + b4*x + b5*x**2)
    private static double Kirby2(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], num = b[0] + x * (b[1] + x * b[2]), den = 1 + x * (b[3] + x * b[4]), f = num / den;
        g[0] = 1 / den; g[1] = x / den; g[2] = x * x / den; g[3] = -f * x / den; g[4] = -f * x * x / den;
        return f;
    }

    // y = (b1+b2*x+b3*x**2+b4*x**3) / (1+b5*x+b6*x**2+b7*x**3)
    private static double Rational33(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], x2 = x * x, x3 = x2 * x;
        double num = b[0] + b[1] * x + b[2] * x2 + b[3] * x3, den = 1 + b[4] * x + b[5] * x2 + b[6] * x3, f = num / den;
        g[0] = 1 / den; g[1] = x / den; g[2] = x2 / den; g[3] = x3 / den;
        g[4] = -f * x / den; g[5] = -f * x2 / den; g[6] = -f * x3 / den;
        return f;
    }

    // log[y] = b1 - b2*x1 * exp[-b3*x2]
    private static double Nelson(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x1 = xs[0], x2 = xs[1], e = Math.Exp(-b[2] * x2);
        g[0] = 1; g[1] = -x1 * e; g[2] = b[1] * x1 * x2 * e;
        return b[0] - b[1] * x1 * e;
    }

    // y = b1 + b2*exp[-x*b4] + b3*exp[-x*b5]
    private static double Mgh17(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], e4 = Math.Exp(-x * b[3]), e5 = Math.Exp(-x * b[4]);
        g[0] = 1; g[1] = e4; g[2] = e5; g[3] = -x * b[1] * e4; g[4] = -x * b[2] * e5;
        return b[0] + b[1] * e4 + b[2] * e5;
    }

    // y = b1 * (1-(1+2*b2*x)**(-.5))
    private static double Misra1c(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], u = 1 + 2 * b[1] * x, s = Math.Sqrt(u);
        g[0] = 1 - 1 / s; g[1] = b[0] * x / (u * s);
        return b[0] * g[0];
    }

    // y = b1*b2*x*((1+b2*x)**(-1))
    private static double Misra1d(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], u = 1 + b[1] * x;
        g[0] = b[1] * x / u; g[1] = b[0] * x / (u * u);
        return b[0] * g[0];
    }

    // y = b1 - b2*x - arctan[b3/(x-b4)]/pi
    private static double Roszman1(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], u = x - b[3], q = u * u + b[2] * b[2];
        g[0] = 1; g[1] = -x; g[2] = -u / (Math.PI * q); g[3] = -b[2] / (Math.PI * q);
        return b[0] - b[1] * x - Math.Atan(b[2] / u) / Math.PI;
    }

    // y = b1 + b2*cos(2 pi x/12) + b3*sin(2 pi x/12) + b5*cos(2 pi x/b4) + b6*sin(2 pi x/b4) + b8*cos(2 pi x/b7) + b9*sin(2 pi x/b7)
    private static double Enso(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], t = 2 * Math.PI * x / 12;
        g[0] = 1; g[1] = Math.Cos(t); g[2] = Math.Sin(t);
        double f = b[0] + b[1] * g[1] + b[2] * g[2];
        for (int k = 3; k < 9; k += 3)
        {
            double period = b[k], th = 2 * Math.PI * x / period, c = Math.Cos(th), s = Math.Sin(th);
            g[k + 1] = c; g[k + 2] = s;
            g[k] = (-b[k + 1] * s + b[k + 2] * c) * (-th / period);
            f += b[k + 1] * c + b[k + 2] * s;
        }
        return f;
    }

    // y = b1*(x**2+x*b2) / (x**2+x*b3+b4)
    private static double Mgh09(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], num = x * x + x * b[1], den = x * x + x * b[2] + b[3], f = b[0] * num / den;
        g[0] = num / den; g[1] = b[0] * x / den; g[2] = -f * x / den; g[3] = -f / den;
        return f;
    }

    // y = b1 / (1+exp[b2-b3*x])
    private static double Rat42(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], e = Math.Exp(b[1] - b[2] * x), d = 1 + e;
        g[0] = 1 / d; g[1] = -b[0] * e / (d * d); g[2] = b[0] * x * e / (d * d);
        return b[0] / d;
    }

    // y = b1 * exp[b2/(x+b3)]
    private static double Mgh10(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], u = x + b[2], e = Math.Exp(b[1] / u);
        g[0] = e; g[1] = b[0] * e / u; g[2] = -b[0] * e * b[1] / (u * u);
        return b[0] * e;
    }

    // y = (b1/b2) * exp[-0.5*((x-b3)/b2)**2]
    private static double Eckerle4(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], t = (x - b[2]) / b[1], q = Math.Exp(-0.5 * t * t), f = b[0] / b[1] * q;
        g[0] = q / b[1]; g[1] = f / b[1] * (t * t - 1); g[2] = f * t / b[1];
        return f;
    }

    // y = b1 / ((1+exp[b2-b3*x])**(1/b4))
    private static double Rat43(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], e = Math.Exp(b[1] - b[2] * x), d = 1 + e, p = Math.Pow(d, -1 / b[3]), f = b[0] * p;
        g[0] = p; g[1] = -f * e / (b[3] * d); g[2] = f * x * e / (b[3] * d); g[3] = f * Math.Log(d) / (b[3] * b[3]);
        return f;
    }

    // y = b1 * (b2+x)**(-1/b3)
    private static double Bennett5(ReadOnlySpan<double> b, double[] xs, Span<double> g)
    {
        double x = xs[0], u = b[1] + x, p = Math.Pow(u, -1 / b[2]), f = b[0] * p;
        g[0] = p; g[1] = -f / (b[2] * u); g[2] = f * Math.Log(u) / (b[2] * b[2]);
        return f;
    }
}

/// <summary>A NIST StRD set as a least-squares model: residual = model - observed, analytic Jacobian.</summary>
public sealed class NistStrdModel(NistStrdFile file) : ILeastSquaresModel
{
    private readonly NistStrdModels.Function _f = NistStrdModels.For(file.Name);
    private readonly double[] _y = NistStrdModels.FitsLogOfResponse(file.Name) ? file.Y.Select(v => Math.Log(v)).ToArray() : file.Y;

    public bool UseAnalyticJacobian { get; init; } = true;

    public int ParameterCount => file.ParameterCount;

    public int ResidualCount => file.ObservationCount;

    public ReadOnlySpan<double> Observed => _y;

    public void Residuals(ReadOnlySpan<double> p, Span<double> r)
    {
        Span<double> g = stackalloc double[p.Length];
        for (int i = 0; i < _y.Length; i++) r[i] = _f(p, file.X[i], g) - _y[i];
    }

    public bool TryJacobian(ReadOnlySpan<double> p, ReadOnlySpan<double> r, double[,] jacobian)
    {
        if (!UseAnalyticJacobian) return false;
        Span<double> g = stackalloc double[p.Length];
        for (int i = 0; i < _y.Length; i++)
        {
            _f(p, file.X[i], g);
            for (int j = 0; j < g.Length; j++) jacobian[i, j] = g[j];
        }
        return true;
    }
}
