using System.Diagnostics;
using Lookahead.Api.Http;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;
using Prometheus;

namespace Lookahead.Api.Plans;

/// <summary>
/// The one way a plan is run, for /plan, alias plans and every replay row: the core checks the request (once),
/// solves it, and the runner times the solve alone, counts it, and turns the core's refusal into field errors.
/// Thread-safe: replay calls it from several threads on one compiled model.
/// </summary>
public sealed class PlanRunner
{
    private static readonly PlanStatus[] Statuses = Enum.GetValues<PlanStatus>();
    private readonly Histogram.Child[] durations;
    private readonly Counter.Child[,] counts;

    public PlanRunner(PlanMetrics metrics)
    {
        var routes = Enum.GetValues<PlanRoute>();
        durations = new Histogram.Child[routes.Length];
        counts = new Counter.Child[routes.Length, Statuses.Length];
        foreach (var route in routes)
        {
            durations[(int)route] = metrics.Duration.WithLabels(Label(route));
            foreach (var status in Statuses)
            {
                counts[(int)route, (int)status] = metrics.Plans.WithLabels(Label(route), WireNames.Status(status));
            }
        }
    }

    /// <summary>Plans <paramref name="call"/> unless parsing already found errors; afterwards either Outcome or Errors is set.</summary>
    /// <param name="warmStart">For consecutive requests (replay rows in order): start from the previous plan's active limits.</param>
    public void Run(CompiledModel model, PlanCall call, PlanDepth depth, PlanRoute route, PlanWarmStart? warmStart = null)
    {
        if (call.Errors.Count > 0)
        {
            return;
        }

        long started = Stopwatch.GetTimestamp();
        try
        {
            var request = call.ToRequest();
            if (depth == PlanDepth.Full)
            {
                var plan = model.Plan(request, warmStart);
                call.Plan = plan;
                plan.Input(0).CopyTo(call.FirstMove);
                call.Outcome = new FirstMoveResult(plan.Status, plan.Cost, plan.Warnings);
            }
            else
            {
                // Historians mostly want u_0: the first-move path skips the trajectory when the model allows it.
                call.Outcome = model.FirstMove(request, call.FirstMove, warmStart);
            }
        }
        catch (ModelValidationException ex)
        {
            foreach (var error in ex.Errors)
            {
                call.AddError(FieldOf(call, error.Path), error.Reason);
            }

            return;
        }

        // From the clock's own ticks: a TimeSpan's 100 ns would round a plan of about a microsecond.
        long ended = Stopwatch.GetTimestamp();
        var elapsed = Stopwatch.GetElapsedTime(started, ended);
        call.SolveMicroseconds = (ended - started) * 1e6 / Stopwatch.Frequency;
        durations[(int)route].Observe(elapsed.TotalSeconds);
        counts[(int)route, (int)call.Outcome.Value.Status].Inc();
    }

    /// <summary>A plan from an estimate carries x̂ in the core's "state": an error about it names the field the client gave.</summary>
    private static string FieldOf(PlanCall call, string path) =>
        call.HasDisturbanceEstimate && (path == "state" || path.StartsWith("state[", StringComparison.Ordinal)) ? "estimate." + path : path;

    private static string Label(PlanRoute route) => route switch
    {
        PlanRoute.Replay => "replay",
        PlanRoute.Station => "station",
        _ => "plan",
    };
}
