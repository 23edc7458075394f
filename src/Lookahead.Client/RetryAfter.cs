using System.Net.Http.Headers;

namespace Lookahead.Client;

/// <summary>Reads a Retry-After header in either of its forms (seconds, or an HTTP date).</summary>
internal static class RetryAfter
{
    public static TimeSpan? Read(HttpResponseMessage response, TimeProvider clock)
    {
        RetryConditionHeaderValue? header = response.Headers.RetryAfter;
        if (header?.Delta is { } delta)
        {
            return delta < TimeSpan.Zero ? TimeSpan.Zero : delta;
        }

        if (header?.Date is { } date)
        {
            var wait = date - clock.GetUtcNow();
            return wait < TimeSpan.Zero ? TimeSpan.Zero : wait;
        }

        return null;
    }
}
