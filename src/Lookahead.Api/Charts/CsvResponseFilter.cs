namespace Lookahead.Api.Charts;

/// <summary>Marks an endpoint whose 200 can also be a CSV table of its trajectories (?format=csv).</summary>
public sealed class CsvAlternativeMetadata;

/// <summary>Adds text/csv beside the JSON schema of the 200 answer.</summary>
public sealed class CsvResponseFilter : AlternativeResponseFilter<CsvAlternativeMetadata>
{
    protected override string ContentType => TrajectoryCsv.ContentType;

    protected override string Description =>
        "With ?format=csv: one row per sample (step, time_s, then y_/r_/u_/x_ columns named by the model's labels; a simulation adds ym_, yhat_, xhat_ and dhat columns, a plan a status column; last, the answer's warning codes on every row).";
}
