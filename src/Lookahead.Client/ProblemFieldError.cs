namespace Lookahead.Client;

/// <summary>One reason a request was refused: the JSON path of the field (e.g. <c>cost.inputWeight</c>, <c>state[2]</c>) and why.</summary>
public sealed record ProblemFieldError(string Path, string Reason);
