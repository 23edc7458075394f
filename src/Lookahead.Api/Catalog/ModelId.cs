using System.Security.Cryptography;

namespace Lookahead.Api.Catalog;

/// <summary>A model id: the lower-case hex SHA-256 of the model's canonical JSON.</summary>
public static class ModelId
{
    public const int Length = 64;

    public static string FromCanonical(ReadOnlySpan<byte> canonicalJson) =>
        Convert.ToHexStringLower(SHA256.HashData(canonicalJson));

    /// <summary>True for exactly 64 characters of 0-9a-f (upper case is refused so that one model has one id).</summary>
    public static bool IsWellFormed(string? value)
    {
        if (value is null || value.Length != Length)
        {
            return false;
        }

        foreach (char c in value)
        {
            if (!char.IsAsciiDigit(c) && c is not (>= 'a' and <= 'f'))
            {
                return false;
            }
        }

        return true;
    }
}
