using System.Runtime.InteropServices;
using Lookahead.Core.Optimization;

namespace Lookahead.Core.Planning;

/// <summary>
/// Scratch memory for one limited-target request; pooled by <see cref="TargetSolver"/>, never shared between threads.
/// The common requests (setpoint reachable inside the limits) use only the fixed arrays; cuts, needed only when the
/// setpoint is out of reach and inputs are left free, grow lists that the pool keeps for the next request.
/// </summary>
internal sealed class TargetWorkspace
{
    /// <summary>Unit normals that differ by no more than this in every entry are one cut: the rest is rounding.</summary>
    internal const double SameCutTolerance = 1e-12;

    private readonly List<double[]> cutNormals = [];
    private readonly List<double> cutRhs = [];
    private QpWorkspace? strictStage1;

    public TargetWorkspace(TargetCoordinates coordinates, DualActiveSetSolver? stage2)
    {
        int d = coordinates.Dimension;
        int rho = coordinates.OutputRank;
        Coordinates = new double[d];
        Linear = new double[rho];
        LimitRhs = new double[2 * coordinates.Inputs];
        CutNormal = new double[rho];
        CutResidual = new double[d - rho];
        Stage2 = stage2?.CreateWorkspace();
    }

    /// <summary>[s; c], the target in <see cref="TargetCoordinates"/>.</summary>
    public double[] Coordinates { get; }

    /// <summary>Stage 1's linear term.</summary>
    public double[] Linear { get; }

    /// <summary>Right-hand sides of the 2m limit rows.</summary>
    public double[] LimitRhs { get; }

    /// <summary>The cut being built: its s part.</summary>
    public double[] CutNormal { get; }

    /// <summary>The cut being built: its c part, which must vanish.</summary>
    public double[] CutResidual { get; }

    public QpWorkspace? Stage2 { get; }

    /// <summary>How the last stage-2 solve ended; its workspace still holds the dual step of a failure.</summary>
    public QpResult LastStage2 { get; set; }

    /// <summary>This call's input limits on T[s; c]: the model's, less the particular equilibrium's inputs u_p of a disturbance.</summary>
    public double[] Lower { get; private set; } = [];

    public double[] Upper { get; private set; } = [];

    /// <summary>Stage 2's linear term T_cᵀu_p (least ‖u_p + T[s; c]‖ over c); all zero without a disturbance.</summary>
    public double[] Stage2Linear { get; private set; } = [];

    /// <summary>Sizes the per-call buffers on first use.</summary>
    public void EnsureCallBuffers(int inputs, int free)
    {
        if (Lower.Length != inputs)
        {
            Lower = new double[inputs];
            Upper = new double[inputs];
        }

        if (Stage2Linear.Length != free)
        {
            Stage2Linear = new double[free];
        }
    }

    public QpWorkspace StrictStage1(DualActiveSetSolver solver) => strictStage1 ??= solver.CreateWorkspace();

    public void ClearCuts()
    {
        cutNormals.Clear();
        cutRhs.Clear();
    }

    /// <summary>
    /// Adds normalᵀs ≥ rhs for a unit normal (copies it). When the same cut is already there, which only rounding can
    /// cause, moves that one inwards by <paramref name="nudge"/>·(1 + |rhs|) instead.
    /// </summary>
    public void AddCut(ReadOnlySpan<double> normal, double rhs, double nudge)
    {
        for (int k = 0; k < cutNormals.Count; k++)
        {
            if (SameDirection(cutNormals[k], normal))
            {
                cutRhs[k] = Math.Max(cutRhs[k], rhs) + (nudge * (1 + Math.Abs(rhs)));
                return;
            }
        }

        cutNormals.Add(normal.ToArray());
        cutRhs.Add(rhs);
    }

    private static bool SameDirection(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        for (int j = 0; j < a.Length; j++)
        {
            if (Math.Abs(a[j] - b[j]) > SameCutTolerance)
            {
                return false;
            }
        }

        return true;
    }

    public IReadOnlyList<IReadOnlyList<(int Column, double Value)>> CutRows() =>
        cutNormals.Select(n => (IReadOnlyList<(int, double)>)n.Select((v, j) => (j, v)).ToArray()).ToArray();

    public ReadOnlySpan<double> CutRhs() => CollectionsMarshal.AsSpan(cutRhs);
}
