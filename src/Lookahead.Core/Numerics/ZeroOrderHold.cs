using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Numerics;

/// <summary>
/// Exact discretisation of x' = A x + B u with u held constant over each sample:
/// exp([[A, B], [0, 0]]·T) = [[A_d, B_d], [0, I]].
/// </summary>
public static class ZeroOrderHold
{
    /// <summary>Returns (A_d, B_d) for sample time <paramref name="sampleTime"/> &gt; 0 (seconds).</summary>
    /// <exception cref="ArgumentException">
    /// Shapes do not match, or an entry of A or B is not finite (<see cref="ArgumentException.ParamName"/> is
    /// <c>a</c> or <c>b</c>); or, for these A and B, the sample time is out of the hold's range: ‖A‖₁·T exceeds
    /// <see cref="MatrixExponential.MaxNorm"/> or A_d or B_d overflows (ParamName <c>sampleTime</c>).
    /// </exception>
    public static (Matrix<double> Ad, Matrix<double> Bd) Discretise(Matrix<double> a, Matrix<double> b, double sampleTime)
    {
        if (a.RowCount != a.ColumnCount || b.RowCount != a.RowCount)
        {
            throw new ArgumentException("A must be n×n and B n×m");
        }

        if (!(sampleTime > 0) || !double.IsFinite(sampleTime))
        {
            throw new ArgumentOutOfRangeException(nameof(sampleTime), "the sample time must be finite and > 0");
        }

        if (!MatrixScale.AllFinite(a))
        {
            throw new ArgumentException("A has a non-finite entry", nameof(a));
        }

        if (!MatrixScale.AllFinite(b))
        {
            throw new ArgumentException("B has a non-finite entry", nameof(b));
        }

        int n = a.RowCount;
        int m = b.ColumnCount;
        var at = a * sampleTime;
        double atNorm = at.L1Norm();
        if (!(atNorm <= MatrixExponential.MaxNorm))
        {
            throw new ArgumentException($"‖A‖₁·T = {atNorm:g3} is beyond what a zero-order hold can represent (at most {MatrixExponential.MaxNorm:g3}: e^{{AT}} over- or underflows)", nameof(sampleTime));
        }

        // B_d = ∫₀ᵀ e^{Aτ}dτ·B is linear in B. B·T is scaled (by powers of two, exactly) so that its block's
        // 1-norm is at most max(‖AT‖₁, 1) before the exponential, and B_d is scaled back after: a large B then
        // adds no squarings, each of which would round A_d (at 1e200, enough to turn e^{-1} into 1).
        int bExponent = MatrixScale.Exponent(MatrixScale.MaxAbs(b));
        var bUnit = MatrixScale.ScaleDown(b, bExponent);
        var btUnit = bUnit * sampleTime;
        if (!MatrixScale.AllFinite(btUnit))
        {
            throw new ArgumentException($"B·T overflows the double range at T = {sampleTime:g3}", nameof(sampleTime));
        }

        double target = Math.Max(atNorm, 1.0);
        int extra = btUnit.L1Norm() > target ? MatrixScale.Exponent(btUnit.L1Norm() / target) + 1 : 0;
        var block = Matrix<double>.Build.Dense(n + m, n + m);
        block.SetSubMatrix(0, 0, at);
        block.SetSubMatrix(0, n, MatrixScale.ScaleDown(btUnit, extra));

        Matrix<double> e;
        try
        {
            e = MatrixExponential.Compute(block);
        }
        catch (ArgumentException ex)
        {
            throw new ArgumentException($"exp([A, B; 0, 0]·T): {ex.Message}", nameof(sampleTime), ex);
        }

        var ad = e.SubMatrix(0, n, 0, n);
        var bd = e.SubMatrix(0, n, n, m).Map(v => Math.ScaleB(v, bExponent + extra));
        if (!MatrixScale.AllFinite(bd))
        {
            throw new ArgumentException("B_d = ∫e^{Aτ}dτ·B overflows the double range at this sample time", nameof(sampleTime));
        }

        return (ad, bd);
    }
}
