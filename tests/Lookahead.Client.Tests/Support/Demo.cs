namespace Lookahead.Client.Tests.Support;

/// <summary>The cold-store demo the service registers at start, under its alias.</summary>
public static class Demo
{
    public const string Alias = "cold-store-demo";

    /// <summary>The demo model's id, read through its alias.</summary>
    public static async Task<string> IdAsync(LookaheadClient client) => (await client.GetAliasAsync(Alias)).ModelId;
}
