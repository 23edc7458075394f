using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>Conversions between MathNet matrices and the flat arrays the request-time kernels read.</summary>
internal static class DenseMatrix
{
    /// <summary>Row-major copy: row i at i·ColumnCount.</summary>
    public static double[] RowMajor(Matrix<double> m)
    {
        var result = new double[m.RowCount * m.ColumnCount];
        for (int i = 0; i < m.RowCount; i++)
        {
            for (int j = 0; j < m.ColumnCount; j++)
            {
                result[(i * m.ColumnCount) + j] = m[i, j];
            }
        }

        return result;
    }

    /// <summary>Column-major copy: column j at j·RowCount (for DenseKernels' column and transposed kernels).</summary>
    public static double[] ColumnMajor(Matrix<double> m) => m.ToColumnMajorArray();

    public static double[][] Rows(Matrix<double> m) => m.ToRowArrays();

    public static Matrix<double> FromRows(double[][] rows) => Matrix<double>.Build.DenseOfRowArrays(rows);

    public static bool AllFinite(Matrix<double> m) => m.Enumerate().All(double.IsFinite);
}
