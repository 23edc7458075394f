using System.Text.Json;
using Lookahead.Api.Catalog;
using Lookahead.Api.Storage;
using Lookahead.Core.Validation;
using Microsoft.AspNetCore.Diagnostics;
using Microsoft.AspNetCore.Mvc;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Http;

/// <summary>
/// Last line of defence: whatever escapes a handler becomes a problem document. Known client errors keep
/// their status; anything else is a 500 that says nothing about the implementation (details go to the log).
/// </summary>
public sealed partial class ProblemExceptionHandler(IProblemDetailsService problems, IOptions<RequestLimitsOptions> limits, ILogger<ProblemExceptionHandler> logger) : IExceptionHandler
{
    public async ValueTask<bool> TryHandleAsync(HttpContext httpContext, Exception exception, CancellationToken cancellationToken)
    {
        if (exception is OperationCanceledException && httpContext.RequestAborted.IsCancellationRequested)
        {
            // The client went away; there is nobody to answer.
            return true;
        }

        ProblemDetails problem = exception switch
        {
            BadHttpRequestException { StatusCode: StatusCodes.Status413PayloadTooLarge } => ApiProblems.PayloadTooLargeDetails(limits.Value.MaxBodyBytes),
            BadHttpRequestException bad when BindingFailure().Match(bad.Message) is { Success: true } binding =>
                ApiProblems.Create(StatusCodes.Status400BadRequest, ProblemTypes.Validation, "Invalid request", "A query or route value has the wrong form.", [new ProblemError(binding.Groups["name"].Value, $"'{binding.Groups["value"].Value}' is not {Expected(binding.Groups["type"].Value)}")]),
            BadHttpRequestException bad => ApiProblems.Create(bad.StatusCode, ProblemTypes.Http, "Bad request", "The request could not be read."),
            JsonException json => ApiProblems.JsonBodyDetails(JsonErrorDescriber.Describe(json, limits.Value.MaxJsonDepth)),
            StoreUnavailableException unavailable => ApiProblems.Create(StatusCodes.Status503ServiceUnavailable, ProblemTypes.Unavailable, "Store unavailable", unavailable.Message),
            CompileRefusedException refused => ApiProblems.Create(StatusCodes.Status503ServiceUnavailable, ProblemTypes.Unavailable, "Compile budget spent", refused.Message),
            ModelValidationException invalid => ApiProblems.Create(StatusCodes.Status400BadRequest, ProblemTypes.Validation, "Invalid request", "The request has invalid fields; see errors.", invalid.Errors.Select(ApiProblems.ToProblemError)),
            _ => ApiProblems.Create(StatusCodes.Status500InternalServerError, ProblemTypes.Internal, "Unexpected error", "The service could not complete the request; the incident is logged with its trace id."),
        };

        if (exception is StoreUnavailableException)
        {
            // Expected while the store is down or its file is gone: a warning with the cause, not an incident per request.
            logger.LogWarning(exception.InnerException ?? exception, "Store unavailable on {Method} {Path}", httpContext.Request.Method, httpContext.Request.Path);
        }
        else if (exception is CompileRefusedException refusedCompile)
        {
            // Load shedding by design: counted in the metrics, one line per refusal at most.
            logger.LogWarning("Compile refused ({Reason}) on {Method} {Path}", refusedCompile.Reason, httpContext.Request.Method, httpContext.Request.Path);
        }
        else if (problem.Status >= 500)
        {
            logger.LogError(exception, "Unhandled exception on {Method} {Path}", httpContext.Request.Method, httpContext.Request.Path);
        }

        if (httpContext.Response.HasStarted)
        {
            return true;
        }

        httpContext.Response.StatusCode = problem.Status ?? 500;
        if (exception is StoreUnavailableException)
        {
            httpContext.Response.Headers.RetryAfter = StoreUnavailableException.RetryAfterSeconds.ToString(System.Globalization.CultureInfo.InvariantCulture);
        }
        else if (exception is CompileRefusedException)
        {
            httpContext.Response.Headers.RetryAfter = CompileRefusedException.RetryAfterSeconds.ToString(System.Globalization.CultureInfo.InvariantCulture);
        }

        return await problems.TryWriteAsync(new ProblemDetailsContext { HttpContext = httpContext, ProblemDetails = problem, Exception = exception });
    }

    private static string Expected(string type) => type.TrimEnd('?') switch
    {
        "int" or "long" => "an integer",
        "double" => "a number",
        "bool" => "true or false",
        _ => "of the expected form",
    };

    // Minimal APIs phrase binding failures as: Failed to bind parameter "int? offset" from "abc".
    [System.Text.RegularExpressions.GeneratedRegex("Failed to bind parameter \"(?<type>[^ \"]+) (?<name>[^\"]+)\" from \"(?<value>[^\"]*)\"")]
    private static partial System.Text.RegularExpressions.Regex BindingFailure();
}
