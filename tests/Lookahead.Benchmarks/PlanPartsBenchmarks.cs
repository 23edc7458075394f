using BenchmarkDotNet.Attributes;
using Lookahead.Core.Numerics;
using Lookahead.Core.Planning;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Benchmarks;

/// <summary>
/// Where the time of one unconstrained plan goes: the same steps CompiledModel.Plan takes, one by one, on the
/// same data (the gain Kx is rebuilt here the way ModelCompiler builds it, column-major, and checked against the plan).
/// </summary>
public class PlanPartsBenchmarks
{
    private CompiledModel model = null!;
    private PlanRequest request = null!;
    private double[] kx = null!;
    private double[] u = null!;
    private double[] states = null!;
    private double[] targetState = null!;
    private double[] targetInput = null!;
    private Plan plan = null!;

    /// <summary>M1 = six-masses (n 12, m 3, N 30), M2 = random-4x2-N100, M3 = random-50x10-N50.</summary>
    [Params("M1", "M2", "M3")]
    public string Model { get; set; } = "M1";

    [GlobalSetup]
    public void Setup()
    {
        var c = BenchmarkModels.Get(Model);
        model = ModelCompiler.Compile(c.Document);
        request = new PlanRequest(c.State);
        var v = model.Model;
        var a = Matrix<double>.Build.DenseOfRowArrays(model.DiscreteA);
        var b = Matrix<double>.Build.DenseOfRowArrays(model.DiscreteB);
        var p = Matrix<double>.Build.DenseOfRowArrays(model.TerminalWeight);
        var condensed = Condensing.Build(a, b, v.C, v.OutputWeight, v.InputWeight, v.InputRateWeight, p, model.Horizon, withPreviousInput: false);
        kx = DenseMatrix.ColumnMajor(condensed.Hessian.Cholesky().Solve(condensed.Fx));
        u = new double[model.DecisionVariables];
        states = new double[(model.Horizon + 1) * model.StateCount];
        targetState = new double[model.StateCount];
        targetInput = new double[model.InputCount];
        plan = model.Plan(request);

        GainMultiply();
        for (int i = 0; i < u.Length; i++)
        {
            u[i] = -u[i];
        }

        double deviation = PlanBenchmarks.MaxRelativeDeviation(u, plan.Inputs);
        if (deviation > 1e-12)
        {
            throw new InvalidOperationException($"{Model}: the rebuilt gain gives inputs off by {deviation:g3} relative to the plan");
        }
    }

    /// <summary>The whole call, for reference.</summary>
    [Benchmark(Baseline = true)]
    public Plan WholePlan() => model.Plan(request);

    /// <summary>CompiledModel.ValidateRequest (lengths and finiteness of the request's vectors).</summary>
    [Benchmark]
    public int Validate() => model.ValidateRequest(request).Count;

    /// <summary>The result object and its three arrays.</summary>
    [Benchmark]
    public Plan AllocateResult() => new(model.Horizon, model.StateCount, model.InputCount, model.OutputCount);

    /// <summary>u = Kx·x_0 (N·m × n, column-major, DenseKernels.MultiplyAddColumns as in CompiledModel.Plan).</summary>
    [Benchmark]
    public double GainMultiply()
    {
        Array.Clear(u);
        DenseKernels.MultiplyAddColumns(kx, request.State, u);
        return u[0];
    }

    /// <summary>x_{k+1} = A x_k + B u_k for k = 0 … N−1 (TrajectoryEvaluator.Step).</summary>
    [Benchmark]
    public double Rollout()
    {
        int n = model.StateCount;
        int m = model.InputCount;
        var trajectory = model.Trajectory;
        var x = states.AsSpan();
        request.State.CopyTo(x);
        for (int k = 0; k < model.Horizon; k++)
        {
            trajectory.Step(x.Slice(k * n, n), plan.Inputs.AsSpan(k * m, m), x.Slice((k + 1) * n, n));
        }

        return x[^1];
    }

    /// <summary>J on the rolled-out trajectory (TrajectoryEvaluator.Cost).</summary>
    [Benchmark]
    public double Cost() => model.Trajectory.Cost(plan.Inputs, plan.States, plan.Outputs, model.Horizon, ReadOnlySpan<double>.Empty, targetState, targetInput, default);

    /// <summary>Rollout, outputs and cost together (TrajectoryEvaluator.Evaluate, as the plan calls it).</summary>
    [Benchmark]
    public double Evaluate() => model.Trajectory.Evaluate(plan, request.State, default, targetState, targetInput, default);
}
