namespace Lookahead.Api.Contracts;

/// <summary>u₀ = −K x₀ for regulation without a previous input, and the closed loop it gives.</summary>
public sealed record GainResponse(string ModelId, double[][] K, IReadOnlyList<ComplexDto> ClosedLoopEigenvalues, double SpectralRadius);

public sealed record ComplexDto(double Re, double Im);
