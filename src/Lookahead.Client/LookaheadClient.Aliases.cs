namespace Lookahead.Client;

public sealed partial class LookaheadClient
{
    /// <summary>PUT /v1/aliases/{name}: points the alias at a model (creating it when new).</summary>
    public Task<AliasDetails> SetAliasAsync(string name, string modelId, CancellationToken cancellationToken = default) =>
        SendJsonAsync<AliasDetails>(HttpMethod.Put, $"v1/aliases/{Segment(name)}", new AliasTarget(modelId), cancellationToken);

    public Task<AliasDetails> GetAliasAsync(string name, CancellationToken cancellationToken = default) =>
        SendJsonAsync<AliasDetails>(HttpMethod.Get, $"v1/aliases/{Segment(name)}", null, cancellationToken);

    public Task DeleteAliasAsync(string name, CancellationToken cancellationToken = default) =>
        SendWithoutAnswerAsync(HttpMethod.Delete, $"v1/aliases/{Segment(name)}", cancellationToken);

    private sealed record AliasTarget(string ModelId);
}
