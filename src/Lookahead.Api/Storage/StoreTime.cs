namespace Lookahead.Api.Storage;

/// <summary>Timestamps are stored as Unix milliseconds in both stores: exact, sortable and free of time-zone rules.</summary>
internal static class StoreTime
{
    public static long ToStored(DateTimeOffset at) => at.ToUnixTimeMilliseconds();

    public static DateTimeOffset FromStored(long milliseconds) => DateTimeOffset.FromUnixTimeMilliseconds(milliseconds);
}
