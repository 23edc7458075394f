using System.Net;
using Xunit;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// Everything the service has stored, as its own read endpoints give it back: the model listing and each model's
/// document, the aliases with their history, the station listing, each station and its step history. Two snapshots
/// are equal when nothing was added, removed or changed in between.
/// </summary>
public static class StoredData
{
    public static async Task<IReadOnlyDictionary<string, string>> SnapshotAsync(HttpClient client, IEnumerable<string> modelIds, IEnumerable<string> aliases, IEnumerable<string> stations)
    {
        var reads = new List<string> { "/v1/models?limit=500", "/v1/stations?limit=500" };
        reads.AddRange(modelIds.Select(id => $"/v1/models/{id}"));
        reads.AddRange(aliases.Select(name => $"/v1/aliases/{name}"));
        reads.AddRange(stations.SelectMany(name => new[] { $"/v1/stations/{name}", $"/v1/stations/{name}/steps", $"/v1/stations/{name}/steps?format=csv" }));

        var snapshot = new Dictionary<string, string>();
        foreach (var read in reads)
        {
            var response = await client.GetAsync(read);
            string body = await response.Content.ReadAsStringAsync();
            Assert.True(response.StatusCode == HttpStatusCode.OK, $"reading {read}: {(int)response.StatusCode} {body}");
            snapshot[read] = body;
        }

        return snapshot;
    }
}
