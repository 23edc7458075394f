using System.Globalization;
using System.Text;
using System.Xml;

namespace Lookahead.Api.Charts;

/// <summary>
/// Writes a <see cref="Chart"/> as a standalone SVG document with XmlWriter, so labels are escaped properly.
/// Panels are stacked; each has axes with ticks, a grid, its lines and a legend on the right.
/// </summary>
public static class SvgChartWriter
{
    private const int Width = 960;
    private const int PanelHeight = 260;
    private const int Left = 72;
    private const int Right = 220;
    private const int Top = 48;
    private const int PanelGap = 56;
    private const int Bottom = 48;
    private const int LegendLine = 16;

    // Signals avoid the limits' green and red, so a limit never reads as a signal.
    private static readonly string[] Palette = ["#1f5fbf", "#e07b00", "#7b3fb5", "#00847e", "#b8327a", "#6b7d00", "#8c564b", "#17becf", "#bcbd22", "#7f7f7f"];

    private const string MinColour = "#1f6b3a";
    private const string MaxColour = "#b3261e";
    private const string SpanFill = "#f0aa00";

    public static string Write(Chart chart)
    {
        int height = Top + (chart.Panels.Count * PanelHeight) + ((chart.Panels.Count - 1) * PanelGap) + Bottom;
        var text = new StringBuilder();
        var settings = new XmlWriterSettings { Indent = false, OmitXmlDeclaration = true, Encoding = Encoding.UTF8 };
        using (var writer = XmlWriter.Create(new StringWriter(text, CultureInfo.InvariantCulture), settings))
        {
            writer.WriteStartElement("svg", "http://www.w3.org/2000/svg");
            Attr(writer, "width", Width);
            Attr(writer, "height", height);
            writer.WriteAttributeString("viewBox", $"0 0 {Width} {height}");
            writer.WriteAttributeString("font-family", "DejaVu Sans, Arial, sans-serif");
            writer.WriteAttributeString("font-size", "12");
            writer.WriteElementString("title", chart.Title);
            Rect(writer, 0, 0, Width, height, "#ffffff", null);
            TextAt(writer, Width / 2.0, 24, chart.Title, "middle", "16", "bold");

            double xMin = chart.Panels.SelectMany(p => p.Series).SelectMany(s => s.X).DefaultIfEmpty(0).Min();
            double xMax = chart.Panels.SelectMany(p => p.Series).SelectMany(s => s.X).DefaultIfEmpty(1).Max();
            var xAxis = AxisTicks.Range(xMin, xMax, 8);
            for (int i = 0; i < chart.Panels.Count; i++)
            {
                double top = Top + (i * (PanelHeight + PanelGap));
                WritePanel(writer, chart.Panels[i], top, xAxis, i == chart.Panels.Count - 1 ? chart.XLabel : null);
            }

            writer.WriteEndElement();
        }

        return text.ToString();
    }

    private static void WritePanel(XmlWriter writer, ChartPanel panel, double top, (double Low, double High, double Step) xAxis, string? xLabel)
    {
        double plotWidth = Width - Left - Right;
        double plotHeight = PanelHeight - 30;
        double plotTop = top + 22;
        var values = panel.Series.SelectMany(s => s.Y).Where(double.IsFinite).ToList();
        var yAxis = AxisTicks.Range(values.DefaultIfEmpty(0).Min(), values.DefaultIfEmpty(1).Max());
        double X(double x) => Left + ((x - xAxis.Low) / (xAxis.High - xAxis.Low) * plotWidth);
        double Y(double y) => plotTop + plotHeight - ((y - yAxis.Low) / (yAxis.High - yAxis.Low) * plotHeight);

        TextAt(writer, Left, top + 14, panel.Title, "start", "13", "bold");
        Rect(writer, Left, plotTop, plotWidth, plotHeight, "#fafafa", "#888888");

        foreach (double y in AxisTicks.Values(yAxis.Low, yAxis.High, yAxis.Step))
        {
            Line(writer, Left, Y(y), Left + plotWidth, Y(y), "#e0e0e0", null);
            Line(writer, Left - 5, Y(y), Left, Y(y), "#444444", null);
            TextAt(writer, Left - 8, Y(y) + 4, TickLabel(y), "end", null, null);
        }

        foreach (double x in AxisTicks.Values(xAxis.Low, xAxis.High, xAxis.Step))
        {
            Line(writer, X(x), plotTop, X(x), plotTop + plotHeight, "#eeeeee", null);
            Line(writer, X(x), plotTop + plotHeight, X(x), plotTop + plotHeight + 5, "#444444", null);
            TextAt(writer, X(x), plotTop + plotHeight + 18, TickLabel(x), "middle", null, null);
        }

        // y label, rotated along the axis
        writer.WriteStartElement("text");
        double labelX = 18;
        double labelY = plotTop + (plotHeight / 2);
        Attr(writer, "x", labelX);
        Attr(writer, "y", labelY);
        writer.WriteAttributeString("text-anchor", "middle");
        writer.WriteAttributeString("transform", $"rotate(-90 {Format(labelX)} {Format(labelY)})");
        writer.WriteString(panel.YLabel);
        writer.WriteEndElement();

        if (xLabel is not null)
        {
            TextAt(writer, Left + (plotWidth / 2), plotTop + plotHeight + 38, xLabel, "middle", null, null);
        }

        foreach (var span in panel.Spans ?? [])
        {
            // At least a few pixels wide, so a single sample outside a limit still shows.
            double from = X(span.From) - 2;
            writer.WriteStartElement("rect");
            Attr(writer, "x", from);
            Attr(writer, "y", plotTop);
            Attr(writer, "width", Math.Max(X(span.To) + 2 - from, 4));
            Attr(writer, "height", plotHeight);
            writer.WriteAttributeString("fill", SpanFill);
            writer.WriteAttributeString("fill-opacity", "0.22");
            writer.WriteAttributeString("class", "soft-limit-violation");
            writer.WriteElementString("title", span.Label);
            writer.WriteEndElement();
        }

        // Limits first: a signal lying on its limit is drawn over it and stays visible.
        foreach (var series in panel.Series.Where(s => s.IsLimit).Concat(panel.Series.Where(s => !s.IsLimit)))
        {
            writer.WriteStartElement("polyline");
            writer.WriteAttributeString("fill", "none");
            writer.WriteAttributeString("stroke", Stroke(series));
            writer.WriteAttributeString("stroke-width", series.Style == LineStyle.Solid ? "2" : "1.5");
            if (series.Style != LineStyle.Solid)
            {
                writer.WriteAttributeString("stroke-dasharray", DashPattern(series.Style));
            }

            writer.WriteAttributeString("points", Points(series, X, Y));
            writer.WriteStartElement("title");
            writer.WriteString(series.Label);
            writer.WriteEndElement();
            writer.WriteEndElement();
            if (series.IsLimit && series.ValueLabel is not null && series.Y.Length > 0 && double.IsFinite(series.Y[0]))
            {
                // The value at the line's right end, above an upper limit and below a lower one.
                // Flipped to the inside when the line runs along the plot's edge, clear of the tick labels.
                double lineY = Y(series.Y[0]);
                bool above = series.Style == LineStyle.LimitMax ? lineY - 14 > plotTop : lineY + 14 > plotTop + plotHeight;
                double valueY = above ? lineY - 4 : lineY + 13;
                writer.WriteStartElement("text");
                Attr(writer, "x", Left + plotWidth - 4);
                Attr(writer, "y", valueY);
                writer.WriteAttributeString("text-anchor", "end");
                writer.WriteAttributeString("font-size", "11");
                writer.WriteAttributeString("fill", Stroke(series));
                writer.WriteAttributeString("class", series.Style == LineStyle.LimitMin ? "limit-min" : "limit-max");
                writer.WriteString(series.ValueLabel);
                writer.WriteEndElement();
            }
        }

        WriteLegend(writer, panel, Left + plotWidth + 16, plotTop + 4, plotHeight);
    }

    private static void WriteLegend(XmlWriter writer, ChartPanel panel, double x, double y, double height)
    {
        int fits = (int)(height / LegendLine);
        int shown = panel.Series.Count <= fits ? panel.Series.Count : fits - 1;
        for (int i = 0; i < shown; i++)
        {
            var series = panel.Series[i];
            double rowY = y + (i * LegendLine) + 8;
            writer.WriteStartElement("line");
            Attr(writer, "x1", x);
            Attr(writer, "y1", rowY);
            Attr(writer, "x2", x + 24);
            Attr(writer, "y2", rowY);
            writer.WriteAttributeString("stroke", Stroke(series));
            writer.WriteAttributeString("stroke-width", "2");
            if (series.Style != LineStyle.Solid)
            {
                writer.WriteAttributeString("stroke-dasharray", DashPattern(series.Style));
            }

            writer.WriteEndElement();
            TextAt(writer, x + 30, rowY + 4, series.Label.Length <= 28 ? series.Label : series.Label[..27] + "…", "start", "11", null);
        }

        if (shown < panel.Series.Count)
        {
            TextAt(writer, x, y + (shown * LegendLine) + 12, $"… and {panel.Series.Count - shown} more", "start", "11", null);
        }
    }

    private static string Points(ChartSeries series, Func<double, double> x, Func<double, double> y)
    {
        var points = new StringBuilder();
        for (int i = 0; i < series.X.Length && i < series.Y.Length; i++)
        {
            if (!double.IsFinite(series.Y[i]))
            {
                continue;
            }

            if (series.Stepped && i > 0 && double.IsFinite(series.Y[i - 1]))
            {
                points.Append(Format(x(series.X[i]))).Append(',').Append(Format(y(series.Y[i - 1]))).Append(' ');
            }

            points.Append(Format(x(series.X[i]))).Append(',').Append(Format(y(series.Y[i]))).Append(' ');
        }

        return points.ToString().TrimEnd();
    }

    private static void Rect(XmlWriter writer, double x, double y, double width, double height, string fill, string? stroke)
    {
        writer.WriteStartElement("rect");
        Attr(writer, "x", x);
        Attr(writer, "y", y);
        Attr(writer, "width", width);
        Attr(writer, "height", height);
        writer.WriteAttributeString("fill", fill);
        if (stroke is not null)
        {
            writer.WriteAttributeString("stroke", stroke);
        }

        writer.WriteEndElement();
    }

    private static void Line(XmlWriter writer, double x1, double y1, double x2, double y2, string stroke, string? dash)
    {
        writer.WriteStartElement("line");
        Attr(writer, "x1", x1);
        Attr(writer, "y1", y1);
        Attr(writer, "x2", x2);
        Attr(writer, "y2", y2);
        writer.WriteAttributeString("stroke", stroke);
        if (dash is not null)
        {
            writer.WriteAttributeString("stroke-dasharray", dash);
        }

        writer.WriteEndElement();
    }

    private static void TextAt(XmlWriter writer, double x, double y, string text, string anchor, string? size, string? weight)
    {
        writer.WriteStartElement("text");
        Attr(writer, "x", x);
        Attr(writer, "y", y);
        writer.WriteAttributeString("text-anchor", anchor);
        if (size is not null)
        {
            writer.WriteAttributeString("font-size", size);
        }

        if (weight is not null)
        {
            writer.WriteAttributeString("font-weight", weight);
        }

        writer.WriteString(text);
        writer.WriteEndElement();
    }

    private static void Attr(XmlWriter writer, string name, double value) => writer.WriteAttributeString(name, Format(value));

    private static string Stroke(ChartSeries series) => series.Style switch
    {
        LineStyle.LimitMin => MinColour,
        LineStyle.LimitMax => MaxColour,
        _ => Palette[series.Colour % Palette.Length],
    };

    private static string DashPattern(LineStyle style) => style switch
    {
        LineStyle.Dashed => "8 5",
        LineStyle.LimitMin => "10 5",
        LineStyle.LimitMax => "4 3",
        LineStyle.DashDot => "6 3 2 3",
        _ => "2 4",
    };

    private static string TickLabel(double value) => value.ToString("G4", CultureInfo.InvariantCulture);

    private static string Format(double value) => Math.Round(value, 3).ToString("0.###", CultureInfo.InvariantCulture);
}
