using Lookahead.Core.Planning;

namespace Lookahead.Api.Http;

/// <summary>Every warning code the service writes: the core's (by their wire names) and the HTTP shell's own.</summary>
public static class WarningCodes
{
    /// <summary>A JSON replay's "detail" came after "requests", too late to apply.</summary>
    public const string DetailAfterRequests = "detail-after-requests";

    public static IEnumerable<string> All => Enum.GetValues<WarningCode>().Select(WireNames.Warning).Append(DetailAfterRequests);

    public static IEnumerable<string> PlanStatuses => Enum.GetValues<PlanStatus>().Select(WireNames.Status);

    public static IEnumerable<string> LimitKinds => Enum.GetValues<LimitKind>().Select(WireNames.Limit);
}
