using BenchmarkDotNet.Attributes;
using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;

namespace Lookahead.Benchmarks;

/// <summary>
/// ModelCompiler.Compile end to end: validation, zero-order hold (M1), Riccati terminal weight, condensing,
/// Cholesky factor, gain maps, steady-state maps and diagnostics (eigenvalues, condition number) — with the
/// compile kernels on OpenBLAS where it is installed ("default") and on the managed fallback ("managed").
/// </summary>
public class CompileBenchmarks
{
    /// <summary>The largest model the default size limits allow in states and decision variables.</summary>
    public const string Largest = "L200x10x200";

    private ModelDocument document = null!;
    private DenseLinearAlgebra algebra = null!;

    /// <summary>
    /// M1 = six-masses (n 12, m 3, N 30), M2 = random-4x2-N100, M3 = random-50x10-N50, and L200x10x200: a random
    /// stable plant with n = p = 200 (outputs are the states), m = 10, N = 200 (N·m = 2000), S ≠ 0 and the Riccati
    /// terminal weight.
    /// </summary>
    [Params("M1", "M2", "M3", Largest)]
    public string Model { get; set; } = "M1";

    [Params("default", "managed")]
    public string Kernels { get; set; } = "default";

    /// <summary>The largest model is above the default N·m limit (1000): allowed here to measure what that limit avoids.</summary>
    private static readonly CompileOptions options = new() { SizeLimits = SizeLimits.Default with { MaxDecisionVariables = 2000 } };

    [GlobalSetup]
    public void Setup()
    {
        document = Model == Largest ? LargestDocument() : BenchmarkModels.Get(Model).Document;
        algebra = Kernels == "managed" ? DenseLinearAlgebra.Managed : DenseLinearAlgebra.Default;
        // What one compiled model keeps alive, against what it reports for cache accounting.
        long before = GC.GetTotalMemory(forceFullCollection: true);
        var compiled = ModelCompiler.Compile(document, options, algebra);
        long retained = GC.GetTotalMemory(forceFullCollection: true) - before;
        Console.WriteLine($"// {Model} ({document.Name}) on {algebra.Name} kernels: n={compiled.StateCount} m={compiled.InputCount} N={compiled.Horizon} decision variables={compiled.DecisionVariables} Hessian condition={compiled.Diagnostics.HessianCondition:g3} EstimatedBytes={compiled.EstimatedBytes:N0} retained={retained:N0}");
        GC.KeepAlive(compiled);
    }

    [Benchmark]
    public CompiledModel Compile() => ModelCompiler.Compile(document, options, algebra);

    /// <summary>A ∈ [−1, 1]^{n×n}·0.9/√n (spectral radius about 0.9), B ∈ [−1, 1]^{n×m}, Q = I, R = S = 0.1·I.</summary>
    private static ModelDocument LargestDocument()
    {
        const int n = 200, m = 10, horizon = 200;
        var random = new Random(1);
        var a = Enumerable.Range(0, n).Select(_ => Enumerable.Range(0, n).Select(_ => ((random.NextDouble() * 2) - 1) * 0.9 / Math.Sqrt(n)).ToArray()).ToArray();
        var b = Enumerable.Range(0, n).Select(_ => Enumerable.Range(0, m).Select(_ => (random.NextDouble() * 2) - 1).ToArray()).ToArray();
        var small = Enumerable.Repeat(0.1, m).ToArray();
        return new ModelDocument(
            Largest,
            new PlantSpec(a, b, null, 1.0),
            new CostSpec(horizon, WeightSpec.FromDiagonal(Enumerable.Repeat(1.0, n).ToArray()), WeightSpec.FromDiagonal(small), WeightSpec.FromDiagonal(small), TerminalWeightSpec.Riccati));
    }
}
