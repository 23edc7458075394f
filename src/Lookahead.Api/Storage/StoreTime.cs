namespace Lookahead.Api.Storage;

/// <summary>Timestamps are stored as Unix milliseconds in both stores: exact, sortable and free of time-zone rules.</summary>
internal static class StoreTime
{
    public static long ToStored(DateTimeOffset at) => at.ToUnixTimeMilliseconds();

    public static DateTimeOffset FromStored(long milliseconds) => DateTimeOffset.FromUnixTimeMilliseconds(milliseconds);

    /// <summary>A plant's own timestamps keep their full resolution (100 ns, UTC): fast loops sample below a millisecond.</summary>
    public static long ToTicks(DateTimeOffset at) => at.UtcTicks;

    public static DateTimeOffset FromTicks(long ticks) => new(ticks, TimeSpan.Zero);
}
