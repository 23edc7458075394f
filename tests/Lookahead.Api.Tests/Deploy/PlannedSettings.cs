using Lookahead.Api.Tests.Support;

namespace Lookahead.Api.Tests.Deploy;

/// <summary>The allow-list of settings deploy/ sets before the service reads them (PlannedSettings.txt beside this file).</summary>
public static class PlannedSettings
{
    public static string File => Path.Combine(Repository.Root, "tests", "Lookahead.Api.Tests", "Deploy", "PlannedSettings.txt");

    /// <summary>Each pattern with its 1-based line; comments (#) and blank lines skipped.</summary>
    public static IReadOnlyList<(SettingPattern Pattern, int Line)> Read() =>
        [.. System.IO.File.ReadAllLines(File)
            .Select((text, index) => (Text: text.Trim(), Line: index + 1))
            .Where(l => l.Text.Length > 0 && !l.Text.StartsWith('#'))
            .Select(l => (new SettingPattern(l.Text), l.Line))];
}
