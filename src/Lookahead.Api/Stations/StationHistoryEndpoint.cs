using Lookahead.Api.Access;
using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Api.Storage;
using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Stations;

/// <summary>GET /v1/stations/{name}/steps: the station's most recent steps as JSON, or as CSV with ?format=csv.</summary>
public static class StationHistoryEndpoint
{
    public const int DefaultLimit = 100;

    public static async Task<Results<Ok<StationStepHistory>, FileContentHttpResult, ProblemHttpResult>> GetStepsAsync(
        string name,
        HttpContext context,
        IStationStore stations,
        ModelCatalog catalog,
        RequestBodyReader reader,
        IOptions<StationOptions> options,
        CancellationToken cancellationToken,
        int? limit = null,
        string? format = null)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return StationProblems.MalformedName(name);
        }

        int kept = Math.Max(1, options.Value.HistoryLength);
        var errors = new List<ProblemError>();
        if (limit is < 1 || limit > kept)
        {
            errors.Add(new("limit", $"must be between 1 and {kept} (the steps each station keeps)"));
        }

        if (format is not (null or "json" or "csv"))
        {
            errors.Add(new("format", "must be 'json' or 'csv'"));
        }

        if (errors.Count > 0)
        {
            return ApiProblems.Validation(errors);
        }

        string tenant = Tenants.Of(context);
        var station = await stations.GetStationAsync(tenant, name, cancellationToken);
        if (station is null)
        {
            return StationProblems.NotFound(name);
        }

        var json = reader.SerializerOptions;
        var logs = await stations.GetStepsAsync(tenant, name, limit ?? Math.Min(DefaultLimit, kept), cancellationToken);
        var entries = logs
            .Select(s => new StationStepEntry(s.Sequence, s.SteppedAt, StationJson.Read<StationStepRequest>(s.Request, json), StationJson.Read<StationStepResponse>(s.Answer, json)))
            .ToList();
        if (format != "csv")
        {
            return TypedResults.Ok(new StationStepHistory(name, entries));
        }

        // Columns are named from the model the station steps with now; without it (deleted), by position.
        var model = await catalog.GetCompiledAsync(tenant, station.ModelId);
        var last = entries.Count > 0 ? entries[^1].Answer : null;
        byte[] table = model is not null
            ? StationHistoryCsv.Write(entries, model.Document.Labels, model.StateCount, model.InputCount, model.OutputCount, model.Estimator?.DisturbanceCount ?? 0)
            : StationHistoryCsv.Write(
                entries,
                null,
                last?.Estimate.State?.Length ?? 0,
                last?.AppliedInput.Length ?? 0,
                entries.Count > 0 ? entries[^1].Request.Measurement?.Length ?? 0 : 0,
                last?.Estimate.Disturbance?.Length ?? 0);
        return TypedResults.File(table, StationHistoryCsv.ContentType + "; charset=utf-8", $"{name}-steps.csv");
    }
}
