namespace Lookahead.Api.Storage;

public enum DeleteStatus
{
    Deleted,
    NotFound,
    ReferencedByAlias,
}

/// <summary>Result of a model delete; <see cref="BlockingAlias"/> names the alias that prevented it.</summary>
public sealed record DeleteOutcome(DeleteStatus Status, string? BlockingAlias = null)
{
    public static DeleteOutcome Deleted { get; } = new(DeleteStatus.Deleted);

    public static DeleteOutcome NotFound { get; } = new(DeleteStatus.NotFound);
}
