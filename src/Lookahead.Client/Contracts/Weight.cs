using System.Text.Json;
using System.Text.Json.Serialization;

namespace Lookahead.Client;

/// <summary>
/// A cost or noise weight: either a vector (the diagonal of the matrix) or a full matrix given as rows. The two shapes
/// hash differently on the service (a model id keeps the shape the client chose), so the client keeps them apart too.
/// </summary>
[JsonConverter(typeof(WeightJsonConverter))]
public abstract record Weight
{
    private protected Weight()
    {
    }

    /// <summary>The diagonal only.</summary>
    public static DiagonalWeight Diagonal(params double[] values) => new(values);

    /// <summary>A full square matrix, row by row.</summary>
    public static MatrixWeight Full(double[][] rows) => new(rows);

    public static implicit operator Weight(double[] diagonal) => new DiagonalWeight(diagonal);

    public static implicit operator Weight(double[][] rows) => new MatrixWeight(rows);
}

/// <summary>A weight given as its diagonal.</summary>
public sealed record DiagonalWeight(double[] Values) : Weight;

/// <summary>A weight given as a full matrix (array of rows).</summary>
public sealed record MatrixWeight(double[][] Rows) : Weight;

/// <summary>Reads an array of numbers as <see cref="DiagonalWeight"/> and an array of arrays as <see cref="MatrixWeight"/>.</summary>
internal sealed class WeightJsonConverter : JsonConverter<Weight>
{
    public override Weight Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
    {
        var rows = NumberArrays.Read(ref reader);
        return rows.IsVector ? new DiagonalWeight(rows.Rows[0]) : new MatrixWeight(rows.Rows);
    }

    public override void Write(Utf8JsonWriter writer, Weight value, JsonSerializerOptions options)
    {
        switch (value)
        {
            case DiagonalWeight d:
                NumberArrays.WriteVector(writer, d.Values);
                break;
            case MatrixWeight m:
                NumberArrays.WriteRows(writer, m.Rows);
                break;
            default:
                throw new JsonException($"unknown weight shape {value.GetType().Name}");
        }
    }
}
