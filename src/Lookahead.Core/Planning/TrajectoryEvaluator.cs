using Lookahead.Core.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>Rolls a plan's inputs through the discrete plant and evaluates J on the resulting trajectory.</summary>
internal sealed class TrajectoryEvaluator
{
    private readonly int n;
    private readonly int m;
    private readonly int p;
    private readonly double[] a;
    private readonly double[] b;
    private readonly double[] c;
    private readonly bool outputIsState;
    private readonly double[] q;
    private readonly double[] r;
    private readonly double[] s;
    private readonly double[] terminal;
    private readonly bool qDiagonal;
    private readonly bool rDiagonal;
    private readonly bool sDiagonal;
    private readonly bool terminalDiagonal;
    private readonly bool hasRateWeight;

    public TrajectoryEvaluator(Matrix<double> a, Matrix<double> b, Matrix<double> c, bool outputIsState, Matrix<double> q, Matrix<double> r, Matrix<double> s, Matrix<double> terminal)
    {
        n = a.RowCount;
        m = b.ColumnCount;
        p = c.RowCount;
        // Column-major: the rollout's A x + B u is a run of AXPYs (DenseKernels.MultiplyColumns), and the adjoint's
        // Aᵀμ, Bᵀμ, CᵀQ(y − r) are contiguous dot products on the same arrays (DenseKernels.MultiplyTransposedAdd).
        this.a = DenseMatrix.ColumnMajor(a);
        this.b = DenseMatrix.ColumnMajor(b);
        this.c = DenseMatrix.ColumnMajor(c);
        this.outputIsState = outputIsState;
        this.q = DenseMatrix.RowMajor(q);
        this.r = DenseMatrix.RowMajor(r);
        this.s = DenseMatrix.RowMajor(s);
        this.terminal = DenseMatrix.RowMajor(terminal);
        qDiagonal = DenseKernels.IsDiagonal(this.q, p);
        rDiagonal = DenseKernels.IsDiagonal(this.r, m);
        sDiagonal = DenseKernels.IsDiagonal(this.s, m);
        terminalDiagonal = DenseKernels.IsDiagonal(this.terminal, n);
        hasRateWeight = this.s.Any(v => v != 0);
    }

    /// <summary>y = C x.</summary>
    public void Output(ReadOnlySpan<double> x, Span<double> y)
    {
        if (outputIsState)
        {
            x.CopyTo(y);
        }
        else
        {
            y.Clear();
            DenseKernels.MultiplyAddColumns(c, x, y);
        }
    }

    /// <summary>x⁺ = A x + B u.</summary>
    public void Step(ReadOnlySpan<double> x, ReadOnlySpan<double> u, Span<double> next)
    {
        DenseKernels.MultiplyColumns(a, x, b, u, next);
    }

    /// <summary>Fills the plan's states and outputs from its inputs and returns J.</summary>
    public double Evaluate(Plan plan, ReadOnlySpan<double> x0, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput) =>
        Evaluate(plan, x0, new StageReferences(reference, 0), default, targetState, targetInput, previousInput);

    /// <summary>
    /// As above with a setpoint per stage and a measured-disturbance drive per step: x_{k+1} = A x_k + B u_k + w_k with
    /// <paramref name="drives"/> holding w_k = E v_k (N rows of n; empty for none).
    /// </summary>
    public double Evaluate(Plan plan, ReadOnlySpan<double> x0, StageReferences references, ReadOnlySpan<double> drives, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput)
    {
        int horizon = plan.Horizon;
        var states = plan.States.AsSpan();
        var outputs = plan.Outputs.AsSpan();
        var inputs = plan.Inputs.AsSpan();
        x0.CopyTo(states);
        for (int k = 0; k < horizon; k++)
        {
            var next = states.Slice((k + 1) * n, n);
            Step(states.Slice(k * n, n), inputs.Slice(k * m, m), next);
            if (!drives.IsEmpty)
            {
                DenseKernels.Axpy(1.0, drives.Slice(k * n, n), next);
            }
        }

        for (int k = 0; k <= horizon; k++)
        {
            Output(states.Slice(k * n, n), outputs.Slice(k * p, p));
        }

        return Cost(plan.Inputs, plan.States, plan.Outputs, horizon, references, targetState, targetInput, previousInput);
    }

    /// <summary>J for a trajectory already rolled out; empty reference, targets or previous input mean none.</summary>
    public double Cost(ReadOnlySpan<double> inputs, ReadOnlySpan<double> states, ReadOnlySpan<double> outputs, int horizon, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput) =>
        Cost(inputs, states, outputs, horizon, new StageReferences(reference, 0), targetState, targetInput, previousInput);

    /// <summary>J for a trajectory already rolled out, with the stage-k setpoint from <paramref name="references"/>.</summary>
    public double Cost(ReadOnlySpan<double> inputs, ReadOnlySpan<double> states, ReadOnlySpan<double> outputs, int horizon, StageReferences references, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput)
    {
        double cost = 0;
        for (int k = 0; k < horizon; k++)
        {
            var before = k > 0 ? inputs.Slice((k - 1) * m, m) : previousInput;
            cost += StageCost(outputs.Slice(k * p, p), inputs.Slice(k * m, m), references.At(k, p), targetInput, before);
        }

        return cost + TerminalCost(states.Slice(horizon * n, n), targetState);
    }

    /// <summary>(y − r)ᵀQ(y − r) + (u − u_s)ᵀR(u − u_s) + (u − u⁻)ᵀS(u − u⁻); an empty u⁻ drops the last term.</summary>
    public double StageCost(ReadOnlySpan<double> y, ReadOnlySpan<double> u, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> inputBefore)
    {
        if (qDiagonal && rDiagonal && (sDiagonal || !hasRateWeight))
        {
            // The usual case: diagonal weights, summed directly without scratch buffers.
            double sum = WeightedSquares(q, p, y, reference) + WeightedSquares(r, m, u, targetInput);
            if (hasRateWeight && !inputBefore.IsEmpty)
            {
                sum += WeightedSquares(s, m, u, inputBefore);
            }

            return sum;
        }

        Span<double> dy = StackScratch.Fits(p) ? stackalloc double[p] : new double[p];
        Span<double> du = StackScratch.Fits(m) ? stackalloc double[m] : new double[m];
        Difference(y, reference, dy);
        double cost = DenseKernels.QuadraticForm(q, dy, qDiagonal);
        Difference(u, targetInput, du);
        cost += DenseKernels.QuadraticForm(r, du, rDiagonal);
        if (hasRateWeight && !inputBefore.IsEmpty)
        {
            Difference(u, inputBefore, du);
            cost += DenseKernels.QuadraticForm(s, du, sDiagonal);
        }

        return cost;
    }

    /// <summary>Σ_i w_ii (x_i − o_i)² for a diagonal row-major w; an empty offset means zero.</summary>
    private static double WeightedSquares(double[] w, int size, ReadOnlySpan<double> x, ReadOnlySpan<double> offset)
    {
        double sum = 0;
        if (offset.IsEmpty)
        {
            for (int i = 0; i < size; i++)
            {
                sum += w[(i * size) + i] * x[i] * x[i];
            }
        }
        else
        {
            for (int i = 0; i < size; i++)
            {
                double d = x[i] - offset[i];
                sum += w[(i * size) + i] * d * d;
            }
        }

        return sum;
    }

    /// <summary>(x_N − x_s)ᵀP(x_N − x_s).</summary>
    public double TerminalCost(ReadOnlySpan<double> xN, ReadOnlySpan<double> targetState)
    {
        Span<double> dx = StackScratch.Fits(n) ? stackalloc double[n] : new double[n];
        Difference(xN, targetState, dx);
        return DenseKernels.QuadraticForm(terminal, dx, terminalDiagonal);
    }

    /// <summary>
    /// g = ½∂J/∂U (= HU + f) by the adjoint recursion μ_N = P(x_N − x_s), μ_k = CᵀQ(y_k − r) + Aᵀμ_{k+1};
    /// g_k = R(u_k − u_s) + Bᵀμ_{k+1} + the Δu terms. Evaluated on the rolled-out trajectory, it does not inherit
    /// the rounding of the condensed Hessian, which is what makes it useful for refinement.
    /// </summary>
    public void Gradient(ReadOnlySpan<double> inputs, ReadOnlySpan<double> states, ReadOnlySpan<double> outputs, int horizon, ReadOnlySpan<double> reference, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput, Span<double> gradient) =>
        Gradient(inputs, states, outputs, horizon, new StageReferences(reference, 0), targetState, targetInput, previousInput, gradient);

    /// <summary>As above with the stage-k setpoint from <paramref name="references"/> (the trajectory carries any disturbance already).</summary>
    public void Gradient(ReadOnlySpan<double> inputs, ReadOnlySpan<double> states, ReadOnlySpan<double> outputs, int horizon, StageReferences references, ReadOnlySpan<double> targetState, ReadOnlySpan<double> targetInput, ReadOnlySpan<double> previousInput, Span<double> gradient)
    {
        Span<double> mu = StackScratch.Fits(n) ? stackalloc double[n] : new double[n];
        Span<double> next = StackScratch.Fits(n) ? stackalloc double[n] : new double[n];
        Span<double> dy = StackScratch.Fits(p) ? stackalloc double[p] : new double[p];
        Span<double> qdy = StackScratch.Fits(p) ? stackalloc double[p] : new double[p];
        Span<double> du = StackScratch.Fits(m) ? stackalloc double[m] : new double[m];
        Difference(states.Slice(horizon * n, n), targetState, next);
        mu.Clear();
        DenseKernels.MultiplyAdd(terminal, next, mu);
        gradient.Clear();
        for (int k = horizon - 1; k >= 0; k--)
        {
            var g = gradient.Slice(k * m, m);
            var uk = inputs.Slice(k * m, m);
            Difference(uk, targetInput, du);
            DenseKernels.MultiplyAdd(r, du, g);
            DenseKernels.MultiplyTransposedAdd(b, mu, g);
            if (hasRateWeight)
            {
                if (k > 0 || !previousInput.IsEmpty)
                {
                    Difference(uk, k > 0 ? inputs.Slice((k - 1) * m, m) : previousInput, du);
                    DenseKernels.MultiplyAdd(s, du, g);
                }

                if (k + 1 < horizon)
                {
                    Difference(inputs.Slice((k + 1) * m, m), uk, du);
                    for (int i = 0; i < m; i++)
                    {
                        du[i] = -du[i];
                    }

                    DenseKernels.MultiplyAdd(s, du, g);
                }
            }

            if (k >= 1)
            {
                // μ_k = CᵀQ(y_k − r) + Aᵀμ_{k+1}
                next.Clear();
                DenseKernels.MultiplyTransposedAdd(a, mu, next);
                Difference(outputs.Slice(k * p, p), references.At(k, p), dy);
                DenseKernels.Multiply(q, dy, qdy);
                if (outputIsState)
                {
                    for (int i = 0; i < n; i++)
                    {
                        next[i] += qdy[i];
                    }
                }
                else
                {
                    DenseKernels.MultiplyTransposedAdd(c, qdy, next);
                }

                next.CopyTo(mu);
            }
        }
    }

    private static void Difference(ReadOnlySpan<double> x, ReadOnlySpan<double> offset, Span<double> result)
    {
        if (offset.IsEmpty)
        {
            x.CopyTo(result);
            return;
        }

        for (int i = 0; i < x.Length; i++)
        {
            result[i] = x[i] - offset[i];
        }
    }
}
