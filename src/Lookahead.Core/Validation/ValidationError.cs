namespace Lookahead.Core.Validation;

/// <summary>One reason a document or request was refused.</summary>
/// <param name="Path">JSON path of the offending field, e.g. <c>cost.inputWeight</c> or <c>plant.a[2][0]</c>.</param>
/// <param name="Reason">Plain-language reason.</param>
public sealed record ValidationError(string Path, string Reason);
