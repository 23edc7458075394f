namespace Lookahead.Api.Replay;

/// <summary>What the rows of one replay carry, chosen once per replay from its CSV header or its first JSON row.</summary>
internal enum ReplayMode
{
    /// <summary>A measured state (or an estimate) per row; rows are independent and planned in parallel.</summary>
    States,

    /// <summary>A measurement and the applied input per row; the model's estimator runs through the rows in time order.</summary>
    Measurements,
}
