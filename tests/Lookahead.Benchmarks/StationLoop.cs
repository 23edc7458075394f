using System.Net;
using System.Text;

namespace Lookahead.Benchmarks;

/// <summary>One load-test station: its name, its plant, the sequence its next step carries and what each answer took.</summary>
public sealed class StationLoop(string name, StationPlant plant)
{
    private readonly List<Answer> answers = new(4096);
    private readonly List<Failure> failures = [];

    /// <summary>One 200 answer: when it arrived and how long it took (stopwatch ticks), how far the plant was from its setpoint, how far the input moved.</summary>
    /// <param name="TrackingError">Mean |y − r| over the outputs at the measurement sent (engineering units).</param>
    /// <param name="MoveSize">Mean |u_new − u_applied| over the inputs.</param>
    public readonly record struct Answer(long Finished, long Ticks, bool Optimal, double TrackingError, double MoveSize);

    /// <summary>An answer other than 200 (status 0: none arrived) with the start of its body.</summary>
    public readonly record struct Failure(long Finished, HttpStatusCode Status, string Body);

    public string Name { get; } = name;

    public StationPlant Plant { get; } = plant;

    /// <summary>The sequence the station's next step must carry (0 for a freshly bound station).</summary>
    public long Sequence { get; set; }

    /// <summary>200 answers since the start, warm-up included.</summary>
    public long Answered => answers.Count;

    public IReadOnlyList<Answer> Answers => answers;

    public IReadOnlyList<Failure> Failures => failures;

    public void Record(long started, long finished, string status, double[] measurement, double[] reference, double[] applied, double[] move)
    {
        double error = 0;
        for (int i = 0; i < measurement.Length; i++)
        {
            error += Math.Abs(measurement[i] - reference[i]);
        }

        double change = 0;
        for (int j = 0; j < move.Length; j++)
        {
            change += Math.Abs(move[j] - applied[j]);
        }

        answers.Add(new Answer(finished, finished - started, status == "optimal", error / measurement.Length, change / move.Length));
    }

    public void Fail(HttpStatusCode status, byte[] body, long finished)
    {
        string text = Encoding.UTF8.GetString(body);
        failures.Add(new Failure(finished, status, text.Length > 300 ? text[..300] : text));
    }
}
