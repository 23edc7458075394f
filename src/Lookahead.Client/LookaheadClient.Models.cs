namespace Lookahead.Client;

public sealed partial class LookaheadClient
{
    /// <summary>POST /v1/models: validates, compiles and stores the model; the id is the hash of its canonical content.</summary>
    public Task<ModelRegistration> RegisterModelAsync(ModelDocument model, CancellationToken cancellationToken = default) =>
        SendJsonAsync<ModelRegistration>(HttpMethod.Post, "v1/models", model, cancellationToken);

    /// <summary>POST /v1/models with a document as written (e.g. read from a file), so the service judges every field of it.</summary>
    public Task<ModelRegistration> RegisterModelJsonAsync(string modelJson, CancellationToken cancellationToken = default) =>
        SendRawJsonAsync<ModelRegistration>(HttpMethod.Post, "v1/models", modelJson, cancellationToken);

    public Task<ModelDetails> GetModelAsync(string id, CancellationToken cancellationToken = default) =>
        SendJsonAsync<ModelDetails>(HttpMethod.Get, $"v1/models/{Segment(id)}", null, cancellationToken);

    /// <summary>One page of the models this key's tenant holds, in registration order.</summary>
    public Task<ModelPage> ListModelsAsync(int offset = 0, int limit = 100, CancellationToken cancellationToken = default) =>
        SendJsonAsync<ModelPage>(HttpMethod.Get, FormattableString.Invariant($"v1/models?offset={offset}&limit={limit}"), null, cancellationToken);

    /// <summary>Every model, page by page, as the pages arrive.</summary>
    public async IAsyncEnumerable<ModelSummary> ListAllModelsAsync(int pageSize = 100, [System.Runtime.CompilerServices.EnumeratorCancellation] CancellationToken cancellationToken = default)
    {
        for (int offset = 0; ; )
        {
            var page = await ListModelsAsync(offset, pageSize, cancellationToken);
            foreach (var item in page.Items)
            {
                yield return item;
            }

            offset += page.Items.Count;
            if (page.Items.Count == 0 || offset >= page.Total)
            {
                yield break;
            }
        }
    }

    /// <summary>Refused with 409 while an alias points at the model.</summary>
    public Task DeleteModelAsync(string id, CancellationToken cancellationToken = default) =>
        SendWithoutAnswerAsync(HttpMethod.Delete, $"v1/models/{Segment(id)}", cancellationToken);

    public Task<GainResult> GetGainAsync(string id, CancellationToken cancellationToken = default) =>
        SendJsonAsync<GainResult>(HttpMethod.Get, $"v1/models/{Segment(id)}/gain", null, cancellationToken);
}

/// <summary>u₀ = −K x₀ for regulation without a previous input, and the closed loop it gives.</summary>
public sealed record GainResult(string ModelId, double[][] K, IReadOnlyList<ComplexNumber> ClosedLoopEigenvalues, double SpectralRadius);
