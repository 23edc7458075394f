using System.Buffers;
using Lookahead.Api.Contracts;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>
/// One reusable slot of a replay batch: the row's raw bytes, the parsed vectors, the plan and the formatted
/// result. Slots are recycled batch after batch, which is what keeps replay memory constant.
/// </summary>
internal sealed class ReplayRow
{
    public ReplayRow(int n, int m, int p)
    {
        State = new double[n];
        Reference = new double[p];
        PreviousInput = new double[m];
        FirstMove = new double[m];
    }

    public long Number { get; private set; }

    public byte[] Raw { get; private set; } = new byte[512];

    public int RawLength { get; private set; }

    public ReadOnlySpan<byte> RawSpan => Raw.AsSpan(0, RawLength);

    /// <summary>CSV only: where each field sits in <see cref="Raw"/>.</summary>
    public List<(int Start, int Length)> Fields { get; } = [];

    public double[] State { get; }

    public double[] Reference { get; }

    public double[] PreviousInput { get; }

    public bool HasReference { get; set; }

    public bool HasPreviousInput { get; set; }

    public List<ProblemError> Errors { get; } = [];

    /// <summary>Stops the rest of the body from being read (set by the source for a broken stream).</summary>
    public bool Fatal { get; set; }

    /// <summary>The full plan, only when the sink asked for every field.</summary>
    public Plan? Plan { get; set; }

    /// <summary>u_0 of a planned row (filled for every detail level).</summary>
    public double[] FirstMove { get; }

    /// <summary>Status, cost and warnings of a planned row; null for a row that failed.</summary>
    public FirstMoveResult? Outcome { get; set; }

    /// <summary>The warnings to show: the plan's own, or a sentence for a status that came without one.</summary>
    public IReadOnlyList<string> Warnings =>
        Outcome is not { } outcome ? [] :
        outcome.Status == PlanStatus.Optimal || outcome.Warnings.Count > 0 ? outcome.Warnings : [Mapping.PlanMapper.StatusWarning(outcome.Status)];

    public ArrayBufferWriter<byte> Output { get; } = new(256);

    /// <summary>CSV only: where each formatted number sits in <see cref="Output"/>.</summary>
    public List<(int Start, int Length)> OutputFields { get; } = [];

    public void Reset(long number)
    {
        Number = number;
        RawLength = 0;
        Fields.Clear();
        HasReference = false;
        HasPreviousInput = false;
        Errors.Clear();
        Fatal = false;
        Plan = null;
        Outcome = null;
        Output.ResetWrittenCount();
        OutputFields.Clear();
    }

    public void SetRaw(ReadOnlySequence<byte> bytes)
    {
        EnsureRaw((int)bytes.Length);
        bytes.CopyTo(Raw);
        RawLength = (int)bytes.Length;
    }

    public void AppendField(ReadOnlySpan<byte> field)
    {
        EnsureRaw(RawLength + field.Length);
        field.CopyTo(Raw.AsSpan(RawLength));
        Fields.Add((RawLength, field.Length));
        RawLength += field.Length;
    }

    public ReadOnlySpan<byte> Field(int index) =>
        index < Fields.Count ? Raw.AsSpan(Fields[index].Start, Fields[index].Length) : [];

    public void AddError(string path, string reason) => Errors.Add(new ProblemError(path, reason));

    private void EnsureRaw(int length)
    {
        if (length > Raw.Length)
        {
            var larger = new byte[Math.Max(length, Raw.Length * 2)];
            Raw.AsSpan(0, RawLength).CopyTo(larger);
            Raw = larger;
        }
    }
}
