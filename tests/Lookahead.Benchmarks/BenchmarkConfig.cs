using BenchmarkDotNet.Columns;
using BenchmarkDotNet.Configs;
using BenchmarkDotNet.Diagnosers;
using BenchmarkDotNet.Jobs;
using BenchmarkDotNet.Toolchains.InProcess.Emit;

namespace Lookahead.Benchmarks;

/// <summary>
/// The default configuration for every class here: BenchmarkDotNet's short run (3 warm-up + 3 measured
/// iterations, one launch) executed in this process, so no separate project is generated and built,
/// with the memory diagnoser on and Median and Min next to the Mean (the short run has only three
/// measured iterations, so on a shared machine Min is the steadiest figure). Passing <c>--job</c> or <c>--inProcess</c> on the command line replaces the job.
/// </summary>
public static class BenchmarkConfig
{
    public static IConfig Create(IReadOnlyCollection<string> args)
    {
        var config = DefaultConfig.Instance
            .AddDiagnoser(MemoryDiagnoser.Default)
            .AddColumn(StatisticColumn.Median, StatisticColumn.Min);

        bool jobOnCommandLine = args.Any(a =>
            a.Equals("--job", StringComparison.OrdinalIgnoreCase)
            || a.Equals("-j", StringComparison.OrdinalIgnoreCase)
            || a.Equals("--inProcess", StringComparison.OrdinalIgnoreCase)
            || a.Equals("-i", StringComparison.OrdinalIgnoreCase));
        return jobOnCommandLine
            ? config
            : config.AddJob(Job.ShortRun.WithToolchain(InProcessEmitToolchain.Instance).WithId("ShortInProcess"));
    }
}
