namespace Lookahead.Api.Stations;

/// <summary>What a station's steps answer with.</summary>
public static class StationDetail
{
    /// <summary>The move to apply now (the default): what a loop needs every sample.</summary>
    public const string FirstMove = "first-move";

    /// <summary>The whole plan as /plan returns it, for a display or a tuning session.</summary>
    public const string Full = "full";
}
