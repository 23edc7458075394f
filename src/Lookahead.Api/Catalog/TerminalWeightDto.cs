using System.Text.Json.Serialization;

namespace Lookahead.Api.Catalog;

/// <summary>"riccati", "stage" or an explicit n×n matrix; exactly one of <see cref="Kind"/> and <see cref="Matrix"/> is set.</summary>
[JsonConverter(typeof(TerminalWeightJsonConverter))]
public sealed record TerminalWeightDto(string? Kind, double[][]? Matrix)
{
    public static TerminalWeightDto Riccati { get; } = new("riccati", null);
}
