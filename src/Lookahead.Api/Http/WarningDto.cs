namespace Lookahead.Api.Http;

/// <summary>
/// One warning on the wire: a stable <see cref="Code"/> for programs, a sentence for people, and the numbers the
/// code is about (only those it uses are present).
/// </summary>
/// <param name="Code">setpoint-unreachable, setpoint-outside-input-limits, first-move-rate-relaxed, iteration-limit,
/// limits-contradict, soft-output-limit-exceeded, steps-not-optimal, closed-loop-unstable, not-stabilisable,
/// not-controllable, mode-unseen-by-cost, hessian-ill-conditioned, detail-after-requests.</param>
/// <param name="Input">Index of the input concerned (0-based).</param>
/// <param name="Output">Index of the output concerned (0-based).</param>
/// <param name="Step">Step of the horizon concerned (0-based).</param>
/// <param name="Limit">Kind of limit concerned (input-min, input-max, input-rate-min, input-rate-max, output-min, output-max).</param>
/// <param name="Amount">The size of the matter: an excess, a distance, a spectral radius, a condition number.</param>
/// <param name="Count">A count: an iteration cap, a number of steps, a rank.</param>
/// <param name="Eigenvalue">The mode concerned.</param>
public sealed record WarningDto(
    string Code,
    string Message,
    int? Input = null,
    int? Output = null,
    int? Step = null,
    string? Limit = null,
    double? Amount = null,
    int? Count = null,
    ComplexDto? Eigenvalue = null);

/// <summary>A complex number, for eigenvalues.</summary>
public sealed record ComplexDto(double Re, double Im);
