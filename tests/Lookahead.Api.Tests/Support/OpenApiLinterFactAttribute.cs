using Xunit;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// A fact that needs the OpenAPI linter named by <see cref="Variable"/> (.ci/run installs it and sets the variable).
/// Outside CI a missing linter skips the test, saying why; under CI=true the test runs and fails, so a CI machine
/// without the linter cannot pass the lint by skipping it.
/// </summary>
[AttributeUsage(AttributeTargets.Method)]
public sealed class OpenApiLinterFactAttribute : FactAttribute
{
    public const string Variable = "LOOKAHEAD_OPENAPI_LINTER";

    public OpenApiLinterFactAttribute()
    {
        if (string.IsNullOrWhiteSpace(Environment.GetEnvironmentVariable(Variable)) && !InContinuousIntegration)
        {
            Skip = $"{Variable} is not set: .ci/run installs the linter (npm @redocly/cli) and names it there";
        }
    }

    public static bool InContinuousIntegration => string.Equals(Environment.GetEnvironmentVariable("CI"), "true", StringComparison.OrdinalIgnoreCase);
}
