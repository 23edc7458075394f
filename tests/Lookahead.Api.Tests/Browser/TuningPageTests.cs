using System.Globalization;
using System.Net.Http.Headers;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json.Nodes;
using Lookahead.Api.Access;
using Lookahead.Api.Tests.Support;
using OpenQA.Selenium;
using OpenQA.Selenium.Chrome;
using OpenQA.Selenium.Support.UI;
using Xunit;

namespace Lookahead.Api.Tests.Browser;

/// <summary>
/// The tuning page in a real browser against the built service on a loopback port: the demo is listed and described,
/// a plan and a closed-loop run of two tunings are plotted with the number of points the answers carry, the numbers
/// shown are the service's, and a service with keys is used through a pasted key.
/// </summary>
public class TuningPageTests
{
    private static readonly TimeSpan Wait = TimeSpan.FromSeconds(30);

    [BrowserFact]
    public async Task The_page_plots_a_plan_and_two_tunings_in_closed_loop_with_the_services_numbers()
    {
        await using var store = ServiceStore.Sqlite();
        using var service = await ServiceProcess.StartAsync(store, new Dictionary<string, string> { ["Demo:Enabled"] = "true" });
        using var http = service.CreateClient();
        string demoId = (await (await http.GetAsync("/v1/aliases/cold-store-demo")).ReadJsonAsync())["modelId"]!.GetValue<string>();
        string calmId = await http.RegisterAsync(CalmerDemoTuning());

        using var driver = HeadlessChromium.Start();
        var wait = new WebDriverWait(driver, Wait);
        driver.Navigate().GoToUrl(service.Address);

        // The catalogue lists the demo's alias, and the page picks its model and describes it.
        wait.Until(d => d.FindElement(By.Id("aliases")).Text.Contains("cold-store-demo", StringComparison.Ordinal));
        wait.Until(d => d.FindElement(By.Id("details-a")).Text.Contains("cold-store-demo", StringComparison.Ordinal));
        Assert.Equal(demoId, driver.FindElement(By.Id("model-a")).GetDomProperty("value"));
        string details = driver.FindElement(By.Id("details-a")).Text;
        Assert.Contains("zone_a (°C)", details, StringComparison.Ordinal);
        Assert.Contains("chiller_1 (%)", details, StringComparison.Ordinal);
        Assert.Contains("horizon 30", details, StringComparison.Ordinal);

        // A plan: N + 1 = 31 output samples, 30 held moves drawn over 31 times.
        driver.FindElement(By.Id("run-plan")).Click();
        wait.Until(d => d.FindElements(By.CssSelector("#results [data-figure=outputs] path[data-series=zone_a]")).Count == 1);
        var planOutputs = driver.FindElement(By.CssSelector("#results [data-figure=outputs]"));
        Assert.Equal("31", Series(planOutputs, "zone_a").GetAttribute("data-points"));
        Assert.Equal("31", Series(planOutputs, "zone_a setpoint").GetAttribute("data-points"));
        Assert.Equal(31, planOutputs.FindElements(By.CssSelector("tbody tr")).Count);
        Assert.Equal("limit-min", Series(planOutputs, "all min −23 °C").GetAttribute("data-role"));
        Assert.Equal("limit-max", Series(planOutputs, "all max −18 °C").GetAttribute("data-role"));
        var planMoves = driver.FindElement(By.CssSelector("#results [data-figure=moves]"));
        Assert.Equal("limit-max", Series(planMoves, "Δchiller_1, Δchiller_2 max 20 %").GetAttribute("data-role"));

        // Model B, 40 steps, closed loop through the estimator (the demo has one): both columns plotted.
        driver.FindElement(By.CssSelector($"#model-b option[value='{calmId}']")).Click();
        wait.Until(d => d.FindElement(By.Id("details-b")).Text.Contains("calmer", StringComparison.Ordinal));
        var steps = driver.FindElement(By.Id("steps"));
        steps.Clear();
        steps.SendKeys("40");
        driver.FindElement(By.Id("run-simulation")).Click();
        wait.Until(d => d.FindElements(By.CssSelector("#results[data-kind=simulate] .result[data-model=b] [data-figure=outputs] path[data-series=zone_a]")).Count == 1);

        foreach (string column in new[] { "a", "b" })
        {
            var outputs = driver.FindElement(By.CssSelector($"#results .result[data-model={column}] [data-figure=outputs]"));
            Assert.Equal("41", Series(outputs, "zone_c").GetAttribute("data-points"));
            Assert.Equal("41", Series(outputs, "zone_c estimate").GetAttribute("data-points"));
            Assert.Equal("41", Series(outputs, "zone_c setpoint").GetAttribute("data-points"));
            var inputs = driver.FindElement(By.CssSelector($"#results .result[data-model={column}] [data-figure=inputs]"));
            Assert.Equal("41", Series(inputs, "door_fan").GetAttribute("data-points"));
            Assert.Equal(41, inputs.FindElements(By.CssSelector("tbody tr")).Count);
        }

        // The table shows the service's own numbers: the same run asked of the API directly.
        var direct = await (await http.PostJsonAsync($"/v1/models/{demoId}/simulate", SameRunAsThePage())).ReadJsonAsync();
        var lastRow = driver.FindElement(By.CssSelector("#results .result[data-model=a] [data-figure=outputs] tbody tr:last-child"));
        double shown = ParseShown(lastRow.FindElements(By.TagName("td"))[0].Text);
        double expected = direct["outputs"]![40]![0]!.GetValue<double>();
        Assert.True(Math.Abs(shown - expected) <= 5e-4 * Math.Abs(expected), $"table shows {shown}, the service answered {expected}");

        // Hover readout from the keyboard: focus the chart and step to the end.
        var chart = driver.FindElement(By.CssSelector("#results .result[data-model=a] [data-figure=outputs] svg"));
        chart.SendKeys(Keys.End);
        string readout = driver.FindElement(By.CssSelector("#results .result[data-model=a] [data-figure=outputs] output")).Text;
        Assert.StartsWith("time 40 min:", readout, StringComparison.Ordinal);
        Assert.Contains("zone_a ", readout, StringComparison.Ordinal);
        Assert.Contains("°C", readout, StringComparison.Ordinal);

        HeadlessChromium.SaveScreenshot(driver, "tuning-page-top.png");
        ((IJavaScriptExecutor)driver).ExecuteScript("document.getElementById('results').scrollIntoView()");
        string shot = HeadlessChromium.SaveScreenshot(driver, "tuning-page.png");
        Assert.True(new FileInfo(shot).Length > 10_000, $"the screenshot {shot} is suspiciously small");
        var size = (IReadOnlyCollection<object>)((IJavaScriptExecutor)driver).ExecuteScript("return [window.innerWidth, window.innerHeight]")!;
        Assert.Equal([1280L, 800L], size.Cast<long>());

        // A narrow screen: everything in one column, nothing wider than the screen.
        HeadlessChromium.SetViewport(driver, 390, 844);
        var widths = (IReadOnlyCollection<object>)((IJavaScriptExecutor)driver).ExecuteScript("return [document.documentElement.scrollWidth, window.innerWidth]")!;
        Assert.Equal(390L, widths.Cast<long>().Last());
        string widest = (string)((IJavaScriptExecutor)driver).ExecuteScript(
            "return [...document.querySelectorAll('body *')].filter(e => e.getBoundingClientRect().right > window.innerWidth + 0.5)" +
            ".slice(0, 8).map(e => `${e.tagName.toLowerCase()}#${e.id}.${e.className?.baseVal ?? e.className} ${Math.round(e.getBoundingClientRect().right)}`).join('; ')")!;
        Assert.True(widths.Cast<long>().First() <= 390, $"the page is {widths.First()} px wide on a 390 px screen: {widest}");
        HeadlessChromium.SaveScreenshot(driver, "tuning-page-narrow.png");
    }

    [BrowserFact]
    public async Task With_keys_configured_the_page_asks_for_one_and_sends_it_as_a_bearer_token_and_shows_what_the_key_may_not_list()
    {
        const string key = "page-key-3e8a51";
        var settings = new Dictionary<string, string>
        {
            ["Demo:Enabled"] = "true",
            ["Auth:Keys:0:Hash"] = Convert.ToHexStringLower(SHA256.HashData(Encoding.UTF8.GetBytes(key))),
            ["Auth:Keys:0:Scopes:0"] = AccessScopes.PlansRun,
        };
        await using var store = ServiceStore.Sqlite();
        using var service = await ServiceProcess.StartAsync(store, settings);

        using var driver = HeadlessChromium.Start();
        var wait = new WebDriverWait(driver, Wait);
        driver.Navigate().GoToUrl(service.Address);
        wait.Until(d => d.FindElement(By.Id("status")).Text.Contains("API key", StringComparison.Ordinal));
        Assert.Empty(driver.FindElements(By.CssSelector("#aliases button")));

        driver.FindElement(By.Id("api-key")).SendKeys(key);
        driver.FindElement(By.CssSelector("#key-form button[type=submit]")).Click();
        wait.Until(d => d.FindElement(By.Id("aliases")).Text.Contains("cold-store-demo", StringComparison.Ordinal));
        wait.Until(d => d.FindElement(By.Id("details-a")).Text.Contains("cold-store-demo", StringComparison.Ordinal));
        Assert.Equal(key, ((IJavaScriptExecutor)driver).ExecuteScript("return sessionStorage.getItem('lookahead.apiKey')"));

        // The key may plan but not touch stations: that listing says so, the rest of the page works.
        Assert.Contains("not shown", driver.FindElement(By.Id("stations")).Text, StringComparison.Ordinal);

        // The key survives a reload of the tab (sessionStorage), and a plan goes through with it.
        driver.Navigate().Refresh();
        wait.Until(d => d.FindElement(By.Id("details-a")).Text.Contains("cold-store-demo", StringComparison.Ordinal));
        driver.FindElement(By.Id("run-plan")).Click();
        wait.Until(d => d.FindElements(By.CssSelector("#results [data-figure=outputs] path[data-series=zone_a]")).Count == 1);

        driver.FindElement(By.Id("key-clear")).Click();
        Assert.Null(((IJavaScriptExecutor)driver).ExecuteScript("return sessionStorage.getItem('lookahead.apiKey')"));
    }

    private static IWebElement Series(IWebElement figure, string label) =>
        figure.FindElements(By.CssSelector("path[data-series]")).SingleOrDefault(p => p.GetAttribute("data-series") == label)
        ?? throw new Xunit.Sdk.XunitException($"no series '{label}' among: {string.Join(" | ", figure.FindElements(By.CssSelector("path[data-series]")).Select(p => p.GetAttribute("data-series")))}");

    private static double ParseShown(string text) => double.Parse(text.Replace('−', '-'), NumberStyles.Float, CultureInfo.InvariantCulture);

    /// <summary>The demo with the moves weighted ten times more: a second, calmer tuning of the same plant.</summary>
    private static string CalmerDemoTuning()
    {
        var document = JsonNode.Parse(File.ReadAllText(Path.Combine(Repository.Root, "src", "Lookahead.Api", "Demo", "cold-store.json")))!;
        document["name"] = "cold-store-calmer";
        document["cost"]!["inputRateWeight"] = new JsonArray(0.0005, 0.0005, 0.0002);
        return document.ToJsonString();
    }

    /// <summary>What the page sends for the demo's default scenario at 40 steps (start 1.5 °C above the operating point).</summary>
    private static string SameRunAsThePage() => """
        {"initialState":[-18.5,-18.5,-18.5],"steps":40,"previousInput":[0,0,0],
         "references":[{"fromStep":0,"reference":[-20,-20,-20]},{"fromStep":30,"reference":[-21,-21,-21]}],
         "measuredDisturbances":[{"fromStep":0,"disturbance":[15]}],"feedback":"estimate"}
        """;
}
