using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>
/// e^M by scaling and squaring with a diagonal Padé approximant of degree 3, 5, 7, 9 or 13
/// (Higham, "The scaling and squaring method for the matrix exponential revisited", SIAM J. Matrix
/// Anal. Appl. 26(4), 2005, Algorithm 2.3). The degree and the number of squarings are chosen from
/// the 1-norm so that the backward error stays below the unit roundoff.
/// </summary>
public static class MatrixExponential
{
    // θ_m from Higham (2005), Table 2.3: largest ‖M‖₁ for which the degree-m approximant is accurate.
    private static readonly (int Degree, double Theta)[] Thresholds =
    [
        (3, 1.495585217958292e-2),
        (5, 2.539398330063230e-1),
        (7, 9.504178996162932e-1),
        (9, 2.097847961257068e0),
    ];

    private const double Theta13 = 5.371920351148152e0;

    /// <summary>
    /// Bound on the number of squarings. ‖M‖₁ up to θ13·2⁶⁴ ≈ 1e20 covers any plant sampled in consistent
    /// units; beyond it e^M overflows or its fast modes decay below rounding many times over, and a norm of
    /// 1e308 would otherwise cost about a thousand matrix products.
    /// </summary>
    public const int MaxSquarings = 64;

    /// <summary>The largest ‖M‖₁ accepted: θ13·2^<see cref="MaxSquarings"/>.</summary>
    public const double MaxNorm = Theta13 * 18446744073709551616.0;

    /// <summary>Returns e^M for a square, finite M with ‖M‖₁ ≤ <see cref="MaxNorm"/>.</summary>
    /// <exception cref="ArgumentException">
    /// M is not square, has a non-finite entry, needs more than <see cref="MaxSquarings"/> squarings, or e^M
    /// overflows the double range (checked after every squaring, so an overflow ends the work at once).
    /// </exception>
    public static Matrix<double> Compute(Matrix<double> m)
    {
        if (m.RowCount != m.ColumnCount)
        {
            throw new ArgumentException("the matrix must be square", nameof(m));
        }

        if (!MatrixScale.AllFinite(m))
        {
            throw new ArgumentException("the matrix must be finite", nameof(m));
        }

        double norm = m.L1Norm();
        if (!(norm <= MaxNorm))
        {
            throw new ArgumentException($"‖M‖₁ = {norm:g3} would need more than {MaxSquarings} squarings (at most {MaxNorm:g3} is supported)");
        }

        foreach (var (degree, theta) in Thresholds)
        {
            if (norm <= theta)
            {
                return Pade(m, degree);
            }
        }

        // Scale so that ‖M/2^s‖₁ ≤ θ13, then square s times.
        int s = norm > Theta13 ? (int)Math.Ceiling(Math.Log2(norm / Theta13)) : 0;
        var scaled = s > 0 ? m / Math.Pow(2, s) : m;
        var result = Pade(scaled, 13);
        for (int i = 0; i < s; i++)
        {
            result = result * result;
            if (!MatrixScale.AllFinite(result))
            {
                throw new ArgumentException($"e^M overflows the double range (after {i + 1} of {s} squarings)");
            }
        }

        return result;
    }

    /// <summary>The [k/k] Padé approximant r(M) = q(M)⁻¹ p(M) with p(x) = Σ c_j x^j, q(x) = p(−x).</summary>
    private static Matrix<double> Pade(Matrix<double> m, int degree)
    {
        var c = Coefficients(degree);
        int n = m.RowCount;
        var identity = Matrix<double>.Build.DenseIdentity(n);
        var m2 = m * m;

        // Split p into even (V) and odd (U = M·W) parts, evaluated by powers of M².
        var even = identity * c[0];
        var oddInner = identity * c[1];
        var power = identity;
        for (int j = 2; j <= degree; j += 2)
        {
            power = power * m2;
            even += power * c[j];
            if (j + 1 <= degree)
            {
                oddInner += power * c[j + 1];
            }
        }

        var odd = m * oddInner;
        // p(M) = V + U, q(M) = V − U; solve q·r = p with LU.
        return (even - odd).LU().Solve(even + odd);
    }

    /// <summary>c_j = (2k − j)! k! / ((2k)! j! (k − j)!), computed by the ratio c_j/c_{j−1} to avoid factorials.</summary>
    internal static double[] Coefficients(int degree)
    {
        var c = new double[degree + 1];
        c[0] = 1.0;
        for (int j = 1; j <= degree; j++)
        {
            c[j] = c[j - 1] * (degree - j + 1) / (j * (2.0 * degree - j + 1));
        }

        return c;
    }
}
