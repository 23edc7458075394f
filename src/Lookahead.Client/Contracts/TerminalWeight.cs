using System.Text.Json;
using System.Text.Json.Serialization;

namespace Lookahead.Client;

/// <summary>
/// The terminal weight P of a model's cost: a named choice (<see cref="Riccati"/>, the default, or <see cref="Stage"/>,
/// CᵀQC) or an explicit n×n matrix.
/// </summary>
[JsonConverter(typeof(TerminalWeightJsonConverter))]
public abstract record TerminalWeight
{
    private protected TerminalWeight()
    {
    }

    /// <summary>The stabilising solution of the discrete algebraic Riccati equation.</summary>
    public static NamedTerminalWeight Riccati { get; } = new("riccati");

    /// <summary>The stage weight CᵀQC.</summary>
    public static NamedTerminalWeight Stage { get; } = new("stage");

    /// <summary>An explicit matrix, row by row.</summary>
    public static MatrixTerminalWeight Full(double[][] rows) => new(rows);
}

/// <summary>A terminal weight chosen by name ("riccati" or "stage"; the service names any other in its problem).</summary>
public sealed record NamedTerminalWeight(string Name) : TerminalWeight;

/// <summary>A terminal weight given as a matrix.</summary>
public sealed record MatrixTerminalWeight(double[][] Rows) : TerminalWeight;

internal sealed class TerminalWeightJsonConverter : JsonConverter<TerminalWeight>
{
    public override TerminalWeight Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
    {
        if (reader.TokenType == JsonTokenType.String)
        {
            return new NamedTerminalWeight(reader.GetString()!);
        }

        var rows = NumberArrays.Read(ref reader);
        if (rows.IsVector)
        {
            throw new JsonException("a terminal weight is a name or a matrix, not a vector");
        }

        return new MatrixTerminalWeight(rows.Rows);
    }

    public override void Write(Utf8JsonWriter writer, TerminalWeight value, JsonSerializerOptions options)
    {
        switch (value)
        {
            case NamedTerminalWeight named:
                writer.WriteStringValue(named.Name);
                break;
            case MatrixTerminalWeight m:
                NumberArrays.WriteRows(writer, m.Rows);
                break;
            default:
                throw new JsonException($"unknown terminal weight {value.GetType().Name}");
        }
    }
}
