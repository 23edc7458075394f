using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Benchmarks;

/// <summary>
/// What a user without a compiled model would write per request, straight from the textbook: stack the
/// predictions X = Φx_0 + ΓU (x_1 … x_N), form H = ΓᵀQ̄Γ + R̄ and f = ΓᵀQ̄Φx_0 with dense MathNet matrices,
/// factor H by MathNet's Cholesky and solve HU = −f. It starts from the discrete A and B and the terminal
/// weight P (discretisation and the Riccati equation are model set-up, not per-request work) and returns only
/// U: no trajectory, no cost, no diagnostics, so it does less than a plan.
/// </summary>
public sealed class NaivePath
{
    private readonly Matrix<double> a;
    private readonly Matrix<double> b;
    private readonly Matrix<double> stageWeight;
    private readonly Matrix<double> terminal;
    private readonly Matrix<double> inputWeight;
    private readonly int horizon;

    /// <param name="a">Discrete A (n×n).</param>
    /// <param name="b">Discrete B (n×m).</param>
    /// <param name="c">C (p×n).</param>
    /// <param name="q">Output weight Q (p×p).</param>
    /// <param name="r">Input weight R (m×m).</param>
    /// <param name="p">Terminal weight P (n×n).</param>
    /// <param name="horizon">N.</param>
    public NaivePath(Matrix<double> a, Matrix<double> b, Matrix<double> c, Matrix<double> q, Matrix<double> r, Matrix<double> p, int horizon)
    {
        this.a = a;
        this.b = b;
        stageWeight = c.TransposeThisAndMultiply(q * c);
        terminal = p;
        inputWeight = r;
        this.horizon = horizon;
    }

    public int StateCount => a.RowCount;

    public int InputCount => b.ColumnCount;

    /// <summary>Dense Q̄ (nN×nN): the formula as written.</summary>
    public double[] SolveDense(double[] state)
    {
        var (gamma, phi) = Predictions();
        int n = StateCount;
        int nN = n * horizon;
        var qbar = Matrix<double>.Build.Dense(nN, nN);
        for (int k = 1; k <= horizon; k++)
        {
            qbar.SetSubMatrix((k - 1) * n, (k - 1) * n, k < horizon ? stageWeight : terminal);
        }

        var qg = qbar * gamma;
        return Solve(gamma, phi, qg, state);
    }

    /// <summary>Q̄Γ formed block row by block row (W_k Γ_k), so Q̄ itself is never built: a more careful user.</summary>
    public double[] SolveBlockWeights(double[] state)
    {
        var (gamma, phi) = Predictions();
        int n = StateCount;
        int columns = horizon * InputCount;
        var qg = Matrix<double>.Build.Dense(n * horizon, columns);
        for (int k = 1; k <= horizon; k++)
        {
            var rows = gamma.SubMatrix((k - 1) * n, n, 0, columns);
            qg.SetSubMatrix((k - 1) * n, 0, (k < horizon ? stageWeight : terminal) * rows);
        }

        return Solve(gamma, phi, qg, state);
    }

    private double[] Solve(Matrix<double> gamma, Matrix<double> phi, Matrix<double> qg, double[] state)
    {
        int m = InputCount;
        int size = horizon * m;
        var rbar = Matrix<double>.Build.Dense(size, size);
        for (int k = 0; k < horizon; k++)
        {
            rbar.SetSubMatrix(k * m, k * m, inputWeight);
        }

        var hessian = gamma.TransposeThisAndMultiply(qg) + rbar;
        var x0 = Vector<double>.Build.DenseOfArray(state);
        var gradient = qg.TransposeThisAndMultiply(phi * x0);
        var u = hessian.Cholesky().Solve(-gradient);
        return u.ToArray();
    }

    /// <summary>Γ (nN×Nm, block (k−1, j) = A^{k−1−j}B for j &lt; k) and Φ (nN×n, block k−1 = A^k).</summary>
    private (Matrix<double> Gamma, Matrix<double> Phi) Predictions()
    {
        int n = StateCount;
        int m = InputCount;
        var powers = new Matrix<double>[horizon];
        powers[0] = b;
        for (int d = 1; d < horizon; d++)
        {
            powers[d] = a * powers[d - 1];
        }

        var gamma = Matrix<double>.Build.Dense(n * horizon, horizon * m);
        var phi = Matrix<double>.Build.Dense(n * horizon, n);
        var ak = a;
        for (int k = 1; k <= horizon; k++)
        {
            phi.SetSubMatrix((k - 1) * n, 0, ak);
            ak = a * ak;
            for (int j = 0; j < k; j++)
            {
                gamma.SetSubMatrix((k - 1) * n, j * m, powers[k - 1 - j]);
            }
        }

        return (gamma, phi);
    }
}
