using Xunit;

namespace Lookahead.Api.Tests.Browser;

/// <summary>
/// A test that drives Debian's chromium through its chromedriver. Without them it is skipped locally, saying why;
/// under CI (CI=true) it runs and fails, since a browser test that quietly skips there would look green.
/// </summary>
[AttributeUsage(AttributeTargets.Method)]
public sealed class BrowserFactAttribute : FactAttribute
{
    public BrowserFactAttribute()
    {
        if (!HeadlessChromium.IsInstalled && !HeadlessChromium.RunningUnderCi)
        {
            Skip = $"needs {HeadlessChromium.BrowserPath} and {HeadlessChromium.DriverPath} (apt-get install chromium chromium-driver); under CI=true this fails instead";
        }
    }
}
