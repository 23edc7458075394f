using System.Globalization;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>Kubernetes memory quantities: a number with a binary (Ki, Mi, Gi, Ti) or decimal (k, M, G, T) suffix, or none.</summary>
public static class KubernetesQuantity
{
    /// <exception cref="FormatException">Not such a quantity.</exception>
    public static long Bytes(string quantity)
    {
        (string Suffix, long Factor)[] suffixes =
        [
            ("Ki", 1L << 10), ("Mi", 1L << 20), ("Gi", 1L << 30), ("Ti", 1L << 40),
            ("k", 1_000), ("M", 1_000_000), ("G", 1_000_000_000), ("T", 1_000_000_000_000),
        ];
        foreach (var (suffix, factor) in suffixes)
        {
            if (quantity.EndsWith(suffix, StringComparison.Ordinal))
            {
                return checked((long)(decimal.Parse(quantity[..^suffix.Length], NumberStyles.Number, CultureInfo.InvariantCulture) * factor));
            }
        }

        return long.TryParse(quantity, NumberStyles.None, CultureInfo.InvariantCulture, out long bytes)
            ? bytes
            : throw new FormatException($"'{quantity}' is not a memory quantity");
    }
}
