namespace Lookahead.Api.Tests.Deploy;

/// <summary>
/// A configuration key with wildcards, compared segment by segment and without regard to case (as configuration
/// keys are): <c>*</c> stands for one segment (a list index or dictionary key), a final <c>**</c> for one or more
/// (a subtree read by a library, such as Serilog's).
/// </summary>
public sealed class SettingPattern
{
    private readonly string[] segments;

    public SettingPattern(string text)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(text);
        segments = text.Split(':');
        int deep = Array.IndexOf(segments, "**");
        if (deep >= 0 && deep != segments.Length - 1)
        {
            throw new ArgumentException($"'**' may only end a pattern: {text}", nameof(text));
        }

        Text = text;
    }

    public string Text { get; }

    public bool Matches(string key)
    {
        var parts = key.Split(':');
        for (int i = 0; i < segments.Length; i++)
        {
            if (segments[i] == "**")
            {
                return parts.Length > i;
            }

            if (i >= parts.Length || (segments[i] != "*" && !segments[i].Equals(parts[i], StringComparison.OrdinalIgnoreCase)))
            {
                return false;
            }
        }

        return parts.Length == segments.Length;
    }

    public override string ToString() => Text;
}
