using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Factorization;

namespace Lookahead.Core.Numerics;

/// <summary>
/// A Cholesky factor computed by <see cref="DenseLinearAlgebra"/>, in MathNet's factorisation type, so that
/// <see cref="CholeskyFactor"/> can take its copy of L without factoring again. Immutable: <see cref="Factorize"/>
/// is refused.
/// </summary>
internal sealed class ComputedCholesky : Cholesky<double>
{
    private ComputedCholesky(Matrix<double> factor)
        : base(factor)
    {
    }

    /// <summary>
    /// Wraps <paramref name="lowerColumnMajor"/> (n×n, column-major) without copying it. Only its lower triangle is L
    /// and only that triangle is read — by this type's solves and by <see cref="CholeskyFactor"/>'s copy — so the
    /// strict upper triangle may hold other data (the compiler keeps the factored matrix there). The wrapper is for
    /// that hand-over: <see cref="Cholesky{T}.Factor"/> shows the array as it is.
    /// </summary>
    public static ComputedCholesky WrapLower(double[] lowerColumnMajor, int n)
    {
        if (lowerColumnMajor.Length != n * n)
        {
            throw new ArgumentException($"the factor has {lowerColumnMajor.Length} entries; expected {n}×{n}", nameof(lowerColumnMajor));
        }

        return new ComputedCholesky(Matrix<double>.Build.Dense(n, n, lowerColumnMajor));
    }

    public override double Determinant
    {
        get
        {
            double product = 1;
            for (int i = 0; i < Factor.RowCount; i++)
            {
                product *= Factor[i, i] * Factor[i, i];
            }

            return product;
        }
    }

    public override double DeterminantLn
    {
        get
        {
            double sum = 0;
            for (int i = 0; i < Factor.RowCount; i++)
            {
                sum += 2.0 * Math.Log(Factor[i, i]);
            }

            return sum;
        }
    }

    public override void Factorize(Matrix<double> matrix) =>
        throw new NotSupportedException("a computed factor is immutable; factor the new matrix separately");

    public override void Solve(Matrix<double> input, Matrix<double> result)
    {
        int n = Factor.RowCount;
        var values = input.ToColumnMajorArray();
        var lower = Factor.AsColumnMajorArray() ?? Factor.ToColumnMajorArray();
        DenseLinearAlgebra.Managed.SolveLower(false, n, input.ColumnCount, lower, n, values, n);
        DenseLinearAlgebra.Managed.SolveLower(true, n, input.ColumnCount, lower, n, values, n);
        Matrix<double>.Build.Dense(n, input.ColumnCount, values).CopyTo(result);
    }

    public override void Solve(Vector<double> input, Vector<double> result)
    {
        int n = Factor.RowCount;
        var values = input.ToArray();
        var lower = Factor.AsColumnMajorArray() ?? Factor.ToColumnMajorArray();
        DenseLinearAlgebra.Managed.SolveLowerVector(false, n, lower, n, values);
        DenseLinearAlgebra.Managed.SolveLowerVector(true, n, lower, n, values);
        Vector<double>.Build.Dense(values).CopyTo(result);
    }
}
