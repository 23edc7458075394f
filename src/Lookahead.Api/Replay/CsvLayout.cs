using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>
/// Which CSV columns feed the plan, and so what the rows carry.
/// <list type="bullet">
/// <item>A plain replay has state columns named by the model's state labels (or x1…xn) and optional previous-input
/// columns prev_&lt;input label&gt; (or prev1…prevm).</item>
/// <item>An estimation replay (a model with an estimator) has measurement columns y_&lt;output label&gt; (or y1…yp)
/// and applied-input columns applied_&lt;input label&gt; (or applied1…appliedm) instead; its answer adds the estimate
/// as xhat_&lt;state label&gt; (or xhat1…xhatn) and dhat1…dhat(n_d).</item>
/// <item>Both take optional reference columns r_&lt;output label&gt; (or r1…rp) and, for a model with measured
/// disturbances, v_&lt;disturbance label&gt; (or v1…vq): one row of v held over the horizon.</item>
/// </list>
/// Every other column is passed through untouched (so are v… columns when the model has no measured disturbances,
/// and y…/applied… columns beside state columns when it has no estimator). The generic names are accepted even when
/// labels exist.
/// </summary>
internal sealed class CsvLayout
{
    public const string CostColumn = "cost";
    public const string StatusColumn = "status";
    public const string MessageColumn = "message";

    private CsvLayout(int headerCount, ReplayMode mode)
    {
        HeaderCount = headerCount;
        Mode = mode;
    }

    public int HeaderCount { get; }

    /// <summary>States for a plain replay, measurements for an estimation replay: decided by the header.</summary>
    public ReplayMode Mode { get; }

    public int[] State { get; private init; } = [];

    public string[] StateNames { get; private init; } = [];

    public int[] Measurement { get; private init; } = [];

    public string[] MeasurementNames { get; private init; } = [];

    public int[] Applied { get; private init; } = [];

    public string[] AppliedNames { get; private init; } = [];

    public int[]? Reference { get; private init; }

    public string[] ReferenceNames { get; private init; } = [];

    public int[]? Previous { get; private init; }

    public string[] PreviousNames { get; private init; } = [];

    public int[]? Disturbance { get; private init; }

    public string[] DisturbanceNames { get; private init; } = [];

    public int[] PassThrough { get; private init; } = [];

    public string[] PassThroughNames { get; private init; } = [];

    /// <summary>Result columns for the first move: input labels, else u1…um.</summary>
    public string[] MoveNames { get; private init; } = [];

    /// <summary>Result columns for the estimate of an estimation replay (xhat…, then dhat…); empty otherwise.</summary>
    public string[] EstimateNames { get; private init; } = [];

    /// <summary>The separator a one-column header is really split by (';' or a tab), else null.</summary>
    private static string? OtherDialect(IReadOnlyList<string> headers) =>
        headers.Count != 1 ? null
        : headers[0].Contains(';', StringComparison.Ordinal) ? "';'"
        : headers[0].Contains('\t', StringComparison.Ordinal) ? "tab"
        : null;

    public static (CsvLayout? Layout, List<ProblemError> Errors) Build(IReadOnlyList<string> headers, CompiledModel model)
    {
        var errors = new List<ProblemError>();
        if (OtherDialect(headers) is { } separator)
        {
            // Historian exports often use ';' with decimal commas, or tabs: name that, not the columns it hides.
            errors.Add(new("header", $"is one column holding {separator}-separated names: the upload looks like another CSV dialect; send comma-separated values with decimal points (the lookahead command's replay converts dialects)"));
            return (null, errors);
        }

        var labels = model.Document.Labels;
        var used = new HashSet<int>();
        var index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (int i = 0; i < headers.Count; i++)
        {
            if (!index.TryAdd(headers[i], i))
            {
                index[headers[i]] = -1; // ambiguous
            }
        }

        var stateColumns = Present(index, model.StateCount, labels?.States, "", "x");
        var measurementColumns = Present(index, model.OutputCount, labels?.Outputs, "y_", "y")
            .Concat(Present(index, model.InputCount, labels?.Inputs, "applied_", "applied")).ToList();
        var mode = ReplayMode.States;
        if (measurementColumns.Count > 0 && model.Estimator is not null)
        {
            if (stateColumns.Count > 0)
            {
                errors.Add(new("header", $"columns {Quoted(stateColumns)} give states and {Quoted(measurementColumns)} measurements; give one or the other"));
                return (null, errors);
            }

            mode = ReplayMode.Measurements;
        }
        else if (measurementColumns.Count > 0 && stateColumns.Count == 0)
        {
            errors.Add(new("header", $"columns {Quoted(measurementColumns)} carry measurements, but the model has no estimator: register it with one, or give state columns"));
            return (null, errors);
        }

        int[] state = [], measurement = [], applied = [];
        string[] stateNames = [], measurementNames = [], appliedNames = [];
        if (mode == ReplayMode.States)
        {
            (var columns, stateNames) = Find(index, used, model.StateCount, labels?.States, "", "x", errors, required: true, "state");
            state = columns!;
        }
        else
        {
            (var measured, measurementNames) = Find(index, used, model.OutputCount, labels?.Outputs, "y_", "y", errors, required: true, "measurement");
            (var held, appliedNames) = Find(index, used, model.InputCount, labels?.Inputs, "applied_", "applied", errors, required: true, "appliedInput");
            (measurement, applied) = (measured!, held!);
        }

        var (reference, referenceNames) = Find(index, used, model.OutputCount, labels?.Outputs, "r_", "r", errors, required: false, "reference");
        var (previous, previousNames) = Find(index, used, model.InputCount, labels?.Inputs, "prev_", "prev", errors, required: false, "previousInput");
        if (mode == ReplayMode.Measurements && previous is not null)
        {
            errors.Add(new("header", $"columns {Quoted(previous.Select(i => headers[i]))}: in an estimation replay the applied input is the previous input; drop them"));
        }

        // With q = 0 there is nothing to fill, so v… columns stay ordinary pass-through columns.
        var (disturbance, disturbanceNames) = Find(index, used, model.DisturbanceCount, labels?.Disturbances, "v_", "v", errors, required: false, "disturbance");

        var moveNames = labels?.Inputs ?? Enumerable.Range(1, model.InputCount).Select(i => $"u{i}").ToArray();
        string[] estimateNames = mode == ReplayMode.States
            ? []
            : [
                .. (labels?.States?.Select(l => "xhat_" + l) ?? Enumerable.Range(1, model.StateCount).Select(i => $"xhat{i}")),
                .. Enumerable.Range(1, model.Estimator!.DisturbanceCount).Select(i => $"dhat{i}"),
            ];
        var passThrough = Enumerable.Range(0, headers.Count).Where(i => !used.Contains(i)).ToArray();
        var passThroughNames = passThrough.Select(i => headers[i]).ToArray();
        var resultNames = moveNames.Concat(estimateNames).Append(CostColumn).Append(StatusColumn).Append(MessageColumn);
        foreach (var clash in resultNames.Intersect(passThroughNames, StringComparer.Ordinal))
        {
            errors.Add(new("header", $"column '{clash}' would be repeated by the result column of the same name; rename it"));
        }

        if (errors.Count > 0)
        {
            return (null, errors);
        }

        return (new CsvLayout(headers.Count, mode)
        {
            State = state,
            StateNames = stateNames,
            Measurement = measurement,
            MeasurementNames = measurementNames,
            Applied = applied,
            AppliedNames = appliedNames,
            Reference = reference,
            ReferenceNames = referenceNames,
            Previous = previous,
            PreviousNames = previousNames,
            Disturbance = disturbance,
            DisturbanceNames = disturbanceNames,
            PassThrough = passThrough,
            PassThroughNames = passThroughNames,
            MoveNames = moveNames,
            EstimateNames = estimateNames,
        }, errors);
    }

    /// <summary>The names of a group's columns that the header has (labelled or generic), without claiming them.</summary>
    private static List<string> Present(Dictionary<string, int> index, int count, string[]? labels, string labelPrefix, string genericPrefix)
    {
        var present = new List<string>();
        for (int i = 0; i < count; i++)
        {
            string generic = $"{genericPrefix}{i + 1}";
            string? labelled = labels is null ? null : labelPrefix + labels[i];
            if (labelled is not null && index.ContainsKey(labelled))
            {
                present.Add(labelled);
            }
            else if (index.ContainsKey(generic))
            {
                present.Add(generic);
            }
        }

        return present;
    }

    private static string Quoted(IEnumerable<string> names) => string.Join(", ", names.Select(n => $"'{n}'"));

    private static (int[]? Columns, string[] Names) Find(
        Dictionary<string, int> index, HashSet<int> used, int count, string[]? labels, string labelPrefix, string genericPrefix, List<ProblemError> errors, bool required, string field)
    {
        var columns = new int[count];
        var names = new string[count];
        var missing = new List<string>();
        int found = 0;
        for (int i = 0; i < count; i++)
        {
            string generic = $"{genericPrefix}{i + 1}";
            string? labelled = labels is null ? null : labelPrefix + labels[i];
            string? name = labelled is not null && index.ContainsKey(labelled) ? labelled : index.ContainsKey(generic) ? generic : null;
            if (name is null)
            {
                missing.Add(labelled is null ? $"'{generic}'" : $"'{labelled}' (or '{generic}')");
                columns[i] = -1;
                names[i] = labelled ?? generic;
                continue;
            }

            if (index[name] < 0)
            {
                errors.Add(new("header", $"column '{name}' appears more than once"));
                continue;
            }

            columns[i] = index[name];
            names[i] = name;
            used.Add(columns[i]);
            found++;
        }

        if (found == 0 && !required)
        {
            return (null, names);
        }

        if (missing.Count > 0)
        {
            errors.Add(new("header", $"missing {field} column{(missing.Count > 1 ? "s" : "")} {string.Join(", ", missing)}"));
        }

        return (columns, names);
    }
}
