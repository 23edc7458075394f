using BenchmarkDotNet.Columns;
using BenchmarkDotNet.Reports;
using BenchmarkDotNet.Running;

namespace Lookahead.Benchmarks;

/// <summary>GFLOP/s = floating-point operations of one operation / mean time of one operation.</summary>
public sealed class GflopsColumn : IColumn
{
    private readonly Func<BenchmarkCase, double?> flopsPerOperation;

    public GflopsColumn(Func<BenchmarkCase, double?> flopsPerOperation)
    {
        this.flopsPerOperation = flopsPerOperation;
    }

    public string Id => nameof(GflopsColumn);

    public string ColumnName => "GFLOP/s";

    public bool AlwaysShow => true;

    public ColumnCategory Category => ColumnCategory.Custom;

    public int PriorityInCategory => 0;

    public bool IsNumeric => true;

    public UnitType UnitType => UnitType.Dimensionless;

    public string Legend => "Floating-point operations per operation divided by the mean time per operation";

    public string GetValue(Summary summary, BenchmarkCase benchmarkCase) => GetValue(summary, benchmarkCase, SummaryStyle.Default);

    public string GetValue(Summary summary, BenchmarkCase benchmarkCase, SummaryStyle style)
    {
        var flops = flopsPerOperation(benchmarkCase);
        var mean = summary[benchmarkCase]?.ResultStatistics?.Mean;
        return flops is null || mean is null or <= 0 ? "-" : (flops.Value / mean.Value).ToString("F2");
    }

    public bool IsAvailable(Summary summary) => true;

    public bool IsDefault(Summary summary, BenchmarkCase benchmarkCase) => false;
}

/// <summary>Adds a GFLOP/s column to the plan benchmarks, from <see cref="FlopCounter"/>.</summary>
public sealed class PlanFlopsConfig : BenchmarkDotNet.Configs.ManualConfig
{
    public PlanFlopsConfig()
    {
        AddColumn(new GflopsColumn(c =>
        {
            var model = c.Parameters.Items.FirstOrDefault(p => p.Name == "Model")?.Value as string;
            return c.Descriptor.WorkloadMethod.Name == "Plan" && model is not null ? FlopCounter.For(model).Total : null;
        }));
    }
}
