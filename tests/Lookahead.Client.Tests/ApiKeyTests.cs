using System.Net;
using System.Security.Cryptography;
using System.Text;
using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests;

/// <summary>The API key travels as a Bearer token; without it a service with keys refuses with 401.</summary>
public class ApiKeyTests
{
    private const string Key = "client-test-key-5c1e";

    [Fact]
    public async Task The_key_is_sent_as_a_bearer_token_and_a_missing_key_is_a_401_problem()
    {
        await using var service = new ServiceFactory(new Dictionary<string, string?>
        {
            ["Auth:Keys:0:Hash"] = Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(Key))),
            ["Auth:Keys:0:Scopes:0"] = "admin",
        });
        var handler = new ScriptedHandler(service.CreateServerHandler());
        using var http = new HttpClient(handler) { BaseAddress = service.Server.BaseAddress };
        using var keyed = new LookaheadClient(http, new LookaheadClientOptions { ApiKey = Key });
        using var anonymous = new LookaheadClient(http);

        var model = await keyed.RegisterModelAsync(Models.DoubleIntegrator());
        Assert.Equal("Bearer " + Key, handler.Authorizations[0]);

        var refused = await Assert.ThrowsAsync<LookaheadProblemException>(() => anonymous.GetModelAsync(model.Id));
        Assert.Equal(HttpStatusCode.Unauthorized, refused.Status);
        Assert.Null(handler.Authorizations[^1]);
    }
}
