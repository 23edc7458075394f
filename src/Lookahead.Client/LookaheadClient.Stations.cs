namespace Lookahead.Client;

public sealed partial class LookaheadClient
{
    /// <summary>
    /// PUT /v1/stations/{name}: binds the station to a model id or an alias name; <paramref name="detail"/> "full" makes
    /// each step answer with the whole plan. Replacing a station starts it over at sequence 0.
    /// </summary>
    public Task<StationDetails> SetStationAsync(string name, string model, string? detail = null, CancellationToken cancellationToken = default) =>
        SendJsonAsync<StationDetails>(HttpMethod.Put, $"v1/stations/{Segment(name)}", new StationBinding(model, detail), cancellationToken);

    public Task<StationDetails> GetStationAsync(string name, CancellationToken cancellationToken = default) =>
        SendJsonAsync<StationDetails>(HttpMethod.Get, $"v1/stations/{Segment(name)}", null, cancellationToken);

    public Task DeleteStationAsync(string name, CancellationToken cancellationToken = default) =>
        SendWithoutAnswerAsync(HttpMethod.Delete, $"v1/stations/{Segment(name)}", cancellationToken);

    /// <summary>
    /// POST /v1/stations/{name}/step. A retry of the last applied step with the same body gets the stored answer, so
    /// retrying after a 429 or 503 never steps twice; a wrong sequence is a 409 whose
    /// <see cref="LookaheadProblemException.Extensions"/> carry <c>currentSequence</c>.
    /// </summary>
    public Task<StationStepResult> StepStationAsync(string name, StationStepRequest request, CancellationToken cancellationToken = default) =>
        SendJsonAsync<StationStepResult>(HttpMethod.Post, $"v1/stations/{Segment(name)}/step", request, cancellationToken);

    private sealed record StationBinding(string Model, string? Detail);
}
