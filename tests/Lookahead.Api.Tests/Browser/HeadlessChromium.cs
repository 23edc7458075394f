using OpenQA.Selenium;
using OpenQA.Selenium.Chrome;

namespace Lookahead.Api.Tests.Browser;

/// <summary>Debian's chromium, headless, through Debian's chromedriver: never a browser or driver fetched by a tool.</summary>
public static class HeadlessChromium
{
    public const string BrowserPath = "/usr/bin/chromium";
    public const string DriverPath = "/usr/bin/chromedriver";

    /// <summary>Where screenshots go: $LOOKAHEAD_TEST_ARTIFACTS when set, else a folder under the temp path.</summary>
    public const string ArtifactsVariable = "LOOKAHEAD_TEST_ARTIFACTS";

    public static bool IsInstalled => File.Exists(BrowserPath) && File.Exists(DriverPath);

    public static bool RunningUnderCi => string.Equals(Environment.GetEnvironmentVariable("CI"), "true", StringComparison.OrdinalIgnoreCase);

    /// <summary>A browser with a 1280×800 window and a fresh profile folder of its own.</summary>
    public static ChromeDriver Start(int width = 1280, int height = 800)
    {
        if (!IsInstalled)
        {
            throw new InvalidOperationException($"the browser test needs {BrowserPath} and {DriverPath}: apt-get install -y chromium chromium-driver");
        }

        string profile = Directory.CreateTempSubdirectory("lookahead-chromium-").FullName;
        var options = new ChromeOptions { BinaryLocation = BrowserPath };
        options.AddArguments(
            "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
            "--disable-component-update", "--disable-sync", "--disable-dev-shm-usage", "--hide-scrollbars", $"--window-size={width},{height}",
            $"--user-data-dir={profile}");
        var service = ChromeDriverService.CreateDefaultService(Path.GetDirectoryName(DriverPath)!, Path.GetFileName(DriverPath));
        service.SuppressInitialDiagnosticInformation = true;
        service.HideCommandPromptWindow = true;
        var driver = new ChromeDriver(service, options, TimeSpan.FromSeconds(60));
        driver.Manage().Timeouts().PageLoad = TimeSpan.FromSeconds(30);
        SetViewport(driver, width, height);
        return driver;
    }

    /// <summary>The page's own size (the window's --window-size counts the browser's frame too).</summary>
    public static void SetViewport(ChromeDriver driver, int width, int height) =>
        driver.ExecuteCdpCommand("Emulation.setDeviceMetricsOverride", new Dictionary<string, object?>
        {
            ["width"] = width,
            ["height"] = height,
            ["deviceScaleFactor"] = 1,
            ["mobile"] = false,
        });

    public static string ArtifactsFolder()
    {
        string folder = Environment.GetEnvironmentVariable(ArtifactsVariable) is { Length: > 0 } given
            ? given
            : Path.Combine(Path.GetTempPath(), "lookahead-test-artifacts");
        Directory.CreateDirectory(folder);
        return folder;
    }

    /// <summary>Saves a PNG of the viewport and returns its path.</summary>
    public static string SaveScreenshot(IWebDriver driver, string name)
    {
        string path = Path.Combine(ArtifactsFolder(), name);
        ((ITakesScreenshot)driver).GetScreenshot().SaveAsFile(path);
        return path;
    }
}
