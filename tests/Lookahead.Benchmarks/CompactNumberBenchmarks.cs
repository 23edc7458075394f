using System.Buffers;
using System.Globalization;
using System.Text.Json;
using BenchmarkDotNet.Attributes;
using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// Writing trajectory numbers as JSON: the service's 15-digit <see cref="CompactNumber"/> against the runtime's
/// shortest round-trip formatting and its fixed 15-digit ("G15") formatting, on the same <see cref="Count"/> doubles.
/// Every method writes one JSON array of all the values into a reused <see cref="Utf8JsonWriter"/> over a reused
/// buffer, so nothing is allocated per call; Mean and Allocated are per value (OperationsPerInvoke = Count).
/// <list type="bullet">
/// <item><c>RoundTripWriter</c>: one <see cref="Utf8JsonWriter.WriteNumberValue(double)"/> per value (shortest round-trip), what the serializer does for a double[].</item>
/// <item><c>RoundTripRaw</c>: the same shortest round-trip digits, formatted into one buffer and written as a single raw value, the way the service writes trajectories; separates the digits' cost from the per-call writer cost.</item>
/// <item><c>FixedG15Raw</c>: <c>double.TryFormat(utf8, "G15", invariant)</c> into the buffer, one raw value.</item>
/// <item><c>Compact</c>: <see cref="CompactNumber.Format"/> into the buffer, one raw value (as TrajectoryRowsConverter does, without its rows).</item>
/// </list>
/// The setup parses each method's output back and throws unless the round-trip forms are exact and the 15-digit forms
/// are within 6e-15 relative; it prints the data set's make-up and the bytes per value of each form.
/// </summary>
public class CompactNumberBenchmarks : IDisposable
{
    public const int Count = 4096;

    private double[] values = null!;
    private byte[] digits = null!;
    private ArrayBufferWriter<byte> output = null!;
    private Utf8JsonWriter writer = null!;

    /// <summary>
    /// Mixed: a fixed-seed synthetic trajectory (5 % zeros, 5 % integers up to ±100 as setpoints, 5 % one-decimal
    /// limits up to ±10, the rest full-precision values log-uniform in magnitude over 1e-6 … 1e4, half negative, shuffled).
    /// M1Plan: the inputs, states and outputs of unconstrained six-masses plans (the file's state, then random states), concatenated.
    /// </summary>
    [Params("Mixed", "M1Plan")]
    public string Data { get; set; } = "Mixed";

    [GlobalSetup]
    public void Setup()
    {
        values = Data switch
        {
            "Mixed" => MixedValues(),
            "M1Plan" => PlanValues(),
            _ => throw new InvalidOperationException($"unknown data set '{Data}'"),
        };

        // Widest form: sign, 17 digits, point, exponent (24 bytes for "R" and "G15"), CompactNumber.MaxLength for the
        // service's own; one comma each.
        digits = new byte[2 + (Count * (CompactNumber.MaxLength + 1))];
        output = new ArrayBufferWriter<byte>(digits.Length);

        // Validation off for every method, so only formatting and writing are measured; it favours the per-call writer.
        writer = new Utf8JsonWriter(output, new JsonWriterOptions { SkipValidation = true });

        Describe();
        Check(nameof(RoundTripWriter), RoundTripWriter, 0);
        Check(nameof(RoundTripRaw), RoundTripRaw, 0);
        Check(nameof(FixedG15Raw), FixedG15Raw, 6e-15);
        Check(nameof(Compact), Compact, 6e-15);
    }

    [GlobalCleanup]
    public void Dispose()
    {
        writer?.Dispose();
        GC.SuppressFinalize(this);
    }

    [Benchmark(Baseline = true, OperationsPerInvoke = Count)]
    public int RoundTripWriter()
    {
        Restart();
        writer.WriteStartArray();
        foreach (double v in values)
        {
            writer.WriteNumberValue(v);
        }

        writer.WriteEndArray();
        return Finish();
    }

    [Benchmark(OperationsPerInvoke = Count)]
    public int RoundTripRaw()
    {
        Restart();
        var buffer = digits.AsSpan();
        int at = 0;
        buffer[at++] = (byte)'[';
        for (int i = 0; i < values.Length; i++)
        {
            if (i > 0)
            {
                buffer[at++] = (byte)',';
            }

            at += values[i].TryFormat(buffer[at..], out int written, default, CultureInfo.InvariantCulture) ? written : throw new InvalidOperationException("number buffer too small");
        }

        buffer[at++] = (byte)']';
        writer.WriteRawValue(buffer[..at], skipInputValidation: true);
        return Finish();
    }

    [Benchmark(OperationsPerInvoke = Count)]
    public int FixedG15Raw()
    {
        Restart();
        var buffer = digits.AsSpan();
        int at = 0;
        buffer[at++] = (byte)'[';
        for (int i = 0; i < values.Length; i++)
        {
            if (i > 0)
            {
                buffer[at++] = (byte)',';
            }

            at += values[i].TryFormat(buffer[at..], out int written, "G15", CultureInfo.InvariantCulture) ? written : throw new InvalidOperationException("number buffer too small");
        }

        buffer[at++] = (byte)']';
        writer.WriteRawValue(buffer[..at], skipInputValidation: true);
        return Finish();
    }

    [Benchmark(OperationsPerInvoke = Count)]
    public int Compact()
    {
        Restart();
        var buffer = digits.AsSpan();
        int at = 0;
        buffer[at++] = (byte)'[';
        for (int i = 0; i < values.Length; i++)
        {
            if (i > 0)
            {
                buffer[at++] = (byte)',';
            }

            at += CompactNumber.Format(values[i], buffer[at..]);
        }

        buffer[at++] = (byte)']';
        writer.WriteRawValue(buffer[..at], skipInputValidation: true);
        return Finish();
    }

    private void Restart()
    {
        output.ResetWrittenCount();
        writer.Reset(output);
    }

    private int Finish()
    {
        writer.Flush();
        return output.WrittenCount;
    }

    private static double[] MixedValues()
    {
        var random = new Random(20261202);
        var result = new double[Count];
        for (int i = 0; i < Count; i++)
        {
            result[i] = (i % 20) switch
            {
                0 => 0.0,
                1 => random.Next(-100, 101),
                2 => random.Next(-100, 101) / 10.0,
                _ => (random.Next(2) == 0 ? -1 : 1) * Math.Pow(10, -6 + (10 * random.NextDouble())),
            };
        }

        // Shuffled so that the kinds do not come in a period the branch predictor could learn.
        random.Shuffle(result);
        return result;
    }

    private static double[] PlanValues()
    {
        var c = BenchmarkModels.Get("M1");
        var model = ModelCompiler.Compile(c.Document);
        var random = new Random(7);
        var result = new List<double>(Count + 1000);
        var state = c.State;
        while (result.Count < Count)
        {
            var plan = model.Plan(new PlanRequest(state));
            result.AddRange(plan.Inputs);
            result.AddRange(plan.States);
            result.AddRange(plan.Outputs);
            state = Enumerable.Range(0, model.StateCount).Select(_ => (2 * random.NextDouble()) - 1).ToArray();
        }

        return result.Take(Count).ToArray();
    }

    private void Describe()
    {
        int zeros = values.Count(v => v == 0);
        int integers = values.Count(v => v != 0 && v == Math.Round(v));
        int negatives = values.Count(v => v < 0);
        var nonZero = values.Where(v => v != 0).Select(v => Math.Abs(v)).ToArray();
        int below1e6 = nonZero.Count(v => v < 1e-6);
        Console.WriteLine($"// {Data}: {values.Length} values, {zeros} zeros, {integers} other integers, {negatives} negative; nonzero magnitudes {nonZero.Min():g3} … {nonZero.Max():g3}, {below1e6} below 1e-6");
    }

    /// <summary>Runs <paramref name="write"/>, parses its array back and compares it with the values.</summary>
    private void Check(string name, Func<int> write, double relativeTolerance)
    {
        int length = write();
        using var json = JsonDocument.Parse(output.WrittenMemory);
        var parsed = json.RootElement.EnumerateArray().Select(e => e.GetDouble()).ToArray();
        if (parsed.Length != values.Length)
        {
            throw new InvalidOperationException($"{Data} {name}: wrote {parsed.Length} numbers, expected {values.Length}");
        }

        double worst = 0;
        for (int i = 0; i < values.Length; i++)
        {
            double error = values[i] == 0 ? Math.Abs(parsed[i]) : Math.Abs(parsed[i] - values[i]) / Math.Abs(values[i]);
            worst = Math.Max(worst, error);
        }

        if (worst > relativeTolerance)
        {
            throw new InvalidOperationException($"{Data} {name}: a value read back is off by {worst:g3} relative (allowed {relativeTolerance:g3})");
        }

        Console.WriteLine($"// {Data} {name}: {(double)(length - 2) / values.Length:f2} bytes per value (with its comma); largest relative error read back {worst:g3}");
    }
}
