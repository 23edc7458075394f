using System.Diagnostics;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.Contract;

/// <summary>The served OpenAPI document passes a general-purpose linter (its recommended rules, openapi/redocly.yaml) with no errors.</summary>
public class OpenApiLintTests
{
    [OpenApiLinterFact]
    public async Task The_served_document_passes_the_linter_with_no_errors()
    {
        string? linter = Environment.GetEnvironmentVariable(OpenApiLinterFactAttribute.Variable);
        Assert.False(string.IsNullOrWhiteSpace(linter), $"{OpenApiLinterFactAttribute.Variable} is not set, and CI=true: the linter must be installed (.ci/run does it)");
        Assert.True(File.Exists(linter), $"{OpenApiLinterFactAttribute.Variable} names {linter}, which does not exist");

        await using var factory = new LookaheadFactory();
        string served = await factory.CreateClient().GetStringAsync("/swagger/v1/swagger.json");
        string folder = Directory.CreateTempSubdirectory("lookahead-lint-").FullName;
        try
        {
            string document = Path.Combine(folder, "lookahead.json");
            await File.WriteAllTextAsync(document, served);
            var start = new ProcessStartInfo(linter!)
            {
                RedirectStandardOutput = true,
                RedirectStandardError = true,
                WorkingDirectory = folder,
            };
            foreach (var argument in new[] { "lint", document, "--config", Path.Combine(Repository.Root, "openapi", "redocly.yaml"), "--format=stylish" })
            {
                start.ArgumentList.Add(argument);
            }

            using var process = Process.Start(start)!;
            var output = process.StandardOutput.ReadToEndAsync();
            var errors = process.StandardError.ReadToEndAsync();

            // A hang guard, not a timing: the linter takes about a second.
            using var guard = new CancellationTokenSource(TimeSpan.FromMinutes(3));
            await process.WaitForExitAsync(guard.Token);
            Assert.True(process.ExitCode == 0, $"the linter reported errors:\n{await output}\n{await errors}");
        }
        finally
        {
            Directory.Delete(folder, recursive: true);
        }
    }
}
