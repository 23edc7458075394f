using Lookahead.Core.Models;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Catalog;

/// <summary>The core's compiler, cancellable between its phases.</summary>
public sealed class CoreModelCompilation : IModelCompilation
{
    public CompiledModel Compile(ModelDocument document, CompileOptions options, CancellationToken cancellationToken) =>
        ModelCompiler.Compile(document, options, cancellationToken);
}
