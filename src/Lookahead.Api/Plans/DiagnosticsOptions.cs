namespace Lookahead.Api.Plans;

/// <summary>Switches for measuring the service itself ("Diagnostics" section).</summary>
public sealed class DiagnosticsOptions
{
    public const string Section = "Diagnostics";

    /// <summary>Maps POST /v1/echo-plan-shaped, which answers with a precomputed plan-sized body (load tests only).</summary>
    public bool EnableBareEndpoint { get; set; }
}
