using Microsoft.OpenApi;
using Swashbuckle.AspNetCore.SwaggerGen;

namespace Lookahead.Api.Replay;

/// <summary>
/// Replay's NDJSON and CSV bodies are text with their own layout, not the JSON envelope: each gets a named string
/// schema that says how the lines or columns are laid out, for the upload and for the answer.
/// </summary>
public sealed class ReplayMediaTypesOperationFilter : IOperationFilter
{
    public const string NdjsonUpload = "ReplayNdjsonUpload";
    public const string CsvUpload = "ReplayCsvUpload";
    public const string NdjsonAnswer = "ReplayNdjsonAnswer";
    public const string CsvAnswer = "ReplayCsvAnswer";

    public void Apply(OpenApiOperation operation, OperationFilterContext context)
    {
        if (context.ApiDescription.ActionDescriptor.EndpointMetadata.OfType<IEndpointNameMetadata>().All(n => n.EndpointName != "ReplayPlans"))
        {
            return;
        }

        var repository = context.SchemaRepository;
        Define(repository, NdjsonUpload, "One plan request per line, each a ReplayRowRequest object (state or estimate, reference?, previousInput?, disturbance?; or measurement and appliedInput for an estimation replay). Blank lines are skipped but still counted.");
        Define(repository, CsvUpload, "A header and one row per state. State columns by state label (or x1…xn); optional r_<output>/r1…rp, prev_<input>/prev1…prevm and v_<disturbance>/v1…vq; for an estimation replay y_<output>/y1…yp and applied_<input>/applied1…appliedm instead of the state. Every other column is passed through.");
        Define(repository, NdjsonAnswer, "One ReplayRowResult object per line ({row, status, firstMove, cost} or {row, status: \"error\", errors}; every field of a plan with ?detail=full), then the summary line {\"summary\": {rows, failedRows, complete, reason?}}.");
        Define(repository, CsvAnswer, "The pass-through columns, the first move by input label (or u1…um), cost, status and message; with an estimator also xhat_<state> and dhat1…. The last record is the summary #summary,rows=<n>,failedRows=<n>,complete=<true|false>.");

        Point(operation.RequestBody?.Content, ReplayApi.NdjsonContentType, NdjsonUpload, context);
        Point(operation.RequestBody?.Content, ReplayApi.CsvContentType, CsvUpload, context);
        if (operation.Responses?.TryGetValue("200", out var ok) == true)
        {
            Point(ok.Content, ReplayApi.NdjsonContentType, NdjsonAnswer, context);
            Point(ok.Content, ReplayApi.CsvContentType, CsvAnswer, context);
        }
    }

    private static void Define(SchemaRepository repository, string name, string description)
    {
        if (!repository.Schemas.ContainsKey(name))
        {
            repository.AddDefinition(name, new OpenApiSchema { Type = JsonSchemaType.String, Description = description });
        }
    }

    private static void Point(IDictionary<string, IOpenApiMediaType>? content, string mediaType, string schema, OperationFilterContext context)
    {
        if (content?.TryGetValue(mediaType, out var media) == true && media is OpenApiMediaType concrete)
        {
            concrete.Schema = new OpenApiSchemaReference(schema, context.Document);
        }
    }
}
