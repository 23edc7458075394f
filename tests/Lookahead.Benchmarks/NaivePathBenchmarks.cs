using BenchmarkDotNet.Attributes;
using Lookahead.Core.Planning;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Benchmarks;

/// <summary>
/// The per-request condense–factor–solve a user would otherwise write (<see cref="NaivePath"/>), against the
/// cached plan (baseline, so the Ratio column is naive / cached). The setup checks once that both give the same
/// first input to 1e-8 relative and throws otherwise.
/// </summary>
public class NaivePathBenchmarks
{
    private CompiledModel model = null!;
    private PlanRequest request = null!;
    private NaivePath naive = null!;
    private double[] state = null!;

    /// <summary>M1 = six-masses (n 12, m 3, N 30), M2 = random-4x2-N100, M3 = random-50x10-N50.</summary>
    [Params("M1", "M2", "M3")]
    public string Model { get; set; } = "M1";

    [GlobalSetup]
    public void Setup()
    {
        var c = BenchmarkModels.Get(Model);
        model = ModelCompiler.Compile(c.Document);
        state = c.State;
        request = new PlanRequest(state);
        var validated = model.Model;
        naive = new NaivePath(
            Matrix<double>.Build.DenseOfRowArrays(model.DiscreteA),
            Matrix<double>.Build.DenseOfRowArrays(model.DiscreteB),
            validated.C,
            validated.OutputWeight,
            validated.InputWeight,
            Matrix<double>.Build.DenseOfRowArrays(model.TerminalWeight),
            model.Horizon);
        if (validated.InputRateWeight.Enumerate().Any(v => v != 0))
        {
            throw new InvalidOperationException($"{Model}: the naive path has no input-rate weight term");
        }

        var cached = model.Plan(request).Inputs.AsSpan(0, model.InputCount);
        Check("dense Q̄", NaiveDense().AsSpan(0, model.InputCount), cached);
        Check("block Q̄", NaiveBlockWeights().AsSpan(0, model.InputCount), cached);
        Console.WriteLine($"// {Model}: MathNet linear algebra provider: {MathNet.Numerics.Providers.LinearAlgebra.LinearAlgebraControl.Provider}");
    }

    [Benchmark(Baseline = true)]
    public Plan CachedPlan() => model.Plan(request);

    [Benchmark]
    public double[] NaiveDense() => naive.SolveDense(state);

    [Benchmark]
    public double[] NaiveBlockWeights() => naive.SolveBlockWeights(state);

    private void Check(string what, ReadOnlySpan<double> naiveFirst, ReadOnlySpan<double> cachedFirst)
    {
        double scale = 0;
        double worst = 0;
        for (int i = 0; i < cachedFirst.Length; i++)
        {
            scale = Math.Max(scale, Math.Abs(cachedFirst[i]));
            worst = Math.Max(worst, Math.Abs(naiveFirst[i] - cachedFirst[i]));
        }

        double relative = worst / Math.Max(scale, double.Epsilon);
        Console.WriteLine($"// {Model}: naive ({what}) u_0 vs cached plan u_0: max relative difference {relative:g3}");
        if (!(relative <= 1e-8))
        {
            throw new InvalidOperationException($"{Model}: the naive path ({what}) gives u_0 off by {relative:g3} relative to the cached plan; the comparison would not be like for like");
        }
    }
}
