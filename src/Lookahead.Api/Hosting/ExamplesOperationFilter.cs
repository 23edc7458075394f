using System.Text.Json.Nodes;
using Lookahead.Api.Http;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Hosting;

/// <summary>Writes an endpoint's <see cref="OperationExamples"/> into its operation.</summary>
public sealed class ExamplesOperationFilter : IOperationFilter
{
    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        var examples = context.ApiDescription.ActionDescriptor.EndpointMetadata.OfType<OperationExamples>().FirstOrDefault();
        if (examples is null)
        {
            return;
        }

        foreach (var (mediaType, text) in examples.Requests)
        {
            if (operation.RequestBody?.Content?.TryGetValue(mediaType, out var media) == true && media is OpenApiMediaType concrete)
            {
                concrete.Example = Node(mediaType, text);
            }
        }

        if (operation.Responses?.TryGetValue("200", out var ok) != true && operation.Responses?.TryGetValue("201", out ok) != true)
        {
            ok = null;
        }

        foreach (var (mediaType, text) in examples.Responses)
        {
            if (ok?.Content?.TryGetValue(mediaType, out var media) == true && media is OpenApiMediaType concrete)
            {
                concrete.Example = Node(mediaType, text);
            }
        }

        foreach (var (name, value) in examples.Parameters)
        {
            if (operation.Parameters?.OfType<OpenApiParameter>().FirstOrDefault(p => p.Name == name) is { } parameter)
            {
                parameter.Example = long.TryParse(value, System.Globalization.CultureInfo.InvariantCulture, out long number) ? JsonValue.Create(number) : JsonValue.Create(value);
            }
        }
    }

    private static JsonNode? Node(string mediaType, string text) =>
        mediaType is "application/json" || mediaType.EndsWith("+json", StringComparison.Ordinal) ? JsonNode.Parse(text) : JsonValue.Create(text);
}
