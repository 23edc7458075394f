using Lookahead.Api.Http;

namespace Lookahead.Api.Models;

/// <summary>u₀ = −K x₀ for regulation without a previous input, and the closed loop it gives.</summary>
public sealed record GainResponse(string ModelId, double[][] K, IReadOnlyList<ComplexDto> ClosedLoopEigenvalues, double SpectralRadius);
