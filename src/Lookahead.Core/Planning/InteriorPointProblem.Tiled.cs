using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace Lookahead.Core.Planning;

/// <summary>
/// The per-stage loops of <see cref="InteriorPointProblem"/> outside the Newton step — rollout, the objective's gradient,
/// the adjoint reduction of a gradient and the soft outputs of a step — on 4×4 tiles for small models (n, m, ns ≤ 4),
/// as the Riccati recursion runs them (<see cref="RiccatiNewtonStep"/>): one vector per state, input or output, and
/// a tile product per matrix. The same arithmetic as the general loops, in another order; the interior-point tests
/// run through these paths on the demo's sizes.
/// </summary>
internal sealed unsafe partial class InteriorPointProblem
{
    [MethodImpl(MethodImplOptions.NoInlining)]
    private void RolloutTiled(InteriorPointWorkspace ws, in Request request)
    {
        tiles!.KeepAlive();
        double* states = Pointer(ws.States);
        double* u = Pointer(ws.Inputs);
        double* y = Pointer(ws.SoftOutputs);
        request.X0.CopyTo(ws.States);
        var zero = Vector256<double>.Zero;
        var x = Tile.LoadPartial(states, n);
        for (int k = 0; k < horizon; k++)
        {
            x = Tile.Combine(x, tiles.ATransposed, Tile.Combine(Tile.LoadPartial(u + (k * m), m), tiles.BTransposed, zero));
            Tile.StorePartial(x, states + ((k + 1) * n), n);
            if (ns > 0)
            {
                Tile.StorePartial(Tile.Combine(x, tiles.CsTransposed, zero), y + ((k + 1) * ns), ns);
            }
        }
    }

    [MethodImpl(MethodImplOptions.NoInlining)]
    private void SoftOutputValuesTiled(double* x, double* y)
    {
        tiles!.KeepAlive();
        for (int k = 1; k <= horizon; k++)
        {
            Tile.StorePartial(Tile.Combine(Tile.LoadPartial(x + (k * n), n), tiles.CsTransposed, Vector256<double>.Zero), y + (k * ns), ns);
        }
    }

    private void ObjectiveGradientTiled(InteriorPointWorkspace ws, in Request request)
    {
        fixed (double* us = request.TargetInput, xs = request.TargetState, previous = request.PreviousInput)
        {
            InputGradientTiled(ws, request.TargetInput.IsEmpty ? null : us, request.HasPrevious ? previous : null);
            StateGradientTiled(ws, request.TargetState.IsEmpty ? null : xs);
        }

        for (int t = 0; t < ns; t++)
        {
            ws.ObjectiveSlackGradient[t] = (0.5 * request.LinearWeights[t]) + (SlackWeights[t] * ws.Slacks[t]);
        }
    }

    /// <summary>Per u_k: R(u_k − u_s), and with a rate weight S(u_k − u_{k−1}) when that term exists and −S(u_{k+1} − u_k).</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private void InputGradientTiled(InteriorPointWorkspace ws, double* targetInput, double* previous)
    {
        tiles!.KeepAlive();
        double* u = Pointer(ws.Inputs);
        double* gu = Pointer(ws.ObjectiveInputGradient);
        double* rt = tiles.RTransposed;
        double* st = tiles.STransposed;
        var zero = Vector256<double>.Zero;
        var target = targetInput == null ? zero : Tile.LoadPartial(targetInput, m);
        var before = previous == null ? zero : Tile.LoadPartial(previous, m);
        var uk = Tile.LoadPartial(u, m);
        for (int k = 0; k < horizon; k++)
        {
            var g = Tile.Combine(uk - target, rt, zero);
            var next = k + 1 < horizon ? Tile.LoadPartial(u + ((k + 1) * m), m) : zero;
            if (hasRateWeight)
            {
                if (k > 0 || previous != null)
                {
                    g = Tile.Combine(uk - before, st, g);
                }

                if (k + 1 < horizon)
                {
                    g = Tile.Combine(uk - next, st, g);
                }
            }

            Tile.StorePartial(g, gu + (k * m), m);
            before = uk;
            uk = next;
        }
    }

    /// <summary>Per x_k, 1 ≤ k &lt; N: CᵀQC x_k − CᵀQr; for x_N: P(x_N − x_s).</summary>
    [MethodImpl(MethodImplOptions.NoInlining)]
    private void StateGradientTiled(InteriorPointWorkspace ws, double* targetState)
    {
        tiles!.KeepAlive();
        double* x = Pointer(ws.States);
        double* gx = Pointer(ws.ObjectiveStateGradient);
        double* qx = tiles.Qx;
        var outputTerm = -Tile.LoadPartial(Pointer(ws.OutputTerm), n);
        for (int k = 1; k < horizon; k++)
        {
            Tile.StorePartial(Tile.Combine(Tile.LoadPartial(x + (k * n), n), qx, outputTerm), gx + (k * n), n);
        }

        var xN = Tile.LoadPartial(x + (horizon * n), n);
        if (targetState != null)
        {
            xN -= Tile.LoadPartial(targetState, n);
        }

        Tile.StorePartial(Tile.Combine(xN, tiles.Terminal, Vector256<double>.Zero), gx + (horizon * n), n);
    }

    [MethodImpl(MethodImplOptions.NoInlining)]
    private void ReduceGradientTiled(InteriorPointWorkspace ws, double[] inputGradient, double[] stateGradient)
    {
        tiles!.KeepAlive();
        double* reduced = Pointer(ws.ReducedGradient);
        double* gu = Pointer(inputGradient);
        double* gx = Pointer(stateGradient);
        var mu = Tile.LoadPartial(gx + (horizon * n), n);
        for (int k = horizon - 1; k >= 0; k--)
        {
            Tile.StorePartial(Tile.Combine(mu, tiles.B, Tile.LoadPartial(gu + (k * m), m)), reduced + (k * m), m);
            if (k == 0)
            {
                break;
            }

            mu = Tile.Combine(mu, tiles.A, Tile.LoadPartial(gx + (k * n), n));
        }
    }
}
