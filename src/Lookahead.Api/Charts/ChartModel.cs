namespace Lookahead.Api.Charts;

/// <summary>
/// How a series is drawn: measured/predicted values solid, setpoints dotted, estimates dash-dotted; lower limits in
/// green with long dashes, upper limits in red with short dashes, so the two can never be mistaken for each other.
/// </summary>
public enum LineStyle
{
    Solid,
    Dotted,
    Dashed,

    /// <summary>Estimates drawn against the true values: unlike a limit's dashes and a setpoint's dots.</summary>
    DashDot,

    /// <summary>A lower limit: drawn beneath every signal and labelled with its value.</summary>
    LimitMin,

    /// <summary>An upper limit: drawn beneath every signal and labelled with its value.</summary>
    LimitMax,
}

/// <summary>One line on a panel. A stepped series holds each value until the next sample (zero-order hold, as inputs are applied).</summary>
/// <param name="ValueLabel">For a limit: the text written at its end ("max −18 °C").</param>
public sealed record ChartSeries(string Label, double[] X, double[] Y, int Colour, LineStyle Style = LineStyle.Solid, bool Stepped = false, string? ValueLabel = null)
{
    public bool IsLimit => Style is LineStyle.LimitMin or LineStyle.LimitMax;
}

/// <summary>A stretch of the x axis to shade, e.g. where an output is outside its soft limits.</summary>
public sealed record ChartSpan(double From, double To, string Label);

/// <summary>A panel with its own y axis; spans are shaded behind everything else.</summary>
public sealed record ChartPanel(string Title, string YLabel, IReadOnlyList<ChartSeries> Series, IReadOnlyList<ChartSpan>? Spans = null);

/// <summary>A chart: stacked panels sharing the x axis.</summary>
public sealed record Chart(string Title, string XLabel, IReadOnlyList<ChartPanel> Panels);
