using System.Buffers;
using System.IO.Pipelines;
using System.Text.Json;
using System.Text.Json.Serialization.Metadata;
using Microsoft.AspNetCore.Http.Json;
using Microsoft.Extensions.Options;

namespace Lookahead.Api.Http;

/// <summary>
/// Reads a JSON body under the size limit: Content-Length is checked before reading, the running length while
/// reading (chunked uploads), and only then is the body parsed — with the service's strict options.
/// </summary>
public sealed class RequestBodyReader(IOptions<JsonOptions> json, IOptions<RequestLimitsOptions> limits)
{
    public JsonSerializerOptions SerializerOptions => json.Value.SerializerOptions;

    public RequestLimitsOptions Limits => limits.Value;

    /// <summary>Turns a whole body into a value or a problem; the span is valid only during the call.</summary>
    public delegate BodyResult<T> BodyParser<T>(ReadOnlySpan<byte> body)
        where T : class;

    /// <summary>Reads the body under the limits and deserialises it with the service's strict options.</summary>
    /// <param name="beforeParse">
    /// Awaited once the whole body has arrived and before it is parsed (a turn to take); its result is disposed after.
    /// </param>
    public Task<BodyResult<T>> ReadJsonAsync<T>(HttpRequest request, CancellationToken cancellationToken, Func<CancellationToken, Task<IDisposable>>? beforeParse = null)
        where T : class
    {
        var typeInfo = (JsonTypeInfo<T>)SerializerOptions.GetTypeInfo(typeof(T));
        return ReadAsync(request, body => Deserialize(body, typeInfo), cancellationToken, beforeParse);
    }

    /// <summary>Reads the body under the limits (JSON content type required) and hands the bytes to <paramref name="parse"/>.</summary>
    public async Task<BodyResult<T>> ReadAsync<T>(HttpRequest request, BodyParser<T> parse, CancellationToken cancellationToken, Func<CancellationToken, Task<IDisposable>>? beforeParse = null)
        where T : class
    {
        if (!request.HasJsonContentType())
        {
            return BodyResult<T>.Fail(ApiProblems.UnsupportedMediaType(request.ContentType, "application/json"));
        }

        long limit = limits.Value.MaxBodyBytes;
        if (request.ContentLength > limit)
        {
            return BodyResult<T>.Fail(ApiProblems.PayloadTooLarge(limit));
        }

        PipeReader reader = request.BodyReader;
        try
        {
            while (true)
            {
                ReadResult read = await reader.ReadAsync(cancellationToken);
                ReadOnlySequence<byte> buffer = read.Buffer;
                if (buffer.Length > limit)
                {
                    reader.AdvanceTo(buffer.End);
                    return BodyResult<T>.Fail(ApiProblems.PayloadTooLarge(limit));
                }

                if (read.IsCompleted)
                {
                    IDisposable? turn = null;
                    try
                    {
                        if (beforeParse is not null)
                        {
                            turn = await beforeParse(cancellationToken);
                        }

                        return Parse(buffer, parse);
                    }
                    finally
                    {
                        turn?.Dispose();
                        reader.AdvanceTo(buffer.End);
                    }
                }

                reader.AdvanceTo(buffer.Start, buffer.End);
            }
        }
        catch (BadHttpRequestException ex) when (ex.StatusCode == StatusCodes.Status413PayloadTooLarge)
        {
            return BodyResult<T>.Fail(ApiProblems.PayloadTooLarge(limit));
        }
    }

    private static BodyResult<T> Parse<T>(ReadOnlySequence<byte> buffer, BodyParser<T> parse)
        where T : class
    {
        byte[]? rented = null;
        try
        {
            ReadOnlySpan<byte> span;
            if (buffer.IsSingleSegment)
            {
                span = buffer.FirstSpan;
            }
            else
            {
                rented = ArrayPool<byte>.Shared.Rent((int)buffer.Length);
                buffer.CopyTo(rented);
                span = rented.AsSpan(0, (int)buffer.Length);
            }

            return parse(span);
        }
        finally
        {
            if (rented is not null)
            {
                ArrayPool<byte>.Shared.Return(rented);
            }
        }
    }

    private BodyResult<T> Deserialize<T>(ReadOnlySpan<byte> body, JsonTypeInfo<T> typeInfo)
        where T : class
    {
        try
        {
            var value = JsonSerializer.Deserialize(body, typeInfo);
            return value is null
                ? BodyResult<T>.Fail(ApiProblems.Validation("", "the body must be a JSON object"))
                : BodyResult<T>.Ok(value);
        }
        catch (JsonException ex)
        {
            return BodyResult<T>.Fail(ApiProblems.JsonBody(JsonErrorDescriber.Describe(ex, limits.Value.MaxJsonDepth, typeInfo)));
        }
    }
}
