using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// Floating-point operations one unconstrained <see cref="CompiledModel.Plan"/> call performs (no reference,
/// no previous input), counted from what the code does (CompiledModel.Plan, TrajectoryEvaluator, DenseKernels):
/// a multiply-add counts 2, every other add, subtract, multiply, negate or divide 1; copies and comparisons 0.
/// The gain map, A, B and C are applied column by column (DenseKernels.MultiplyAddColumns), and a column whose
/// multiplier is exactly zero is skipped, so those terms are counted on the actual plan's x_k and u_k
/// (<see cref="Counts.Executed"/>); <see cref="Counts.Dense"/> is the same count with no column skipped.
/// Weights found diagonal cost what DenseKernels.QuadraticForm does for them (3 per entry, not 2p²+2p).
/// </summary>
public static class FlopCounter
{
    /// <summary>The counts by part; <see cref="Total"/> is their sum.</summary>
    public sealed record Counts(
        string Model,
        int N,
        int States,
        int Inputs,
        int Outputs,
        long Gain,
        long Negate,
        long Rollout,
        long OutputMap,
        long CostTerms,
        long Refinement,
        bool Refines,
        long DenseGain,
        long DenseRollout,
        long DenseOutputMap)
    {
        /// <summary>Operations the plan executes for the benchmark state.</summary>
        public long Total => Gain + Negate + Rollout + OutputMap + CostTerms + Refinement;

        public long Executed => Total;

        /// <summary>The same with no zero column skipped.</summary>
        public long Dense => DenseGain + Negate + DenseRollout + DenseOutputMap + CostTerms + Refinement;
    }

    private static readonly Dictionary<string, Counts> Cache = new(StringComparer.Ordinal);

    /// <summary>Counts for a short key (M1, M2, M3) or case name; the model is compiled once per key.</summary>
    public static Counts For(string key)
    {
        lock (Cache)
        {
            if (!Cache.TryGetValue(key, out var counts))
            {
                var c = BenchmarkModels.Get(key);
                counts = Count(key, ModelCompiler.Compile(c.Document), c.State);
                Cache.Add(key, counts);
            }

            return counts;
        }
    }

    public static Counts Count(string label, CompiledModel model, double[] state)
    {
        var v = model.Model;
        long n = model.StateCount;
        long m = model.InputCount;
        long p = model.OutputCount;
        long horizon = model.Horizon;
        long nm = horizon * m;
        bool qDiagonal = IsDiagonal(v.OutputWeight.ToRowArrays());
        bool rDiagonal = IsDiagonal(v.InputWeight.ToRowArrays());
        bool sDiagonal = IsDiagonal(v.InputRateWeight.ToRowArrays());
        bool pDiagonal = IsDiagonal(model.TerminalWeight);
        bool hasRate = v.InputRateWeight.Enumerate().Any(x => x != 0);
        bool refines = model.Diagnostics.HessianCondition > CompiledModel.RefinementCondition;

        var plan = model.Plan(new PlanRequest(state));
        static long NonZero(ReadOnlySpan<double> x)
        {
            long count = 0;
            foreach (double value in x)
            {
                count += value != 0 ? 1 : 0;
            }

            return count;
        }

        long gain = 2 * nm * NonZero(state);               // u = Kx·x0: one AXPY of length N·m per nonzero x0_j
        long negate = nm;                                  // u = −u
        long rollout = 0;                                  // x_{k+1} = A x_k + B u_k: one AXPY of length n per nonzero entry
        long outputs = 0;                                  // y_k = C x_k (a copy when C = I)
        for (int k = 0; k < horizon; k++)
        {
            rollout += 2 * n * (NonZero(plan.State(k)) + NonZero(plan.Input(k)));
        }

        for (int k = 0; k <= horizon && !v.OutputIsState; k++)
        {
            outputs += 2 * p * NonZero(plan.State(k));
        }

        long denseGain = 2 * nm * n;
        long denseRollout = horizon * ((2 * n * n) + (2 * n * m));
        long denseOutputs = v.OutputIsState ? 0 : (horizon + 1) * 2 * p * n;
        long cost = CostFlops(n, m, p, horizon, qDiagonal, rDiagonal, sDiagonal, pDiagonal, hasRate);

        long refinement = 0;
        if (refines)
        {
            long gradient = n + (2 * n * n)                                            // μ_N = P(x_N − x_s)
                + (horizon * (m + (2 * m * m) + (2 * n * m)))                           // g_k = R(u_k − u_s) + Bᵀμ_{k+1}
                + ((horizon - 1) * ((2 * n * n) + (2 * p * p) + (v.OutputIsState ? n : 2 * p * n)))
                + (hasRate ? ((horizon - 1) * (m + (2 * m * m))) + ((horizon - 1) * ((2 * m) + (2 * m * m))) : 0);
            long solve = (2 * nm * (nm - 1)) + (3 * nm);                               // L y = g, Lᵀ x = y
            long update = nm;
            // Not reached by the benchmark models (their Hessians are well conditioned); dense estimate.
            refinement = 2 * (gradient + solve + update + denseRollout + denseOutputs + cost);
        }

        return new Counts(label, (int)horizon, (int)n, (int)m, (int)p, gain, negate, rollout, outputs, cost, refinement, refines, denseGain, denseRollout, denseOutputs);
    }

    /// <summary>Dominant matrix-product flops of <see cref="NaivePath"/> (dense Q̄ and block Q̄ variants), for context.</summary>
    public static (double Dense, double Block) NaiveFlops(CompiledModel model)
    {
        double n = model.StateCount;
        double m = model.InputCount;
        double horizon = model.Horizon;
        double rows = n * horizon;
        double cols = m * horizon;
        double powers = ((horizon - 1) * 2 * n * n * m) + (horizon * 2 * n * n * n); // A^d B and A^k
        double hessian = 2 * cols * cols * rows;                                     // Γᵀ(Q̄Γ)
        double gradient = (2 * rows * n) + (2 * rows * cols);                         // (Q̄Γ)ᵀ(Φ x0)
        double cholesky = (cols * cols * cols / 3) + (2 * cols * cols);
        double common = powers + hessian + gradient + cholesky;
        return (common + (2 * rows * rows * cols), common + (horizon * 2 * n * n * cols));
    }

    public static void Print(TextWriter output)
    {
        output.WriteLine("Floating-point operations of one unconstrained CompiledModel.Plan from the benchmark state");
        output.WriteLine("(no reference, no previous input); multiply-add = 2, other arithmetic = 1.");
        output.WriteLine("Gain, rollout and outputs skip columns whose multiplier is exactly 0 (\"executed\"); \"dense\" skips none.");
        output.WriteLine();
        output.WriteLine("| model | n | m | p | N | gain Kx·x0 | negate | rollout | outputs | cost terms | refinement | executed total | dense total |");
        output.WriteLine("|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|");
        foreach (var key in new[] { "M1", "M2", "M3" })
        {
            var c = For(key);
            output.WriteLine($"| {key} {BenchmarkModels.Get(key).Name} | {c.States} | {c.Inputs} | {c.Outputs} | {c.N} | {c.Gain:N0} | {c.Negate:N0} | {c.Rollout:N0} | {c.OutputMap:N0} | {c.CostTerms:N0} | {(c.Refines ? c.Refinement.ToString("N0") : "none")} | {c.Executed:N0} | {c.Dense:N0} |");
        }

        output.WriteLine();
        output.WriteLine("Dominant flops of the naive per-request path (NaivePath), for context:");
        output.WriteLine();
        output.WriteLine("| model | dense Q̄ | block Q̄ |");
        output.WriteLine("|---|---:|---:|");
        foreach (var key in new[] { "M1", "M2", "M3" })
        {
            var (dense, block) = NaiveFlops(ModelCompiler.Compile(BenchmarkModels.Get(key).Document));
            output.WriteLine($"| {key} | {dense:N0} | {block:N0} |");
        }
    }

    private static long CostFlops(long n, long m, long p, long horizon, bool qDiagonal, bool rDiagonal, bool sDiagonal, bool pDiagonal, bool hasRate)
    {
        static long Quadratic(long size, bool diagonal) => diagonal ? 3 * size : (2 * size * size) + (2 * size);

        // Stage k: (y − r) is a copy without a reference; (u − u_s) is m subtractions (the target spans are zero but not empty).
        long stage = Quadratic(p, qDiagonal) + m + Quadratic(m, rDiagonal) + 2;
        long rate = hasRate ? (horizon - 1) * (m + Quadratic(m, sDiagonal) + 1) : 0;
        long terminal = n + Quadratic(n, pDiagonal) + 1;
        return (horizon * stage) + rate + terminal;
    }

    private static bool IsDiagonal(double[][] w)
    {
        for (int i = 0; i < w.Length; i++)
        {
            for (int j = 0; j < w[i].Length; j++)
            {
                if (i != j && w[i][j] != 0)
                {
                    return false;
                }
            }
        }

        return true;
    }
}
