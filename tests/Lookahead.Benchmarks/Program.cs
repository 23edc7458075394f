using BenchmarkDotNet.Running;

namespace Lookahead.Benchmarks;

public static class Program
{
    /// <summary>
    /// <c>--flops</c> prints the floating-point operation counts of one unconstrained plan and exits;
    /// anything else goes to BenchmarkDotNet (e.g. <c>--filter '*PlanBenchmarks*'</c>).
    /// </summary>
    public static int Main(string[] args)
    {
        if (args.Contains("--flops", StringComparer.OrdinalIgnoreCase))
        {
            FlopCounter.Print(Console.Out);
            return 0;
        }

        var summaries = BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args, BenchmarkConfig.Create(args));
        return summaries.Any(s => s.HasCriticalValidationErrors || s.Reports.Any(r => !r.Success)) ? 1 : 0;
    }
}
