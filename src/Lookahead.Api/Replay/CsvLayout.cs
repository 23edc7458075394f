using Lookahead.Api.Http;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Replay;

/// <summary>
/// Which CSV columns feed the plan. State columns are named by the model's state labels (or x1…xn), reference
/// columns r_&lt;output label&gt; (or r1…rp), previous-input columns prev_&lt;input label&gt; (or prev1…prevm).
/// Every other column is passed through untouched. The generic names are accepted even when labels exist.
/// </summary>
internal sealed class CsvLayout
{
    public const string CostColumn = "cost";
    public const string StatusColumn = "status";
    public const string MessageColumn = "message";

    private CsvLayout(int headerCount, int[] state, string[] stateNames, int[]? reference, string[] referenceNames, int[]? previous, string[] previousNames, int[] passThrough, string[] passThroughNames, string[] moveNames)
    {
        HeaderCount = headerCount;
        State = state;
        StateNames = stateNames;
        Reference = reference;
        ReferenceNames = referenceNames;
        Previous = previous;
        PreviousNames = previousNames;
        PassThrough = passThrough;
        PassThroughNames = passThroughNames;
        MoveNames = moveNames;
    }

    public int HeaderCount { get; }

    public int[] State { get; }

    public string[] StateNames { get; }

    public int[]? Reference { get; }

    public string[] ReferenceNames { get; }

    public int[]? Previous { get; }

    public string[] PreviousNames { get; }

    public int[] PassThrough { get; }

    public string[] PassThroughNames { get; }

    /// <summary>Result columns for the first move: input labels, else u1…um.</summary>
    public string[] MoveNames { get; }

    public static (CsvLayout? Layout, List<ProblemError> Errors) Build(IReadOnlyList<string> headers, CompiledModel model)
    {
        var errors = new List<ProblemError>();
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

        var (state, stateNames) = Find(index, used, model.StateCount, labels?.States, "", "x", errors, required: true, "state");
        var (reference, referenceNames) = Find(index, used, model.OutputCount, labels?.Outputs, "r_", "r", errors, required: false, "reference");
        var (previous, previousNames) = Find(index, used, model.InputCount, labels?.Inputs, "prev_", "prev", errors, required: false, "previousInput");

        var moveNames = labels?.Inputs ?? Enumerable.Range(1, model.InputCount).Select(i => $"u{i}").ToArray();
        var passThrough = Enumerable.Range(0, headers.Count).Where(i => !used.Contains(i)).ToArray();
        var passThroughNames = passThrough.Select(i => headers[i]).ToArray();
        var resultNames = moveNames.Append(CostColumn).Append(StatusColumn).Append(MessageColumn);
        foreach (var clash in resultNames.Intersect(passThroughNames, StringComparer.Ordinal))
        {
            errors.Add(new("header", $"column '{clash}' would be repeated by the result column of the same name; rename it"));
        }

        if (errors.Count > 0)
        {
            return (null, errors);
        }

        return (new CsvLayout(headers.Count, state!, stateNames, reference, referenceNames, previous, previousNames, passThrough, passThroughNames, moveNames), errors);
    }

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
