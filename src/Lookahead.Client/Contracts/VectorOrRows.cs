using System.Text.Json;
using System.Text.Json.Serialization;

namespace Lookahead.Client;

/// <summary>
/// A value held over the horizon (one vector) or a schedule of 1…N rows whose last row is held to the end: how a plan
/// gives its setpoint (<c>reference</c>) and its measured disturbances (<c>disturbance</c>).
/// </summary>
[JsonConverter(typeof(VectorOrRowsJsonConverter))]
public sealed record VectorOrRows
{
    private VectorOrRows(double[][] rows, bool isVector)
    {
        Rows = rows;
        IsVector = isVector;
    }

    /// <summary>The rows; one row when <see cref="IsVector"/>.</summary>
    public double[][] Rows { get; }

    /// <summary>True when the value is one vector held over the horizon (written as a plain array).</summary>
    public bool IsVector { get; }

    public static VectorOrRows Held(params double[] values) => new([values], true);

    public static VectorOrRows Schedule(params double[][] rows) => new(rows, false);

    public static implicit operator VectorOrRows(double[] values) => Held(values);

    public static implicit operator VectorOrRows(double[][] rows) => Schedule(rows);

    internal static VectorOrRows From((double[][] Rows, bool IsVector) read) => new(read.Rows, read.IsVector);
}

internal sealed class VectorOrRowsJsonConverter : JsonConverter<VectorOrRows>
{
    public override VectorOrRows Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options) =>
        VectorOrRows.From(NumberArrays.Read(ref reader));

    public override void Write(Utf8JsonWriter writer, VectorOrRows value, JsonSerializerOptions options)
    {
        if (value.IsVector)
        {
            NumberArrays.WriteVector(writer, value.Rows[0]);
        }
        else
        {
            NumberArrays.WriteRows(writer, value.Rows);
        }
    }
}
