namespace Lookahead.Api.Http;

/// <summary>One reason a request was refused: the JSON path of the field (e.g. cost.inputWeight, state[2]) and why.</summary>
public sealed record ProblemError(string Path, string Reason);
