namespace Lookahead.Api.Tests.Hostile;

/// <summary>
/// The seeded hostile corpus: every family of mutation over every endpoint that takes it. The same seed and targets
/// give the same requests in the same order; the seed only picks sampled positions, cut points and the slice.
/// </summary>
public static class HostileCorpus
{
    /// <summary>The whole corpus (over ten thousand requests).</summary>
    public static IReadOnlyList<HostileRequest> Full(HostileTargets targets, int seed)
    {
        var random = new Random(seed);
        return
        [
            .. ModelDocumentMutations.Generate(targets, random),
            .. RequestFieldMutations.Generate(targets),
            .. BindingMutations.Generate(targets),
            .. RouteMutations.Generate(targets),
            .. BodyMutations.Generate(targets, random),
            .. ReplayMutations.Generate(targets, random),
        ];
    }

    /// <summary>
    /// A seeded slice of <paramref name="count"/> requests that covers every family: families take turns, each
    /// giving its next request in a seeded order, until the slice is full.
    /// </summary>
    public static IReadOnlyList<HostileRequest> Slice(IReadOnlyList<HostileRequest> full, int count, int seed)
    {
        var random = new Random(seed);
        var queues = full
            .GroupBy(r => r.Family)
            .OrderBy(g => g.Key, StringComparer.Ordinal)
            .Select(g => new Queue<HostileRequest>(g.OrderBy(_ => random.Next())))
            .ToList();
        var slice = new List<HostileRequest>(count);
        while (slice.Count < count && queues.Any(q => q.Count > 0))
        {
            foreach (var queue in queues.Where(q => q.Count > 0))
            {
                if (slice.Count == count)
                {
                    break;
                }

                slice.Add(queue.Dequeue());
            }
        }

        return slice;
    }
}
