using System.Reflection;
using System.Text.Json.Nodes;
using Lookahead.Api.Http;
using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Hosting;

/// <summary>
/// The problem document as the service writes it (RFC 9457 plus errors and traceId), in place of the framework's
/// loose ProblemDetails schema, so generated clients read errors[].path and traceId as typed members.
/// </summary>
public sealed class ProblemSchemaDocumentFilter : IDocumentFilter
{
    public const string SchemaName = "ProblemDetails";

    public void Apply(OpenApiDocument swaggerDoc, DocumentFilterContext context)
    {
        var schemas = swaggerDoc.Components?.Schemas;
        if (schemas is null || !schemas.ContainsKey(SchemaName))
        {
            return;
        }

        var error = context.SchemaGenerator.GenerateSchema(typeof(ProblemError), context.SchemaRepository);
        schemas[SchemaName] = new OpenApiSchema
        {
            Type = JsonSchemaType.Object,
            Description = "An RFC 9457 problem document. Every refusal carries errors (empty when no single field is to blame) and the trace id of the request.",
            Required = new HashSet<string>(StringComparer.Ordinal) { "type", "title", "status", "instance", "errors", "traceId" },
            Properties = new Dictionary<string, IOpenApiSchema>
            {
                ["type"] = new OpenApiSchema
                {
                    Type = JsonSchemaType.String,
                    Description = "What went wrong, as a stable URN to switch on (not the title).",
                    Enum = [.. ProblemTypeValues().Select(v => (JsonNode)JsonValue.Create(v))],
                },
                ["title"] = new OpenApiSchema { Type = JsonSchemaType.String, Description = "A short summary of the problem type." },
                ["status"] = new OpenApiSchema { Type = JsonSchemaType.Integer, Format = "int32", Description = "The HTTP status code." },
                ["detail"] = new OpenApiSchema { Type = JsonSchemaType.String, Description = "What happened to this request and what to do about it." },
                ["instance"] = new OpenApiSchema { Type = JsonSchemaType.String, Description = "The request path." },
                ["errors"] = new OpenApiSchema { Type = JsonSchemaType.Array, Items = error, Description = "Each field at fault: its JSON path (e.g. cost.inputWeight, state[2]) or parameter name, and why." },
                ["traceId"] = new OpenApiSchema { Type = JsonSchemaType.String, Description = "The W3C trace id of the request (also in the trace-id response header and the log)." },
                ["line"] = new OpenApiSchema { Type = JsonSchemaType.Integer, Format = "int64", Description = "Malformed JSON: the 1-based line of the fault." },
                ["position"] = new OpenApiSchema { Type = JsonSchemaType.Integer, Format = "int64", Description = "Malformed JSON: the 1-based byte position in that line." },
                ["currentSequence"] = new OpenApiSchema { Type = JsonSchemaType.Integer, Format = "int64", Description = "A station step's 409: the sequence the station expects." },
            },
        };
    }

    /// <summary>Every problem type the service writes (the constants of <see cref="ProblemTypes"/>).</summary>
    public static IEnumerable<string> ProblemTypeValues() =>
        typeof(ProblemTypes).GetFields(BindingFlags.Public | BindingFlags.Static)
            .Where(f => f.IsLiteral && f.FieldType == typeof(string))
            .Select(f => (string)f.GetRawConstantValue()!);
}
