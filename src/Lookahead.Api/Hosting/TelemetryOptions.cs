namespace Lookahead.Api.Hosting;

/// <summary>Traces ("Telemetry" section): every request is a W3C trace span; it is exported only when an endpoint is set.</summary>
public sealed class TelemetryOptions
{
    public const string Section = "Telemetry";

    /// <summary>OTLP/HTTP endpoint for traces (e.g. http://collector:4318/v1/traces); unset: no export.</summary>
    public string? OtlpTracesEndpoint { get; set; }
}
