using BenchmarkDotNet.Attributes;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// ModelCompiler.Compile end to end: validation, zero-order hold (M1), Riccati terminal weight, condensing,
/// Cholesky factor, gain maps, steady-state maps and diagnostics (eigenvalues, condition number).
/// </summary>
public class CompileBenchmarks
{
    private ModelDocument document = null!;

    /// <summary>M1 = six-masses (n 12, m 3, N 30), M2 = random-4x2-N100, M3 = random-50x10-N50.</summary>
    [Params("M1", "M2", "M3")]
    public string Model { get; set; } = "M1";

    [GlobalSetup]
    public void Setup()
    {
        document = BenchmarkModels.Get(Model).Document;
        var compiled = ModelCompiler.Compile(document);
        Console.WriteLine($"// {Model} ({document.Name}): n={compiled.StateCount} m={compiled.InputCount} N={compiled.Horizon} decision variables={compiled.DecisionVariables} Hessian condition={compiled.Diagnostics.HessianCondition:g3} EstimatedBytes={compiled.EstimatedBytes:N0}");
    }

    [Benchmark]
    public CompiledModel Compile() => ModelCompiler.Compile(document);
}
