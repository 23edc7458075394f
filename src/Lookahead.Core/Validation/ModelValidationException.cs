namespace Lookahead.Core.Validation;

/// <summary>Thrown when a model or request cannot be accepted; carries every field-level reason found.</summary>
public sealed class ModelValidationException : Exception
{
    public ModelValidationException(IReadOnlyList<ValidationError> errors)
        : base(Describe(errors))
    {
        Errors = errors;
    }

    public ModelValidationException(string path, string reason)
        : this([new ValidationError(path, reason)])
    {
    }

    public ModelValidationException()
        : this([])
    {
    }

    public ModelValidationException(string message)
        : base(message)
    {
        Errors = [new ValidationError("", message)];
    }

    public ModelValidationException(string message, Exception innerException)
        : base(message, innerException)
    {
        Errors = [new ValidationError("", message)];
    }

    public IReadOnlyList<ValidationError> Errors { get; }

    private static string Describe(IReadOnlyList<ValidationError> errors) =>
        errors.Count == 0 ? "invalid model" : string.Join("; ", errors.Select(e => $"{e.Path}: {e.Reason}"));
}
