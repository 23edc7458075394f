using Lookahead.Api.Catalog;
using Lookahead.Api.Problems;
using Lookahead.Core.Planning;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Endpoints;

/// <summary>Route id → compiled model, or the 400/404 problem that says why not.</summary>
internal static class ModelLookup
{
    public static async Task<(CompiledModel? Model, ProblemHttpResult? Problem)> FindAsync(string id, ModelCatalog catalog)
    {
        if (!ModelId.IsWellFormed(id))
        {
            return (null, ApiProblems.MalformedId(id));
        }

        var model = await catalog.GetCompiledAsync(id);
        return model is null ? (null, ApiProblems.ModelNotFound(id)) : (model, null);
    }
}
