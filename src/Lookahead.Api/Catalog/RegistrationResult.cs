using Lookahead.Api.Contracts;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Catalog;

/// <summary>A registered (new or already known) model, or the reasons it was refused.</summary>
public sealed record RegistrationResult(string? Id, CompiledModel? Model, bool Created, IReadOnlyList<ProblemError> Errors)
{
    public bool Accepted => Errors.Count == 0 && Model is not null;

    public static RegistrationResult Rejected(IReadOnlyList<ProblemError> errors) => new(null, null, false, errors);
}
