using Xunit;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>nginx configurations under deploy/ parse, and every proxy target is an upstream they define.</summary>
[Collection(DeployFixture.Collection)]
public class NginxConfigTests(DeployFixture deploy)
{
    [Fact]
    public void Every_nginx_configuration_parses_and_proxies_to_a_defined_upstream()
    {
        Assert.NotEmpty(deploy.Folder.NginxConfigs);
        foreach (string file in deploy.Folder.NginxConfigs)
        {
            IReadOnlyList<NginxDirective> directives;
            try
            {
                directives = NginxDirective.Parse(deploy.Folder.Read(file));
            }
            catch (FormatException ex)
            {
                throw new Xunit.Sdk.XunitException($"{file}: {ex.Message}");
            }

            var all = NginxDirective.All(directives).ToList();
            var upstreams = all.Where(d => d.Name == "upstream").Select(d => d.Arguments[0]).ToHashSet(StringComparer.Ordinal);
            var targets = all.Where(d => d.Name == "proxy_pass").ToList();
            Assert.NotEmpty(targets);
            foreach (var target in targets)
            {
                var host = new Uri(target.Arguments[0]).Host;
                Assert.True(upstreams.Contains(host), $"{file}:{target.Line}: proxy_pass to '{host}', which no upstream block defines");
            }
        }
    }

    [Theory]
    [InlineData("http { server { listen 80; }", "never closed")]
    [InlineData("http { listen 80; } }", "closes no block")]
    [InlineData("http { listen 80 }", "is not ended by ';'")]
    [InlineData("events { worker_connections 1024; }\nhttp { server { listen 80;\n}", "line 2")]
    public void Parser_rejects_unbalanced_braces_and_unterminated_directives(string text, string expected)
    {
        var error = Assert.Throws<FormatException>(() => NginxDirective.Parse(text));

        Assert.Contains(expected, error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Parser_ignores_braces_in_comments_and_quotes()
    {
        var directives = NginxDirective.Parse("# { not a block\nhttp { log_format x '{ \"a\": $status }'; }\n");

        var http = Assert.Single(directives);
        Assert.Equal("log_format", Assert.Single(http.Block!).Name);
    }
}
