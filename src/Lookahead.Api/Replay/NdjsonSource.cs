using System.Buffers;
using System.IO.Pipelines;
using Lookahead.Api.Http;
using Lookahead.Api.Plans;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>One request per line. Blank lines are skipped but counted, so a row number is always the line number.</summary>
internal sealed class NdjsonSource(PipeReader reader, int maxRowBytes, int maxDepth) : IReplaySource
{
    private long line;
    private bool ended;
    private bool skippingLongLine;

    public ReplayMode Mode { get; private set; }

    public IReadOnlyList<ProblemError> ChooseMode(ReplayBatch first, CompiledModel model)
    {
        var (mode, errors) = ReplayModeProbe.Choose(first, model, PathPrefix, maxDepth);
        Mode = mode;
        return errors;
    }

    public string PathPrefix(ReplayRow row) => "";

    public async ValueTask<bool> FillAsync(ReplayBatch batch, CancellationToken cancellationToken)
    {
        batch.Clear();
        while (!ended && !batch.IsFull)
        {
            ReadResult result;
            try
            {
                result = await reader.ReadAsync(cancellationToken);
            }
            catch (ReplayBodyTooLargeException ex)
            {
                Fail(batch, ex.Message);
                break;
            }

            var buffer = result.Buffer;
            while (!batch.IsFull && buffer.PositionOf((byte)'\n') is { } newline)
            {
                var text = buffer.Slice(0, newline);
                buffer = buffer.Slice(buffer.GetPosition(1, newline));
                if (skippingLongLine)
                {
                    skippingLongLine = false;
                    continue;
                }

                Take(batch, text);
            }

            if (batch.IsFull)
            {
                reader.AdvanceTo(buffer.Start);
                break;
            }

            if (result.IsCompleted)
            {
                if (!buffer.IsEmpty && !skippingLongLine)
                {
                    Take(batch, buffer);
                }

                reader.AdvanceTo(buffer.End);
                ended = true;
                break;
            }

            if (buffer.Length > maxRowBytes)
            {
                // A line longer than allowed: report it once and drop bytes until its newline.
                if (!skippingLongLine)
                {
                    batch.Next(++line).AddError("", $"the line is longer than {maxRowBytes} bytes");
                    skippingLongLine = true;
                }

                reader.AdvanceTo(buffer.End);
                continue;
            }

            reader.AdvanceTo(buffer.Start, buffer.End);
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
            EstimationRowParser.Parse(row.RawSpan, row, "", maxDepth);
        }
        else
        {
            PlanRequestParser.Parse(row.RawSpan, row, "", maxDepth);
        }
    }

    private void Take(ReplayBatch batch, ReadOnlySequence<byte> text)
    {
        line++;
        if (text.Length > 0 && text.Slice(text.Length - 1).FirstSpan[0] == (byte)'\r')
        {
            text = text.Slice(0, text.Length - 1);
        }

        if (IsBlank(text))
        {
            return;
        }

        var row = batch.Next(line);
        if (text.Length > maxRowBytes)
        {
            row.AddError("", $"the line is longer than {maxRowBytes} bytes");
            return;
        }

        row.SetRaw(text);
    }

    private void Fail(ReplayBatch batch, string reason)
    {
        var row = batch.Next(++line);
        row.AddError("", reason);
        row.Fatal = true;
        ended = true;
    }

    private static bool IsBlank(ReadOnlySequence<byte> text)
    {
        foreach (var segment in text)
        {
            foreach (byte b in segment.Span)
            {
                if (b is not ((byte)' ' or (byte)'\t'))
                {
                    return false;
                }
            }
        }

        return true;
    }
}
