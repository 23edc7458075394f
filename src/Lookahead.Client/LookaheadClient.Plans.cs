namespace Lookahead.Client;

public sealed partial class LookaheadClient
{
    /// <summary>POST /v1/models/{id}/plan.</summary>
    public Task<PlanResult> PlanAsync(string modelId, PlanRequest request, CancellationToken cancellationToken = default) =>
        SendJsonAsync<PlanResult>(HttpMethod.Post, $"v1/models/{Segment(modelId)}/plan", request, cancellationToken);

    /// <summary>POST /v1/aliases/{name}/plan: plans with the model the alias points at now.</summary>
    public Task<PlanResult> PlanWithAliasAsync(string alias, PlanRequest request, CancellationToken cancellationToken = default) =>
        SendJsonAsync<PlanResult>(HttpMethod.Post, $"v1/aliases/{Segment(alias)}/plan", request, cancellationToken);

    /// <summary>The plan as an SVG chart (<c>?format=svg</c>).</summary>
    public Task<string> PlanChartAsync(string modelId, PlanRequest request, CancellationToken cancellationToken = default) =>
        SendForTextAsync(HttpMethod.Post, $"v1/models/{Segment(modelId)}/plan?format=svg", request, cancellationToken);

    /// <summary>POST /v1/models/{id}/simulate: a closed-loop run.</summary>
    public Task<SimulationResult> SimulateAsync(string modelId, SimulationRequest request, CancellationToken cancellationToken = default) =>
        SendJsonAsync<SimulationResult>(HttpMethod.Post, $"v1/models/{Segment(modelId)}/simulate", request, cancellationToken);

    /// <summary>The closed-loop run as an SVG chart (<c>?format=svg</c>).</summary>
    public Task<string> SimulateChartAsync(string modelId, SimulationRequest request, CancellationToken cancellationToken = default) =>
        SendForTextAsync(HttpMethod.Post, $"v1/models/{Segment(modelId)}/simulate?format=svg", request, cancellationToken);

    /// <summary>POST /v1/models/{id}/estimate: one stateless estimator sample.</summary>
    public Task<EstimateResult> EstimateAsync(string modelId, EstimateRequest request, CancellationToken cancellationToken = default) =>
        SendJsonAsync<EstimateResult>(HttpMethod.Post, $"v1/models/{Segment(modelId)}/estimate", request, cancellationToken);
}
