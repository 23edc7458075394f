using Lookahead.Core.Models;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Catalog;

/// <summary>
/// The compile step itself, behind the budgets. The service uses the core's compiler; tests replace it with one they
/// can hold, to fill the queue or run past the time budget deterministically.
/// </summary>
public interface IModelCompilation
{
    /// <exception cref="Lookahead.Core.Validation.ModelValidationException">The document is invalid.</exception>
    /// <exception cref="OperationCanceledException"><paramref name="cancellationToken"/> was cancelled.</exception>
    CompiledModel Compile(ModelDocument document, CompileOptions options, CancellationToken cancellationToken);
}
