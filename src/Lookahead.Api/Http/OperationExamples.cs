namespace Lookahead.Api.Http;

/// <summary>
/// Examples an endpoint shows in the OpenAPI document: request bodies and answers by media type (JSON as JSON text,
/// CSV and NDJSON as the text itself) and path or query parameter values by name.
/// </summary>
public sealed class OperationExamples
{
    public Dictionary<string, string> Requests { get; } = new(StringComparer.Ordinal);

    public Dictionary<string, string> Responses { get; } = new(StringComparer.Ordinal);

    public Dictionary<string, string> Parameters { get; } = new(StringComparer.Ordinal);
}

/// <summary>Attaches examples to a route (one <see cref="OperationExamples"/> per endpoint, filled by these calls).</summary>
public static class OperationExampleConventions
{
    /// <summary>The cold-store demo's id; any registered id has this form (64 lower-case hex digits).</summary>
    public const string ExampleModelId = "729cfef133dc15239c2f676cdf5375074faee452a2e73d5ad1d00987189169d9";

    public static RouteHandlerBuilder WithRequestExample(this RouteHandlerBuilder builder, string body, string mediaType = "application/json") =>
        builder.Examples(e => e.Requests[mediaType] = body);

    public static RouteHandlerBuilder WithResponseExample(this RouteHandlerBuilder builder, string body, string mediaType = "application/json") =>
        builder.Examples(e => e.Responses[mediaType] = body);

    public static RouteHandlerBuilder WithParameterExample(this RouteHandlerBuilder builder, string name, string value) =>
        builder.Examples(e => e.Parameters[name] = value);

    private static RouteHandlerBuilder Examples(this RouteHandlerBuilder builder, Action<OperationExamples> fill)
    {
        builder.Add(endpoint =>
        {
            var examples = endpoint.Metadata.OfType<OperationExamples>().FirstOrDefault();
            if (examples is null)
            {
                examples = new OperationExamples();
                endpoint.Metadata.Add(examples);
            }

            fill(examples);
        });
        return builder;
    }
}
