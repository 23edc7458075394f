using System.Collections.Concurrent;
using System.Net;
using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Support;

/// <summary>
/// A bounded stream of identical plan requests, a fixed number in flight at a time, each checked for a 200 with the
/// expected inputs. Anything else is kept as a failure, with the reason. A pause after each answer keeps a long stream
/// from starving a replica starting on the same small machine.
/// </summary>
public sealed class PlanStream(HttpClient client, string modelId, string expectedInputs, int total, int concurrency, TimeSpan pause = default)
{
    private const string Body = """{"state":[1,0]}""";

    /// <summary>The request header that carries each request's number, so the proxy's log can name it.</summary>
    public const string NumberHeader = "plan-number";

    private readonly ConcurrentQueue<string> failures = new();
    private readonly ConcurrentQueue<int> failed = new();
    private readonly int ceiling = total;
    private int limit = total;
    private int sent;
    private int completed;
    private int succeeded;

    public int Sent => Volatile.Read(ref sent);

    public int Completed => Volatile.Read(ref completed);

    public int Succeeded => Volatile.Read(ref succeeded);

    /// <summary>How many had been answered when <see cref="WaitForCompletedAsync"/> returned.</summary>
    public int CompletedAtKill { get; private set; }

    public IReadOnlyCollection<string> Failures => failures;

    /// <summary>The numbers of the failed requests (as sent in <see cref="NumberHeader"/>).</summary>
    public IReadOnlyCollection<int> FailedNumbers => failed;

    /// <summary>Sends no request beyond the first <paramref name="count"/> (never more than the total given at the start).</summary>
    public void StopAfter(int count) => Volatile.Write(ref limit, Math.Min(count, ceiling));

    public Task RunAsync() => Task.WhenAll(Enumerable.Range(0, concurrency).Select(_ => Task.Run(SendAsync)));

    public async Task WaitForCompletedAsync(int count)
    {
        var deadline = DateTime.UtcNow + TimeSpan.FromSeconds(30);
        while (Completed < count)
        {
            if (DateTime.UtcNow > deadline)
            {
                throw new TimeoutException($"only {Completed} of {count} plans answered within 30 s");
            }

            await Task.Delay(5);
        }

        CompletedAtKill = Completed;
    }

    private async Task SendAsync()
    {
        while (true)
        {
            int number = Interlocked.Increment(ref sent);
            if (number > Volatile.Read(ref limit))
            {
                Interlocked.Decrement(ref sent);
                return;
            }

            try
            {
                using var request = new HttpRequestMessage(HttpMethod.Post, $"/v1/models/{modelId}/plan")
                {
                    Content = new StringContent(Body, System.Text.Encoding.UTF8, "application/json"),
                };
                request.Headers.Add(NumberHeader, number.ToString(System.Globalization.CultureInfo.InvariantCulture));
                var response = await client.SendAsync(request);
                string text = await response.Content.ReadAsStringAsync();
                if (response.StatusCode != HttpStatusCode.OK)
                {
                    Fail(number, $"{(int)response.StatusCode} {text}");
                }
                else if (JsonNode.Parse(text)!["inputs"]!.ToJsonString() != expectedInputs)
                {
                    Fail(number, $"other inputs {text}");
                }
                else
                {
                    Interlocked.Increment(ref succeeded);
                }
            }
            catch (Exception ex) when (ex is HttpRequestException or TaskCanceledException)
            {
                Fail(number, $"{ex.GetType().Name} {ex.Message}");
            }
            finally
            {
                Interlocked.Increment(ref completed);
            }

            if (pause > TimeSpan.Zero)
            {
                await Task.Delay(pause);
            }
        }
    }

    private void Fail(int number, string reason)
    {
        failed.Enqueue(number);
        failures.Enqueue($"request {number}: {reason}");
    }
}
