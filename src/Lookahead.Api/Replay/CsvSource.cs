using System.Globalization;
using CsvHelper;
using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>
/// CSV rows read with CsvHelper; each record's fields are copied into its slot as bytes, and the numbers are
/// parsed later on the planning threads. Row numbers count records after the header, from 1.
/// </summary>
internal sealed class CsvSource : IReplaySource, IAsyncDisposable
{
    private readonly CsvReader csv;
    private long record;
    private bool ended;

    private CsvSource(CsvReader csv, CsvLayout layout)
    {
        this.csv = csv;
        Layout = layout;
    }

    public CsvLayout Layout { get; }

    /// <summary>Decided by the header (<see cref="CsvLayout.Mode"/>).</summary>
    public ReplayMode Mode => Layout.Mode;

    public IReadOnlyList<ProblemError> ChooseMode(ReplayBatch first, CompiledModel model) => [];

    public string PathPrefix(ReplayRow row) => "";

    /// <summary>Reads the header; a missing state column is refused here, before any row is processed.</summary>
    public static async Task<(CsvSource? Source, IReadOnlyList<ProblemError> Errors)> OpenAsync(Stream body, CompiledModel model, int maxRowBytes, CancellationToken cancellationToken)
    {
        var options = new CsvReaderOptions
        {
            HasHeader = true,
            Separator = ',',
            FieldCountMismatch = CsvFieldCountHandling.Allow,
            MissingField = CsvMissingFieldHandling.ReturnEmpty,
            MalformedData = CsvMalformedDataHandling.Throw,
            MaxRecordSize = maxRowBytes,
            FormatProvider = CultureInfo.InvariantCulture,
        };
        var csv = CsvReader.Create(body, options, leaveOpen: true);
        try
        {
            await csv.ReadHeaderAsync(cancellationToken);
        }
        catch (Exception ex) when (ex is CsvFormatException or ReplayBodyTooLargeException or InvalidOperationException or InvalidDataException)
        {
            await csv.DisposeAsync();
            return (null, [new ProblemError("header", "could not be read: " + ex.Message)]);
        }

        if (csv.Headers is not { Count: > 0 } headers)
        {
            await csv.DisposeAsync();
            return (null, [new ProblemError("header", "is missing: the first line must name the columns")]);
        }

        var (layout, errors) = CsvLayout.Build(headers, model);
        if (layout is null)
        {
            await csv.DisposeAsync();
            return (null, errors);
        }

        return (new CsvSource(csv, layout), []);
    }

    public async ValueTask<bool> FillAsync(ReplayBatch batch, CancellationToken cancellationToken)
    {
        batch.Clear();
        try
        {
            while (!ended && !batch.IsFull)
            {
                if (!await csv.ReadAsync(cancellationToken))
                {
                    ended = true;
                    break;
                }

                var row = batch.Next(++record);
                int fields = csv.FieldCount;
                for (int i = 0; i < fields; i++)
                {
                    row.AppendField(csv.GetSpan(i));
                }

                if (fields != Layout.HeaderCount)
                {
                    row.AddError("", $"has {fields} fields; the header has {Layout.HeaderCount}");
                }
            }
        }
        catch (Exception ex) when (ex is CsvFormatException or ReplayBodyTooLargeException or InvalidDataException)
        {
            var row = batch.IsFull ? batch[batch.Count - 1] : batch.Next(++record);
            row.AddError("", "the rest of the CSV could not be read: " + ex.Message);
            row.Fatal = true;
            ended = true;
        }

        return batch.Count > 0;
    }

    public void Parse(ReplayRow row)
    {
        if (row.Errors.Count > 0)
        {
            return;
        }

        if (Layout.Mode == ReplayMode.Measurements)
        {
            // All measurement cells empty: the reading is missing, and the estimate is only propagated.
            row.HasMeasurement = ReadOptionalGroup(row, Layout.Measurement, Layout.MeasurementNames, "measurement", row.Measurement);
            ReadRequiredGroup(row, Layout.Applied, Layout.AppliedNames, "appliedInput", row.AppliedInput);
        }
        else
        {
            ReadRequiredGroup(row, Layout.State, Layout.StateNames, "state", row.State);
            row.HasPreviousInput = ReadOptionalGroup(row, Layout.Previous, Layout.PreviousNames, "previousInput", row.PreviousInput);
        }

        row.HasReference = ReadOptionalGroup(row, Layout.Reference, Layout.ReferenceNames, "reference", row.Reference);

        // One row of v, held over the horizon (in an estimation replay also the v of the interval ending at this row).
        if (Layout.Disturbance is not null)
        {
            row.DisturbanceRowCount = ReadOptionalGroup(row, Layout.Disturbance, Layout.DisturbanceNames, "disturbance", row.DisturbanceRows[0]) ? 1 : 0;
        }
    }

    private static void ReadRequiredGroup(ReplayRow row, int[] columns, string[] names, string field, double[] target)
    {
        for (int i = 0; i < columns.Length; i++)
        {
            ReadNumber(row, columns[i], names[i], $"{field}[{i}]", target, i, allowEmpty: false);
        }
    }

    public ValueTask DisposeAsync() => csv.DisposeAsync();

    /// <summary>All cells empty means "not given" for this row; some empty is an error.</summary>
    private static bool ReadOptionalGroup(ReplayRow row, int[]? columns, string[] names, string field, double[] target)
    {
        if (columns is null)
        {
            return false;
        }

        int empty = 0;
        foreach (int column in columns)
        {
            if (IsEmpty(row.Field(column)))
            {
                empty++;
            }
        }

        if (empty == columns.Length)
        {
            return false;
        }

        for (int i = 0; i < columns.Length; i++)
        {
            ReadNumber(row, columns[i], names[i], $"{field}[{i}]", target, i, allowEmpty: false);
        }

        return true;
    }

    private static void ReadNumber(ReplayRow row, int column, string name, string path, double[] target, int index, bool allowEmpty)
    {
        var text = row.Field(column);
        if (IsEmpty(text))
        {
            if (!allowEmpty)
            {
                row.AddError(path, $"column '{name}' is empty");
            }

            return;
        }

        // .NET's parser takes trailing NUL characters for the end of the number ("0\0" reads as 0): a NUL is never part of one.
        if (text.Contains((byte)0) || !double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out double value) || !double.IsFinite(value))
        {
            row.AddError(path, $"column '{name}': '{Shorten(text)}' is not a finite number");
            return;
        }

        target[index] = value;
    }

    private static bool IsEmpty(ReadOnlySpan<byte> text) => text.Trim((byte)' ').IsEmpty;

    private static string Shorten(ReadOnlySpan<byte> text)
    {
        var s = System.Text.Encoding.UTF8.GetString(text.Length > 40 ? text[..40] : text);
        return text.Length > 40 ? s + "…" : s;
    }
}
