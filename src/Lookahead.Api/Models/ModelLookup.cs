using Lookahead.Api.Access;
using Lookahead.Api.Catalog;
using Lookahead.Core.Planning;
using Microsoft.AspNetCore.Http.HttpResults;

namespace Lookahead.Api.Models;

/// <summary>Route id → compiled model the request's tenant may read, or the 400/404 problem that says why not.</summary>
public static class ModelLookup
{
    public static async Task<(CompiledModel? Model, ProblemHttpResult? Problem)> FindAsync(string id, HttpContext context, ModelCatalog catalog)
    {
        if (!ModelId.IsWellFormed(id))
        {
            return (null, ModelProblems.MalformedId(id));
        }

        var model = await catalog.GetCompiledAsync(Tenants.Reading(context), id);
        return model is null ? (null, ModelProblems.ModelNotFound(id)) : (model, null);
    }
}
