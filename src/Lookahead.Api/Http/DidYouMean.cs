namespace Lookahead.Api.Http;

/// <summary>
/// The known name closest to a misspelt one (edit distance, case ignored), for "did you mean" hints: only a name
/// within a third of its length (at least one edit, at most three) is offered, so an unrelated field gets no hint.
/// </summary>
public static class DidYouMean
{
    public static string? Closest(string unknown, IEnumerable<string> known)
    {
        string? best = null;
        int bestDistance = int.MaxValue;
        foreach (string candidate in known)
        {
            int distance = Distance(unknown.ToLowerInvariant(), candidate.ToLowerInvariant());
            if (distance < bestDistance)
            {
                (best, bestDistance) = (candidate, distance);
            }
        }

        // Distance 0 is a name that differs only in case: fields are case-sensitive, so that is worth saying too.
        int allowed = Math.Clamp(Math.Max(unknown.Length, best?.Length ?? 0) / 3, 1, 3);
        return best is not null && best != unknown && bestDistance <= allowed ? best : null;
    }

    /// <summary>The reason for an unknown field, with the hint when there is one.</summary>
    public static string UnknownFieldReason(string unknown, IEnumerable<string> known) =>
        Closest(unknown, known) is { } hint ? $"{JsonErrorDescriber.UnknownField}; did you mean '{hint}'?" : JsonErrorDescriber.UnknownField;

    /// <summary>Optimal string alignment distance (insertions, deletions, substitutions, adjacent transpositions).</summary>
    private static int Distance(string a, string b)
    {
        var d = new int[a.Length + 1, b.Length + 1];
        for (int i = 0; i <= a.Length; i++)
        {
            d[i, 0] = i;
        }

        for (int j = 0; j <= b.Length; j++)
        {
            d[0, j] = j;
        }

        for (int i = 1; i <= a.Length; i++)
        {
            for (int j = 1; j <= b.Length; j++)
            {
                int cost = a[i - 1] == b[j - 1] ? 0 : 1;
                d[i, j] = Math.Min(Math.Min(d[i - 1, j] + 1, d[i, j - 1] + 1), d[i - 1, j - 1] + cost);
                if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
                {
                    d[i, j] = Math.Min(d[i, j], d[i - 2, j - 2] + 1);
                }
            }
        }

        return d[a.Length, b.Length];
    }
}
