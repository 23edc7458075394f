namespace Lookahead.Client.Tests.Support;

/// <summary>
/// Rows a historian of the cold-store demo could hold: zone temperatures wandering ±1.5 °C around the −20 °C
/// operating point, chillers and fan moving inside their 0…100 % limits, the outdoor temperature around 15 °C.
/// Deterministic, so a row can be planned again on its own.
/// </summary>
public static class HistorianRows
{
    public static double[] State(long i) =>
    [
        -20 + (1.5 * Math.Sin(i / 500.0)),
        -20 + (1.2 * Math.Sin((i / 700.0) + 1)),
        -20 + Math.Sin((i / 900.0) + 2),
    ];

    public static double[] PreviousInput(long i) =>
    [
        30 + (20 * Math.Sin(i / 300.0)),
        30 + (20 * Math.Cos(i / 400.0)),
        10 + (10 * Math.Sin(i / 250.0)),
    ];

    public static double Outdoor(long i) => 15 + (10 * Math.Sin(i / 1000.0));

    public static PlanRequest Plan(long i) => new()
    {
        State = State(i),
        PreviousInput = PreviousInput(i),
        Disturbance = VectorOrRows.Held(Outdoor(i)),
    };

    public static ReplayRowRequest Replay(long i) => new()
    {
        State = State(i),
        PreviousInput = PreviousInput(i),
        Disturbance = VectorOrRows.Held(Outdoor(i)),
    };
}
