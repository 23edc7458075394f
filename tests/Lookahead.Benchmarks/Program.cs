using BenchmarkDotNet.Running;

namespace Lookahead.Benchmarks;

public static class Program
{
    /// <summary>
    /// <c>--flops</c> prints the floating-point operation counts of one unconstrained plan and exits;
    /// <c>--time-states FILE</c> times plans on the states in FILE for a side-by-side script (<see cref="StateTimer"/>);
    /// <c>--demo-ratios</c> (add <c>engineering</c> for the demo as served) times the demo's limited plans against its unconstrained plan (<see cref="DemoRatios"/>);
    /// <c>--cold-solvers</c> (add <c>engineering</c>) times the demo's cold plans on the interior point and on the range-space active set over horizons (<see cref="ColdSolvers"/>);
    /// <c>--model-memory [limits] n×m×N …</c> prints what compiled models keep in memory (<see cref="ModelMemory"/>);
    /// <c>--station-load BASE_URL …</c> runs concurrent station loops against a running service (<see cref="StationLoad"/>);
    /// <c>--compile-load BASE_URL PID …</c> plans a small model while the largest models register at once (<see cref="CompileLoad"/>);
    /// anything else goes to BenchmarkDotNet (e.g. <c>--filter '*PlanBenchmarks*'</c>).
    /// </summary>
    public static int Main(string[] args)
    {
        int stationLoad = Array.FindIndex(args, a => a.Equals("--station-load", StringComparison.OrdinalIgnoreCase));
        if (stationLoad >= 0)
        {
            return StationLoad.RunAsync(args[(stationLoad + 1)..], Console.Out).GetAwaiter().GetResult();
        }

        int compileLoad = Array.FindIndex(args, a => a.Equals("--compile-load", StringComparison.OrdinalIgnoreCase));
        if (compileLoad >= 0)
        {
            return CompileLoad.RunAsync(args[(compileLoad + 1)..], Console.Out).GetAwaiter().GetResult();
        }

        if (args.Contains("--flops", StringComparer.OrdinalIgnoreCase))
        {
            FlopCounter.Print(Console.Out);
            return 0;
        }

        if (args.Contains("--cold-solvers", StringComparer.OrdinalIgnoreCase))
        {
            return ColdSolvers.Run(Console.Out, engineering: args.Contains("engineering", StringComparer.OrdinalIgnoreCase));
        }

        if (args.Contains("--demo-ratios", StringComparer.OrdinalIgnoreCase))
        {
            return DemoRatios.Run(Console.Out, engineering: args.Contains("engineering", StringComparer.OrdinalIgnoreCase));
        }

        if (args.Contains("--model-memory", StringComparer.OrdinalIgnoreCase))
        {
            return ModelMemory.Run([.. args.Where(a => !a.Equals("--model-memory", StringComparison.OrdinalIgnoreCase))], Console.Out);
        }

        int timeStates = Array.FindIndex(args, a => a.Equals("--time-states", StringComparison.OrdinalIgnoreCase));
        if (timeStates >= 0 && timeStates + 1 < args.Length)
        {
            return StateTimer.Run(args[timeStates + 1], Console.Out);
        }

        var summaries = BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args, BenchmarkConfig.Create(args));
        return summaries.Any(s => s.HasCriticalValidationErrors || s.Reports.Any(r => !r.Success)) ? 1 : 0;
    }
}
