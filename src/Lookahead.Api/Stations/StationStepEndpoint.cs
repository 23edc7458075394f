using System.Diagnostics;
using System.Security.Cryptography;
using System.Text.Json;
using Lookahead.Api.Access;
using Lookahead.Api.Catalog;
using Lookahead.Api.Estimation;
using Lookahead.Api.Http;
using Lookahead.Api.Models;
using Lookahead.Api.Plans;
using Lookahead.Api.Storage;
using Lookahead.Core.Estimation;
using Lookahead.Core.Planning;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Stations;

/// <summary>
/// POST /v1/stations/{name}/step: one sample of a station's loop. Steps of one station are serialised here (one gate
/// per name) and guarded by their sequence in the store (between instances); the answer goes out only after the new
/// state and the history entry are committed.
/// </summary>
public static class StationStepEndpoint
{
    public static async Task<Results<Ok<StationStepResponse>, ProblemHttpResult>> StepAsync(string name, [AsParameters] StationServices services)
    {
        if (!AliasName.IsWellFormed(name))
        {
            return StationProblems.MalformedName(name);
        }

        long started = Stopwatch.GetTimestamp();
        services.Log.Set("Station", name);
        var body = await services.Reader.ReadJsonAsync<StationStepRequest>(services.Request, services.CancellationToken);
        if (body.Problem is not null)
        {
            return body.Problem;
        }

        var step = body.Value!;
        if (step.Sequence is not { } sequence)
        {
            return ApiProblems.Validation("sequence", "is required: the station's current sequence (0 for a new station)");
        }

        var json = services.Reader.SerializerOptions;

        // The body as the service understood it, written back out: key order, spacing and number spelling do not change it.
        string hash = Convert.ToHexStringLower(SHA256.HashData(StationJson.Bytes(step, json)));
        string tenant = Tenants.Of(services.Request.HttpContext);
        var gate = services.Locks.For(tenant, name);
        await gate.WaitAsync(services.CancellationToken);
        try
        {
            var station = await services.Stations.GetStationAsync(tenant, name, services.CancellationToken);
            if (station is null)
            {
                return StationProblems.NotFound(name);
            }

            if (sequence != station.Sequence)
            {
                return Repeat(station, name, sequence, hash, services);
            }

            var warnings = new List<Warning>();
            var binding = await ResolveAsync(station, warnings, services);
            if (binding.Problem is not null)
            {
                return binding.Problem;
            }

            var model = binding.Model!;
            var carried = Carry(station, model, binding.ModelId, step, warnings, services, out var timestampProblem);
            if (timestampProblem is not null)
            {
                return timestampProblem;
            }

            var (outcome, errors) = StationStep.Run(model, step, carried, services.Runner);
            if (outcome is null)
            {
                return ApiProblems.Validation(errors);
            }

            warnings.AddRange(outcome.Warnings);
            string? alias = ModelId.IsWellFormed(station.ModelReference) ? null : station.ModelReference;
            var estimate = new StateEstimateDto(outcome.Estimate.State, outcome.Estimate.Disturbance);
            var answer = new StationStepResponse(
                sequence + 1,
                binding.ModelId,
                estimate,
                outcome.AppliedInput,
                outcome.FirstMove,
                outcome.Plan is { } plan ? PlanMapping.ToResponse(binding.ModelId, alias, plan, outcome.SolveMicroseconds) : null,
                outcome.Status,
                carried.MissedSamples,
                WarningText.ToDtos(warnings));
            var now = services.Time.GetUtcNow();
            string answerJson = StationJson.Write(answer, json);
            var next = station with
            {
                ModelId = binding.ModelId,
                Sequence = sequence + 1,
                StepCount = station.StepCount + 1,
                Estimate = StationJson.Write(estimate, json),
                LastAppliedInput = StationJson.Write(outcome.AppliedInput, json),
                LastFirstMove = outcome.FirstMove is null ? null : StationJson.Write(outcome.FirstMove, json),
                LastRequestHash = hash,
                LastAnswer = answerJson,
                LastTimestamp = step.Timestamp,
                UpdatedAt = now,
            };
            int keep = services.Options.Value.HistoryLength;
            var entry = keep == 0 ? null : new StationStepLog(name, sequence, now, StationJson.Write(step, json), answerJson);

            // The final guard, for another instance on the same store (or a re-bind meanwhile): the write only
            // lands on the sequence and model this step was computed from.
            if (!await services.Stations.CommitStepAsync(new StationCommit(next, sequence, station.ModelId, entry, keep), services.CancellationToken))
            {
                var current = await services.Stations.GetStationAsync(tenant, name, services.CancellationToken);
                return current is null ? StationProblems.NotFound(name) : Repeat(current, name, sequence, hash, services);
            }

            string mode = step.Mode ?? StationStep.Auto;
            services.Metrics.Steps.WithLabels(mode, outcome.Status).Inc();
            services.Metrics.Duration.Observe(Stopwatch.GetElapsedTime(started).TotalSeconds);
            services.Events.Stepped(name, sequence + 1, mode, outcome.Status, binding.ModelId);
            services.Log.Set("ModelId", binding.ModelId);
            services.Log.Set("PlanStatus", outcome.Status);
            return TypedResults.Ok(answer);
        }
        finally
        {
            gate.Release();
        }
    }

    /// <summary>The model id the station steps with now, and its compiled model: a station bound to an alias follows it.</summary>
    private static async Task<(string ModelId, CompiledModel? Model, ProblemHttpResult? Problem)> ResolveAsync(
        StationRecord station, List<Warning> warnings, StationServices services)
    {
        string modelId = station.ModelId;
        if (!ModelId.IsWellFormed(station.ModelReference))
        {
            var alias = await services.Models.GetAliasAsync(station.Tenant, station.ModelReference, services.CancellationToken);
            if (alias is null)
            {
                // The loop keeps running on the tuning it had: an alias removed by mistake must not stop a plant.
                warnings.Add(new Warning(WarningCode.AliasGoneModelKept));
                services.Events.AliasGone(station.Name, station.ModelReference, modelId);
            }
            else
            {
                modelId = alias.ModelId;
            }
        }

        var model = await services.Catalog.GetCompiledAsync(station.Tenant, modelId);
        return model is null
            ? (modelId, null, ModelProblems.ModelNotFound(modelId, "model"))
            : (modelId, model, null);
    }

    /// <summary>
    /// What the step starts from: the stored estimate, unless the model changed dimensions or too many samples were
    /// missed (then the estimate starts over from this measurement, and the answer says why).
    /// </summary>
    private static StationStep.Carried Carry(
        StationRecord station, CompiledModel model, string modelId, StationStepRequest step, List<Warning> warnings, StationServices services, out ProblemHttpResult? problem)
    {
        problem = null;
        var json = services.Reader.SerializerOptions;
        var stored = station.Estimate is null ? null : StationJson.Read<StateEstimateDto>(station.Estimate, json);
        StateEstimate? previous = stored is null ? null : new StateEstimate(stored.State!, stored.Disturbance ?? []);
        double[]? lastMove = station.LastFirstMove is null ? null : StationJson.Read<double[]>(station.LastFirstMove, json);
        if (lastMove is not null && lastMove.Length != model.InputCount)
        {
            lastMove = null;
        }

        if (modelId != station.ModelId)
        {
            bool fits = previous is not null
                && previous.State.Length == model.StateCount
                && previous.Disturbance.Length == (model.Estimator?.DisturbanceCount ?? 0);
            if (previous is not null)
            {
                warnings.Add(new Warning(fits ? WarningCode.ModelChangedEstimateKept : WarningCode.ModelChangedEstimateRestarted));
                if (!fits)
                {
                    services.Metrics.Restarts.WithLabels("model").Inc();
                }
            }

            services.Events.ModelChanged(station.Name, station.ModelReference, station.ModelId, modelId, fits ? "carried over" : "started over");
            previous = fits ? previous : null;
        }

        long missed = StationGap.MissedSamples(station.LastTimestamp, step.Timestamp, model.SampleTime, services.Options.Value.MaxMissedSamples);
        if (missed < 0)
        {
            problem = ApiProblems.Validation("timestamp", $"is not later than the last step's ({station.LastTimestamp:O}); a station's steps go forward in time");
            return new StationStep.Carried(previous, lastMove, 0, false);
        }

        if (missed > services.Options.Value.MaxMissedSamples && previous is not null)
        {
            warnings.Add(new Warning(WarningCode.StationRestartedAfterGap) { Count = (int)Math.Min(missed, int.MaxValue) });
            services.Metrics.Restarts.WithLabels("gap").Inc();
            services.Events.RestartedAfterGap(station.Name, (int)Math.Min(missed, int.MaxValue));
            previous = null;
            missed = 0;
        }

        return new StationStep.Carried(previous, lastMove, previous is null ? 0 : (int)missed, station.Detail == StationDetail.Full);
    }

    /// <summary>An identical retry of the last applied step gets its stored answer; any other sequence is stale.</summary>
    private static Results<Ok<StationStepResponse>, ProblemHttpResult> Repeat(StationRecord station, string name, long given, string hash, StationServices services)
    {
        if (given == station.Sequence - 1 && station.LastRequestHash == hash && station.LastAnswer is { } stored)
        {
            services.Metrics.Retries.Inc();
            return TypedResults.Ok(StationJson.Read<StationStepResponse>(stored, services.Reader.SerializerOptions));
        }

        services.Metrics.Conflicts.Inc();
        services.Events.Conflict(name, given, station.Sequence);
        return StationProblems.StaleSequence(name, given, station.Sequence);
    }
}
