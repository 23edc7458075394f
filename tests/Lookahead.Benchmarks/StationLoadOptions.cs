using System.Globalization;

namespace Lookahead.Benchmarks;

/// <summary>What the station load run was asked for (<c>--station-load BASE_URL [options]</c>).</summary>
/// <param name="BaseUrl">The running service, e.g. http://127.0.0.1:5000.</param>
/// <param name="Stations">Concurrent loops, one station each.</param>
/// <param name="Warmup">
/// Seconds of load before the measuring window (tiered compilation, connection pool, SQLite page cache). Under 100
/// concurrent loops on 2 cores the solver still ran instrumented code 8–18 s after start, hence 20 s by default.
/// </param>
/// <param name="Seconds">Length of the measuring window.</param>
/// <param name="Model">The model the stations bind to: an alias name or a model id.</param>
/// <param name="Route">
/// "step": each loop steps its station (estimate, plan, durable commit); "plan": the same loops ask
/// POST /v1/models/{id}/plan from the measured state instead — no estimator, no store — for comparison.
/// </param>
/// <param name="Seed">Seeds the stations' plants (station i uses Seed + i).</param>
/// <param name="ServicePid">When given, the service's CPU time over the window is reported per step.</param>
/// <param name="Label">A name for the run, printed in the table's heading.</param>
public sealed record StationLoadOptions(
    Uri BaseUrl,
    int Stations,
    double Warmup,
    double Seconds,
    string Model,
    string Route,
    int Seed,
    int? ServicePid,
    string Label)
{
    public const string StepRoute = "step";
    public const string PlanRoute = "plan";

    /// <summary>Usage line for errors.</summary>
    public const string Usage =
        "--station-load BASE_URL [--stations 100] [--seconds 30] [--warmup 20] [--model cold-store-demo] [--route step|plan] [--seed 2026] [--service-pid PID] [--label TEXT]";

    /// <summary>Reads the arguments after <c>--station-load</c>; null with a reason when they do not make sense.</summary>
    public static (StationLoadOptions? Options, string? Error) Parse(IReadOnlyList<string> args)
    {
        if (args.Count == 0 || !Uri.TryCreate(args[0], UriKind.Absolute, out var baseUrl))
        {
            return (null, "the first argument must be the service's base URL");
        }

        var options = new StationLoadOptions(baseUrl, 100, 20, 30, "cold-store-demo", StepRoute, 2026, null, "");
        for (int i = 1; i < args.Count; i += 2)
        {
            if (i + 1 >= args.Count)
            {
                return (null, $"{args[i]} needs a value");
            }

            string value = args[i + 1];
            switch (args[i])
            {
                case "--stations" when int.TryParse(value, CultureInfo.InvariantCulture, out int n) && n is >= 1 and <= 10_000:
                    options = options with { Stations = n };
                    break;
                case "--seconds" when double.TryParse(value, CultureInfo.InvariantCulture, out double s) && s > 0:
                    options = options with { Seconds = s };
                    break;
                case "--warmup" when double.TryParse(value, CultureInfo.InvariantCulture, out double w) && w >= 0:
                    options = options with { Warmup = w };
                    break;
                case "--model":
                    options = options with { Model = value };
                    break;
                case "--route" when value is StepRoute or PlanRoute:
                    options = options with { Route = value };
                    break;
                case "--seed" when int.TryParse(value, CultureInfo.InvariantCulture, out int seed):
                    options = options with { Seed = seed };
                    break;
                case "--service-pid" when int.TryParse(value, CultureInfo.InvariantCulture, out int pid) && pid > 0:
                    options = options with { ServicePid = pid };
                    break;
                case "--label":
                    options = options with { Label = value };
                    break;
                default:
                    return (null, $"{args[i]} {value}: unknown option or invalid value");
            }
        }

        return (options, null);
    }
}
