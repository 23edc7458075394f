using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Estimation;

/// <summary>
/// The plant augmented with n_d integrating disturbances:
/// A_a = [[A, B_d], [0, I]] ((n+n_d)×(n+n_d)), B_a = [B; 0] ((n+n_d)×m), C_a = [C, C_d] (p×(n+n_d)).
/// </summary>
/// <param name="A">A_a.</param>
/// <param name="B">B_a.</param>
/// <param name="C">C_a.</param>
/// <param name="DisturbanceInput">B_d, n×n_d.</param>
/// <param name="DisturbanceOutput">C_d, p×n_d.</param>
internal sealed record AugmentedModel(
    Matrix<double> A,
    Matrix<double> B,
    Matrix<double> C,
    Matrix<double> DisturbanceInput,
    Matrix<double> DisturbanceOutput)
{
    /// <summary>n_d for a disturbance model: p for output, m for input, 0 for none.</summary>
    /// <exception cref="ArgumentOutOfRangeException">The kind is not a defined value.</exception>
    public static int DisturbanceCount(DisturbanceModelKind kind, int inputs, int outputs) => kind switch
    {
        DisturbanceModelKind.Output => outputs,
        DisturbanceModelKind.Input => inputs,
        DisturbanceModelKind.None => 0,
        _ => throw new ArgumentOutOfRangeException(nameof(kind), kind, "not a disturbance model"),
    };

    /// <summary>Builds the augmented matrices for A (n×n), B (n×m), C (p×n).</summary>
    public static AugmentedModel Build(Matrix<double> a, Matrix<double> b, Matrix<double> c, DisturbanceModelKind kind)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        int p = c.RowCount;
        int nd = DisturbanceCount(kind, m, p);
        var build = Matrix<double>.Build;
        var bd = kind == DisturbanceModelKind.Input ? b.Clone() : build.Dense(n, nd);
        var cd = kind == DisturbanceModelKind.Output ? build.DenseIdentity(p) : build.Dense(p, nd);

        var aa = build.Dense(n + nd, n + nd);
        aa.SetSubMatrix(0, 0, a);
        aa.SetSubMatrix(0, n, bd);
        for (int i = 0; i < nd; i++)
        {
            aa[n + i, n + i] = 1.0;
        }

        var ba = build.Dense(n + nd, m);
        ba.SetSubMatrix(0, 0, b);
        var ca = build.Dense(p, n + nd);
        ca.SetSubMatrix(0, 0, c);
        ca.SetSubMatrix(0, n, cd);
        return new AugmentedModel(aa, ba, ca, bd, cd);
    }
}
