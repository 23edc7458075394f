using System.Buffers;
using Lookahead.Api.Plans;
using Lookahead.Core.Estimation;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>
/// One reusable slot of a replay batch: the row's raw bytes, the parsed vectors, the plan and the formatted
/// result. Slots are recycled batch after batch, which is what keeps replay memory constant.
/// </summary>
internal sealed class ReplayRow(int n, int m, int p, int q, int horizon, int estimatedDisturbances) : PlanCall(n, m, p, q, horizon, estimatedDisturbances)
{
    /// <summary>Estimation replay: y of this row (p); valid when <see cref="HasMeasurement"/>.</summary>
    public double[] Measurement { get; } = new double[p];

    /// <summary>Estimation replay: false when the row's reading is missing (the estimate is then only propagated).</summary>
    public bool HasMeasurement { get; set; }

    /// <summary>Estimation replay: the input held over the interval that ends at this row's measurement (m).</summary>
    public double[] AppliedInput { get; } = new double[m];

    /// <summary>Estimation replay: the corrected estimate this row was planned from; null in a plain replay or when it failed.</summary>
    public StateEstimate? Estimate { get; set; }

    /// <summary>Estimation replay: what the estimator says about this row (missing measurement, a fresh start), written before the plan's warnings.</summary>
    public List<Warning> EstimationWarnings { get; } = [];

    public long Number { get; private set; }

    public byte[] Raw { get; private set; } = new byte[512];

    public int RawLength { get; private set; }

    public ReadOnlySpan<byte> RawSpan => Raw.AsSpan(0, RawLength);

    /// <summary>CSV only: where each field sits in <see cref="Raw"/>.</summary>
    public List<(int Start, int Length)> Fields { get; } = [];

    /// <summary>Stops the rest of the body from being read (set by the source for a broken stream).</summary>
    public bool Fatal { get; set; }

    public ArrayBufferWriter<byte> Output { get; } = new(256);

    /// <summary>CSV only: where each formatted number sits in <see cref="Output"/>.</summary>
    public List<(int Start, int Length)> OutputFields { get; } = [];

    public void Reset(long number)
    {
        Number = number;
        RawLength = 0;
        Fields.Clear();
        ResetCall();
        HasMeasurement = false;
        Estimate = null;
        EstimationWarnings.Clear();
        Fatal = false;
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
