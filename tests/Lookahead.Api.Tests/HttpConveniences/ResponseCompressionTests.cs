using System.IO.Compression;
using System.Net;
using System.Text.Json.Nodes;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.HttpConveniences;

/// <summary>Answers are compressed with gzip or Brotli when the client asks, and decompress to the same answer.</summary>
public class ResponseCompressionTests
{
    [Theory]
    [InlineData("gzip")]
    [InlineData("br")]
    public async Task A_plan_is_compressed_when_asked_and_reads_back_the_same(string encoding)
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        const string body = """{"state":[1.0,0.0]}""";

        var plain = await (await client.PostJsonAsync($"/v1/models/{id}/plan", body)).ReadJsonAsync();
        using var request = new HttpRequestMessage(HttpMethod.Post, $"/v1/models/{id}/plan") { Content = new StringContent(body, System.Text.Encoding.UTF8, "application/json") };
        request.Headers.AcceptEncoding.ParseAdd(encoding);
        var response = await client.SendAsync(request);

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.Equal(encoding, Assert.Single(response.Content.Headers.ContentEncoding));
        byte[] compressed = await response.Content.ReadAsByteArrayAsync();
        await using Stream decoder = encoding == "gzip"
            ? new GZipStream(new MemoryStream(compressed), CompressionMode.Decompress)
            : new BrotliStream(new MemoryStream(compressed), CompressionMode.Decompress);
        var decoded = JsonNode.Parse(decoder)!;

        decoded["solveMicroseconds"] = null;
        plain["solveMicroseconds"] = null;
        Assert.True(JsonNode.DeepEquals(plain, decoded));
        Assert.True(compressed.Length < plain.ToJsonString().Length, "the compressed answer is not smaller");
    }

    [Fact]
    public async Task Without_accept_encoding_the_answer_is_not_compressed()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var response = await client.PostJsonAsync($"/v1/models/{id}/plan", """{"state":[1.0,0.0]}""");

        Assert.Empty(response.Content.Headers.ContentEncoding);
        Assert.NotNull((await response.ReadJsonAsync())["inputs"]);
    }
}
