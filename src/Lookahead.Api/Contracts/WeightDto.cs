using System.Text.Json.Serialization;
using Lookahead.Api.Json;

namespace Lookahead.Api.Contracts;

/// <summary>A weight written either as a vector (its diagonal) or as a full matrix (array of rows); exactly one is set.</summary>
[JsonConverter(typeof(WeightJsonConverter))]
public sealed record WeightDto(double[]? Diagonal, double[][]? Matrix);
