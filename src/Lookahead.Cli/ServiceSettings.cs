using System.ComponentModel;
using Spectre.Console;
using Spectre.Console.Cli;

namespace Lookahead.Cli;

/// <summary>Options every command shares: where the service is, the key, how many attempts a refused call gets.</summary>
public class ServiceSettings : CommandSettings
{
    [CommandOption("--service <URL>")]
    [Description("The service's address (default: $LOOKAHEAD_URL, else http://127.0.0.1:5000)")]
    public string Service { get; set; } = Environment.GetEnvironmentVariable("LOOKAHEAD_URL") is { Length: > 0 } url ? url : "http://127.0.0.1:5000";

    [CommandOption("--api-key <KEY>")]
    [Description("API key, sent as a Bearer token (default: $LOOKAHEAD_API_KEY)")]
    public string? ApiKey { get; set; }

    [CommandOption("--attempts <N>")]
    [Description("Attempts per call when the service answers 429 or 503, the first included")]
    [DefaultValue(4)]
    public int Attempts { get; set; } = 4;

    public override ValidationResult Validate()
    {
        if (!Uri.TryCreate(Service, UriKind.Absolute, out _))
        {
            return ValidationResult.Error($"--service: '{Service}' is not an absolute URL");
        }

        return Attempts < 1 ? ValidationResult.Error("--attempts must be at least 1") : ValidationResult.Success();
    }
}
