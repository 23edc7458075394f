using System.Buffers;
using System.IO.Pipelines;
using System.Text.Json;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>
/// Streams the elements of "requests" out of { "detail"?, "requests": [ … ] } with a resumable Utf8JsonReader,
/// one element at a time, so the body is never held whole. "detail" counts only if it comes before "requests"
/// (it decides how results are written, and they are written as they come); a later one is reported as a warning.
/// </summary>
internal sealed class JsonRequestsSource(PipeReader reader, int maxRowBytes, int maxDepth) : IReplaySource
{
    private enum Stage
    {
        Start,
        Properties,
        Requests,
        Skipping,
        Done,
    }

    private JsonReaderState state = new(new JsonReaderOptions { MaxDepth = maxDepth });
    private Stage stage = Stage.Start;
    private long index;
    private int skipDepth;
    private bool ended;
    private bool sawRequests;

    public string? Detail { get; private set; }

    public ReplayMode Mode { get; private set; }

    public IReadOnlyList<ProblemError> ChooseMode(ReplayBatch first, CompiledModel model)
    {
        var (mode, errors) = ReplayModeProbe.Choose(first, model, PathPrefix, maxDepth);
        Mode = mode;
        return errors;
    }

    public string PathPrefix(ReplayRow row) => $"requests[{row.Number - 1}].";

    public List<WarningDto> Warnings { get; } = [];

    /// <summary>Reads up to the first element of "requests". A problem here is the client's whole request, answered with 400.</summary>
    public async ValueTask<ProblemError?> PrepareAsync(CancellationToken cancellationToken)
    {
        var scratch = new ReplayBatch(1, 0, 0, 0);
        while (stage is Stage.Start or Stage.Properties && !ended)
        {
            var problem = await StepAsync(scratch, cancellationToken);
            if (problem is not null)
            {
                return problem;
            }
        }

        return sawRequests ? null : new ProblemError("requests", "is required: an array of plan requests");
    }

    public async ValueTask<bool> FillAsync(ReplayBatch batch, CancellationToken cancellationToken)
    {
        batch.Clear();

        // Reading goes on past the end of the object: only whitespace may follow it, and anything else is reported.
        while (!ended && !batch.IsFull)
        {
            var problem = await StepAsync(batch, cancellationToken);
            if (problem is not null)
            {
                var row = batch.Next(++index);
                row.AddError(problem.Path, problem.Reason);
                row.Fatal = true;
                ended = true;
            }
        }

        return batch.Count > 0;
    }

    public void Parse(ReplayRow row)
    {
        if (row.Errors.Count > 0)
        {
            return;
        }

        if (Mode == ReplayMode.Measurements)
        {
            EstimationRowParser.Parse(row.RawSpan, row, PathPrefix(row), maxDepth);
        }
        else
        {
            PlanRequestParser.Parse(row.RawSpan, row, PathPrefix(row), maxDepth);
        }
    }

    private async ValueTask<ProblemError?> StepAsync(ReplayBatch batch, CancellationToken cancellationToken)
    {
        ReadResult result;
        try
        {
            result = await reader.ReadAsync(cancellationToken);
        }
        catch (ReplayBodyTooLargeException ex)
        {
            return new ProblemError("", ex.Message);
        }

        var buffer = result.Buffer;
        try
        {
            var (consumed, needMore, problem) = Advance(buffer, result.IsCompleted, batch);
            if (problem is null && needMore && result.IsCompleted && stage != Stage.Done)
            {
                problem = new ProblemError("", stage == Stage.Start
                    ? "the body is empty: expected { \"requests\": [ … ] }"
                    : "the body ended before the JSON was complete");
            }

            // Examined up to the end only when more bytes are needed; otherwise the rest is read again at once.
            reader.AdvanceTo(consumed, needMore ? buffer.End : consumed);
            if (problem is not null || (result.IsCompleted && stage == Stage.Done))
            {
                ended = true;
            }

            return problem;
        }
        catch (JsonException ex)
        {
            reader.AdvanceTo(buffer.End);
            ended = true;
            string where = ex.LineNumber is long line ? $" (line {line + 1}, position {ex.BytePositionInLine + 1})" : "";
            return new ProblemError(stage == Stage.Requests ? $"requests[{index}]" : "", "is not valid JSON" + where + ": " + ex.Message.Split(" LineNumber", 2)[0].Split(" Path:", 2)[0].Trim());
        }
    }

    /// <summary>Consumes as many whole tokens and elements as the buffer holds; returns where the next read must resume.</summary>
    private (SequencePosition Consumed, bool NeedMore, ProblemError? Problem) Advance(ReadOnlySequence<byte> buffer, bool final, ReplayBatch batch)
    {
        var json = new Utf8JsonReader(buffer, final, state);
        SequencePosition safe = json.Position;
        while (!batch.IsFull)
        {
            var before = json.CurrentState;
            var beforePosition = json.Position;
            if (stage == Stage.Skipping)
            {
                if (!json.Read())
                {
                    return (safe, true, null);
                }

                skipDepth += json.TokenType is JsonTokenType.StartObject or JsonTokenType.StartArray ? 1
                    : json.TokenType is JsonTokenType.EndObject or JsonTokenType.EndArray ? -1 : 0;
                if (skipDepth == 0)
                {
                    stage = Stage.Requests;
                }

                safe = json.Position;
                state = json.CurrentState;
                continue;
            }

            if (!json.Read())
            {
                return (safe, true, null);
            }

            switch (stage)
            {
                case Stage.Start:
                    if (json.TokenType != JsonTokenType.StartObject)
                    {
                        return (safe, false, new ProblemError("", "must be an object: { \"detail\"?, \"requests\": [ … ] }"));
                    }

                    stage = Stage.Properties;
                    break;

                case Stage.Properties:
                    if (json.TokenType == JsonTokenType.EndObject)
                    {
                        stage = Stage.Done;
                        break;
                    }

                    JsonText.CheckName(ref json);
                    if (json.ValueTextEquals("detail"u8))
                    {
                        if (!json.Read())
                        {
                            state = before;
                            return (beforePosition, true, null);
                        }

                        var value = json.TokenType == JsonTokenType.String ? JsonText.GetString(ref json) : null;
                        if (!ReplayDetails.TryParse(value, out _))
                        {
                            return (safe, false, new ProblemError("detail", "must be 'first-move' or 'full'"));
                        }

                        if (sawRequests)
                        {
                            if (value != Detail)
                            {
                                Warnings.Add(new WarningDto(WarningCodes.DetailAfterRequests, $"'detail' came after 'requests' and was ignored; results were written as '{Detail ?? "first-move"}'. Send it first, or use ?detail="));
                            }
                        }
                        else
                        {
                            Detail = value;
                        }
                    }
                    else if (json.ValueTextEquals("requests"u8))
                    {
                        if (!json.Read())
                        {
                            state = before;
                            return (beforePosition, true, null);
                        }

                        if (json.TokenType != JsonTokenType.StartArray)
                        {
                            return (safe, false, new ProblemError("requests", "must be an array of plan requests"));
                        }

                        sawRequests = true;
                        stage = Stage.Requests;
                        safe = json.Position;
                        state = json.CurrentState;
                        return (safe, false, null);
                    }
                    else
                    {
                        return (safe, false, new ProblemError(JsonText.GetString(ref json), "is not a known field (expected 'detail' and 'requests')"));
                    }

                    break;

                case Stage.Requests:
                    if (json.TokenType == JsonTokenType.EndArray)
                    {
                        stage = Stage.Properties;
                        break;
                    }

                    long start = json.TokenStartIndex;
                    if (json.TokenType is JsonTokenType.StartObject or JsonTokenType.StartArray)
                    {
                        if (!json.TrySkip())
                        {
                            if (buffer.Length - start > maxRowBytes)
                            {
                                // Too long to hold: report it and stream past it token by token.
                                batch.Next(++index).AddError($"requests[{index - 1}]", $"is longer than {maxRowBytes} bytes");
                                stage = Stage.Skipping;
                                skipDepth = 1;
                                safe = json.Position;
                                state = json.CurrentState;
                                continue;
                            }

                            state = before;
                            return (beforePosition, true, null);
                        }

                        var element = buffer.Slice(start, json.Position);
                        var row = batch.Next(++index);
                        if (element.Length > maxRowBytes)
                        {
                            row.AddError($"requests[{index - 1}]", $"is longer than {maxRowBytes} bytes");
                        }
                        else
                        {
                            row.SetRaw(element);
                        }
                    }
                    else
                    {
                        batch.Next(++index).AddError($"requests[{index - 1}]", "must be an object with a 'state' array");
                    }

                    break;

                case Stage.Done:
                    return (safe, false, new ProblemError("", "has content after the end of the object"));
            }

            safe = json.Position;
            state = json.CurrentState;
            if (stage == Stage.Done)
            {
                break;
            }
        }

        return (safe, false, null);
    }
}
