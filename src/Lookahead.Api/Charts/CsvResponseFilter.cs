using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Charts;

/// <summary>Marks an endpoint whose 200 can also be a CSV table of its trajectories (?format=csv).</summary>
public sealed class CsvAlternativeMetadata;

/// <summary>Adds text/csv beside the JSON schema of the 200 answer.</summary>
public sealed class CsvResponseFilter : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        bool csv = context.ApiDescription.ActionDescriptor.EndpointMetadata.OfType<CsvAlternativeMetadata>().Any();
        if (csv && operation.Responses?.TryGetValue("200", out var ok) == true && ok is OpenApiResponse response)
        {
            response.Content ??= new Dictionary<string, IOpenApiMediaType>();
            response.Content[TrajectoryCsv.ContentType] = new OpenApiMediaType
            {
                Schema = new OpenApiSchema
                {
                    Type = JsonSchemaType.String,
                    Description = "With ?format=csv: one row per sample (step, time_s, then y_/r_/u_/x_ columns named by the model's labels; a simulation adds ym_, yhat_, xhat_ and dhat columns, a plan a status column).",
                },
            };
        }
    }
}
