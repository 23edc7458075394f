namespace Lookahead.Api.Charts;

/// <summary>How a series is drawn: measured/predicted values solid, setpoints dotted, limits dashed, estimates dash-dotted.</summary>
public enum LineStyle
{
    Solid,
    Dotted,
    Dashed,

    /// <summary>Estimates drawn against the true values: unlike a limit's dashes and a setpoint's dots.</summary>
    DashDot,
}

/// <summary>One line on a panel. A stepped series holds each value until the next sample (zero-order hold, as inputs are applied).</summary>
public sealed record ChartSeries(string Label, double[] X, double[] Y, int Colour, LineStyle Style = LineStyle.Solid, bool Stepped = false);

/// <summary>A panel with its own y axis.</summary>
public sealed record ChartPanel(string Title, string YLabel, IReadOnlyList<ChartSeries> Series);

/// <summary>A chart: stacked panels sharing the x axis.</summary>
public sealed record Chart(string Title, string XLabel, IReadOnlyList<ChartPanel> Panels);
