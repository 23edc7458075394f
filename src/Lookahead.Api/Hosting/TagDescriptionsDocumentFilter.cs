using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Hosting;

/// <summary>One sentence per tag, so a reader of the document (or a generated client's class list) knows what each group is for.</summary>
public sealed class TagDescriptionsDocumentFilter : IDocumentFilter
{
    private static readonly Dictionary<string, string> Descriptions = new(StringComparer.Ordinal)
    {
        ["Models"] = "Register a plant-and-cost model (its id is the SHA-256 of its canonical form), read it back, list, delete, and read its receding-horizon gain.",
        ["Plans"] = "One plan for one measured state or estimate: the optimal input sequence, the predicted trajectory, the cost and the steady-state target.",
        ["Replay"] = "Many states in, one result per state out, streamed in input order as JSON, NDJSON or CSV; for a model with an estimator, measurements and applied inputs instead.",
        ["Simulation"] = "Closed-loop runs: each plan's first move is applied to a true plant, with disturbances, measurement noise and optional estimator feedback.",
        ["Estimation"] = "One stateless estimator sample: propagate the last estimate with the applied input and correct it with the measurement.",
        ["Aliases"] = "Stable names for models, re-pointed when a tuning changes, with their history; plan through an alias.",
        ["Stations"] = "Named loops that keep their estimate between samples: a client sends each new reading and gets the move to apply.",
    };

    public void Apply(OpenApiDocument swaggerDoc, DocumentFilterContext context)
    {
        var used = (swaggerDoc.Paths?.Values ?? Enumerable.Empty<IOpenApiPathItem>())
            .SelectMany(p => p.Operations?.Values ?? Enumerable.Empty<OpenApiOperation>())
            .SelectMany(o => o.Tags ?? new HashSet<OpenApiTagReference>())
            .Select(t => t.Name)
            .Where(n => n is not null)
            .Distinct(StringComparer.Ordinal)
            .Order(StringComparer.Ordinal);
        swaggerDoc.Tags = new HashSet<OpenApiTag>([.. used.Select(name => new OpenApiTag
        {
            Name = name,
            Description = Descriptions.TryGetValue(name!, out var description) ? description : throw new InvalidOperationException($"tag '{name}' has no description"),
        })]);
    }
}
