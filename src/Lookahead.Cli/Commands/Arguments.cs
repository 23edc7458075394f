using System.Globalization;
using System.Text.RegularExpressions;
using Lookahead.Client;

namespace Lookahead.Cli.Commands;

/// <summary>Reading the command line's values: number lists, model references.</summary>
internal static partial class Arguments
{
    /// <summary>"1.5,-2,3" → [1.5, −2, 3] (invariant culture: the decimal point is a dot on the command line).</summary>
    public static double[]? Numbers(string? text, string option)
    {
        if (text is null)
        {
            return null;
        }

        var parts = text.Split(',', StringSplitOptions.TrimEntries);
        var values = new double[parts.Length];
        for (int i = 0; i < parts.Length; i++)
        {
            if (!double.TryParse(parts[i], NumberStyles.Float, CultureInfo.InvariantCulture, out values[i]) || !double.IsFinite(values[i]))
            {
                throw new CliInputException($"{option}: '{parts[i]}' is not a number (give numbers separated by commas, with a dot as the decimal point)");
            }
        }

        return values;
    }

    /// <summary>A model id is 64 lower-case hex digits; anything else names an alias.</summary>
    public static bool IsModelId(string reference) => ModelIdPattern().IsMatch(reference);

    /// <summary>The model id behind a reference: itself, or the alias's current target.</summary>
    public static async Task<string> ModelIdAsync(LookaheadClient client, string reference, CancellationToken cancellationToken) =>
        IsModelId(reference) ? reference : (await client.GetAliasAsync(reference, cancellationToken)).ModelId;

    public static string ReadFile(string path, string what)
    {
        try
        {
            return File.ReadAllText(path);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new CliInputException($"{what} '{path}' could not be read: {ex.Message}", ex);
        }
    }

    [GeneratedRegex("^[0-9a-f]{64}$")]
    private static partial Regex ModelIdPattern();
}
