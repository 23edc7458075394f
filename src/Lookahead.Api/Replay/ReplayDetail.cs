namespace Lookahead.Api.Replay;

/// <summary>How much of each plan a replay writes back.</summary>
public enum ReplayDetail
{
    /// <summary>First move, cost and status: what a historian needs to compare with what was applied.</summary>
    FirstMove,

    /// <summary>Every field of a single plan response.</summary>
    Full,
}

public static class ReplayDetails
{
    public static bool TryParse(string? value, out ReplayDetail detail)
    {
        switch (value)
        {
            case "first-move":
                detail = ReplayDetail.FirstMove;
                return true;
            case "full":
                detail = ReplayDetail.Full;
                return true;
            default:
                detail = ReplayDetail.FirstMove;
                return false;
        }
    }

    public static string Name(ReplayDetail detail) => detail == ReplayDetail.Full ? "full" : "first-move";
}
