using Lookahead.Core.Models;

namespace Lookahead.Core.Planning;

/// <summary>
/// What a compiled model will keep, in bytes, read from a document's dimensions alone, so that a compile can be
/// refused or held back before it starts. It follows docs/sizing.md's formula: per variant the gain maps (V·L), the
/// cost form (L²), the Hessian factor (V²), the preview maps when they fit, and under limits the solver's factor(s),
/// the active-set guesser's tables and the limit rows; once, about 11·n² doubles of small matrices.
/// </summary>
/// <remarks>
/// Meant for a document that passed validation; missing or ragged parts count as zero rather than throw, so an
/// unvalidated document gets a finite (if meaningless) answer. Saturates at <see cref="long.MaxValue"/>.
/// </remarks>
public static class CompiledSizeEstimate
{
    /// <summary>Most limit rows for which the active-set guesser keeps its tables (mirrors the solver's own cut-off).</summary>
    private const int GuesserRowLimit = 1000;

    /// <summary>Small matrices kept once (A, B, E, C, weights, P, target maps, diagnostics), measured at about 11·n² doubles.</summary>
    private const double SmallMatrixDoublesPerState2 = 11;

    /// <summary>The compiled model's own fields and small objects, as <see cref="CompiledModel.EstimatedBytes"/> counts them.</summary>
    private const double FixedOverheadBytes = 4096;

    public static long Bytes(ModelDocument document)
    {
        ArgumentNullException.ThrowIfNull(document);
        double n = document.Plant.A?.Length ?? 0;
        double m = document.Plant.B is { Length: > 0 } b ? b[0]?.Length ?? 0 : 0;
        double p = document.Plant.C?.Length ?? n;
        double q = document.Plant.E is { Length: > 0 } e ? e[0]?.Length ?? 0 : 0;
        int horizon = Math.Max(0, document.Cost.Horizon);
        double N = horizon;
        double v = HasRateWeight(document.Cost.InputRateWeight) ? 2 : 1;
        double decision = N * m;
        double stacked = (2 * n) + p + (2 * m);
        bool previewFits = PreviewMaps.Fits(horizon, (int)m, (int)p, (int)q);
        double perVariant = (decision * decision) + (decision * stacked) + (stacked * stacked) + (previewFits ? decision * N * (p + q) : 0);

        var limits = document.Limits;
        if (limits is not null)
        {
            double inputSides = Sides(limits.InputMin) + Sides(limits.InputMax);
            double rateSides = Sides(limits.InputRateMin) + Sides(limits.InputRateMax);
            double outputSides = Sides(limits.OutputMin) + Sides(limits.OutputMax);
            double soft = SoftOutputs(limits);
            if (inputSides + rateSides + outputSides > 0)
            {
                double rows = N * (inputSides + rateSides + outputSides);
                double withSlacks = decision + soft;
                perVariant += withSlacks * withSlacks * (soft > 0 ? 2 : 1);
                // The range-space form's S and W (rows include the slacks' own bounds), and its sweep's layout: about
                // eight doubles' worth per row and a copy of the output rows that mirror no other (half of them).
                // Without it, a program of input bounds only keeps the guesser's S and directions instead.
                double allRows = rows + soft;
                if (allRows <= int.MaxValue && withSlacks <= int.MaxValue && Optimization.RangeSpaceActiveSet.Fits((int)withSlacks, (int)allRows))
                {
                    perVariant += (allRows * (allRows + withSlacks + 8)) + (0.75 * outputSides * m * N * (N + 1) / 2);
                }
                else if (rateSides == 0 && outputSides == 0 && rows <= GuesserRowLimit)
                {
                    perVariant += rows * (rows + decision);
                }

                // Limit rows: an int and a double per nonzero (1.5 doubles); a soft output row at stage k has about k·m.
                double nonzeros = (N * inputSides) + (2 * N * rateSides) + (outputSides * m * N * (N + 1) / 2);
                perVariant += (1.5 * nonzeros) + (N * soft * n);
            }
        }

        double bytes = (sizeof(double) * ((v * perVariant) + (SmallMatrixDoublesPerState2 * n * n))) + FixedOverheadBytes;
        return bytes >= long.MaxValue ? long.MaxValue : (long)Math.Ceiling(bytes);
    }

    private static bool HasRateWeight(WeightSpec? weight) =>
        weight is not null && ((weight.Diagonal?.Any(w => w != 0) ?? false) || (weight.Matrix?.Any(row => row is not null && row.Any(w => w != 0)) ?? false));

    private static double Sides(double?[]? bounds) => bounds?.Count(b => b is { } value && double.IsFinite(value)) ?? 0;

    private static double SoftOutputs(LimitsSpec limits)
    {
        int outputs = Math.Max(limits.OutputMin?.Length ?? 0, limits.OutputMax?.Length ?? 0);
        int count = 0;
        for (int i = 0; i < outputs; i++)
        {
            bool lower = limits.OutputMin is { } min && i < min.Length && min[i] is { } lo && double.IsFinite(lo);
            bool upper = limits.OutputMax is { } max && i < max.Length && max[i] is { } hi && double.IsFinite(hi);
            count += lower || upper ? 1 : 0;
        }

        return count;
    }
}
