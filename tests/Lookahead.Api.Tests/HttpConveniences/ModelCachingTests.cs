using System.Net;
using System.Net.Http.Headers;
using Lookahead.Api.Tests.Support;
using Xunit;

namespace Lookahead.Api.Tests.HttpConveniences;

/// <summary>A model's GET carries an entity tag and may be kept as immutable; a matching If-None-Match gets 304 with no body.</summary>
public class ModelCachingTests
{
    [Fact]
    public async Task A_models_get_has_an_etag_and_immutable_private_caching()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);

        var response = await client.GetAsync($"/v1/models/{id}");

        Assert.Equal(HttpStatusCode.OK, response.StatusCode);
        Assert.NotNull(response.Headers.ETag);
        Assert.StartsWith($"\"{id}.", response.Headers.ETag!.Tag, StringComparison.Ordinal);
        Assert.True(response.Headers.CacheControl!.Private);
        Assert.Contains(response.Headers.CacheControl.Extensions, e => e.Name == "immutable");
        Assert.Equal(TimeSpan.FromDays(365), response.Headers.CacheControl.MaxAge);
    }

    [Fact]
    public async Task A_matching_if_none_match_is_answered_304_without_a_body_and_another_tag_gets_the_model()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        var tag = (await client.GetAsync($"/v1/models/{id}")).Headers.ETag!;

        using var revalidate = new HttpRequestMessage(HttpMethod.Get, $"/v1/models/{id}");
        revalidate.Headers.IfNoneMatch.Add(tag);
        var notModified = await client.SendAsync(revalidate);
        Assert.Equal(HttpStatusCode.NotModified, notModified.StatusCode);
        Assert.Empty(await notModified.Content.ReadAsByteArrayAsync());
        Assert.Equal(tag, notModified.Headers.ETag);

        using var stale = new HttpRequestMessage(HttpMethod.Get, $"/v1/models/{id}");
        stale.Headers.IfNoneMatch.Add(new EntityTagHeaderValue("\"another\""));
        var fresh = await client.SendAsync(stale);
        Assert.Equal(HttpStatusCode.OK, fresh.StatusCode);
        Assert.Equal(id, (await fresh.ReadJsonAsync())["id"]!.GetValue<string>());
    }

    [Fact]
    public async Task A_model_registered_again_after_a_delete_has_a_new_tag_so_an_old_copy_is_not_confirmed()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        var before = (await client.GetAsync($"/v1/models/{id}")).Headers.ETag!;
        Assert.Equal(HttpStatusCode.NoContent, (await client.DeleteAsync($"/v1/models/{id}")).StatusCode);

        // The registration time is kept to the millisecond; a new one must differ from the first.
        await Task.Delay(5);
        await client.RegisterAsync(TestModels.DoubleIntegrator);
        using var revalidate = new HttpRequestMessage(HttpMethod.Get, $"/v1/models/{id}");
        revalidate.Headers.IfNoneMatch.Add(before);
        var answer = await client.SendAsync(revalidate);

        Assert.Equal(HttpStatusCode.OK, answer.StatusCode);
        Assert.NotEqual(before, answer.Headers.ETag);
    }

    [Fact]
    public async Task A_deleted_model_is_404_even_with_its_old_tag()
    {
        await using var factory = new LookaheadFactory();
        var client = factory.CreateClient();
        string id = await client.RegisterAsync(TestModels.DoubleIntegrator);
        var tag = (await client.GetAsync($"/v1/models/{id}")).Headers.ETag!;
        await client.DeleteAsync($"/v1/models/{id}");

        using var revalidate = new HttpRequestMessage(HttpMethod.Get, $"/v1/models/{id}");
        revalidate.Headers.IfNoneMatch.Add(tag);
        await (await client.SendAsync(revalidate)).ReadProblemAsync(HttpStatusCode.NotFound);
    }
}
