using System.Text.Json.Serialization;

namespace Lookahead.Api.Catalog;

/// <summary>A weight written either as a vector (its diagonal) or as a full matrix (array of rows); exactly one is set.</summary>
[JsonConverter(typeof(WeightJsonConverter))]
public sealed record WeightDto(double[]? Diagonal, double[][]? Matrix);
