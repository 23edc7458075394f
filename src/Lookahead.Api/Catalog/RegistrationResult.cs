using Lookahead.Core.Planning;
using Lookahead.Core.Validation;

namespace Lookahead.Api.Catalog;

/// <summary>A registered (new or already known) model, or the reasons it was refused.</summary>
public sealed record RegistrationResult(string? Id, CompiledModel? Model, bool Created, IReadOnlyList<ValidationError> Errors)
{
    public bool Accepted => Errors.Count == 0 && Model is not null;

    public static RegistrationResult Rejected(IReadOnlyList<ValidationError> errors) => new(null, null, false, errors);
}
