using Lookahead.Core.Numerics;

namespace Lookahead.Core.Planning;

/// <summary>
/// Cached gain maps of the stacked previews for one problem variant: the parts of the unconstrained optimum that a
/// reference schedule R = [r_0; …; r_{N−1}] and a disturbance forecast V = [v_0; …; v_{N−1}] add,
/// U* −= K_R R + K_V V, with K = H⁻¹F and F the gradient of J at U = 0 per unit entry of R or V (the same F for both
/// variants; only H differs). Built when the maps are small enough (<see cref="Fits"/>); larger models answer
/// previews by one exact Newton step instead (<see cref="CompiledModel"/>). Column-major, immutable.
/// </summary>
internal sealed class PreviewMaps
{
    /// <summary>At most this many numbers per variant (16 MB): N·m rows times N·(p + q) columns.</summary>
    public const long MaxEntries = 2_000_000;

    /// <summary>At most this much compile work (flops, about): each of the N·(p + q) columns costs two triangular solves of N·m.</summary>
    public const double MaxBuildFlops = 5e8;

    private readonly double[] referenceMap;
    private readonly double[] disturbanceMap;
    private readonly int rows;

    private PreviewMaps(double[] referenceMap, double[] disturbanceMap, int rows)
    {
        this.referenceMap = referenceMap;
        this.disturbanceMap = disturbanceMap;
        this.rows = rows;
    }

    public long Bytes => sizeof(double) * ((long)referenceMap.Length + disturbanceMap.Length);

    public static bool Fits(int horizon, int inputs, int outputs, int disturbances)
    {
        long decision = (long)horizon * inputs;
        long columns = (long)horizon * (outputs + disturbances);
        return decision * columns <= MaxEntries && columns * 2.0 * decision * decision <= MaxBuildFlops;
    }

    /// <summary>The maps of both variants (the same object twice when the variants share their gains).</summary>
    /// <param name="trajectory">Rollout and adjoint gradient of the discrete plant and the cost.</param>
    /// <param name="drive">E column-major (n×q).</param>
    public static (PreviewMaps Without, PreviewMaps With) Build(TrajectoryEvaluator trajectory, GainSet without, GainSet with, double[] drive, int n, int m, int p, int q, int horizon)
    {
        int decision = horizon * m;
        var referenceGradients = new double[decision * horizon * p];
        var disturbanceGradients = new double[decision * horizon * q];
        var plan = new Plan(horizon, n, m, p);
        var references = new double[horizon * p];
        var drives = new double[horizon * n];

        // F_R: the gradient at U = 0 of a unit setpoint r_k = e_j (everything else zero).
        for (int k = 0; k < horizon; k++)
        {
            for (int j = 0; j < p; j++)
            {
                references[(k * p) + j] = 1;
                trajectory.Evaluate(plan, new double[n], new StageReferences(references, p), default, default, default, default);
                trajectory.Gradient(plan.Inputs, plan.States, plan.Outputs, horizon, new StageReferences(references, p), default, default, default, referenceGradients.AsSpan(((k * p) + j) * decision, decision));
                references[(k * p) + j] = 0;
            }
        }

        // F_V: the gradient at U = 0 of a unit disturbance v_k = e_j, through its drive E e_j at step k.
        for (int k = 0; k < horizon; k++)
        {
            for (int j = 0; j < q; j++)
            {
                drive.AsSpan(j * n, n).CopyTo(drives.AsSpan(k * n, n));
                trajectory.Evaluate(plan, new double[n], new StageReferences(default, 0), drives, new double[n], default, default);
                trajectory.Gradient(plan.Inputs, plan.States, plan.Outputs, horizon, new StageReferences(default, 0), new double[n], default, default, disturbanceGradients.AsSpan(((k * q) + j) * decision, decision));
                drives.AsSpan(k * n, n).Clear();
            }
        }

        var first = Solve(without, referenceGradients, disturbanceGradients, decision);
        var second = ReferenceEquals(with, without) ? first : Solve(with, referenceGradients, disturbanceGradients, decision);
        return (first, second);
    }

    /// <summary>inputs −= K_R R + K_V V; an empty span skips its map.</summary>
    public void Apply(ReadOnlySpan<double> stageReferences, ReadOnlySpan<double> stageDisturbances, Span<double> inputs)
    {
        if (!stageReferences.IsEmpty)
        {
            Subtract(referenceMap, stageReferences, inputs);
        }

        if (!stageDisturbances.IsEmpty)
        {
            Subtract(disturbanceMap, stageDisturbances, inputs);
        }
    }

    private void Subtract(double[] map, ReadOnlySpan<double> values, Span<double> inputs)
    {
        for (int c = 0; c < values.Length; c++)
        {
            if (values[c] != 0)
            {
                DenseKernels.Axpy(-values[c], map.AsSpan(c * rows, rows), inputs);
            }
        }
    }

    private static PreviewMaps Solve(GainSet gains, double[] referenceGradients, double[] disturbanceGradients, int decision)
    {
        var referenceMap = (double[])referenceGradients.Clone();
        var disturbanceMap = (double[])disturbanceGradients.Clone();
        foreach (var map in new[] { referenceMap, disturbanceMap })
        {
            for (int c = 0; c < map.Length / decision; c++)
            {
                gains.Factor.Solve(map.AsSpan(c * decision, decision));
            }
        }

        return new PreviewMaps(referenceMap, disturbanceMap, decision);
    }
}
