using Lookahead.Core.Models;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Validation;

/// <summary>
/// Checks a <see cref="ModelDocument"/> field by field and reports every problem with its JSON path.
/// Sizes are checked against <see cref="SizeLimits"/> before any matrix is allocated.
/// </summary>
public static class ModelValidator
{
    /// <summary>Relative tolerance for symmetry: |W_ij − W_ji| ≤ tol·max(1, max|W|).</summary>
    public const double SymmetryTolerance = 1e-9;

    /// <summary>Relative tolerance for semidefiniteness: λ_min ≥ −tol·max(1, max|λ|).</summary>
    public const double DefinitenessTolerance = 1e-10;

    /// <summary>Returns every problem found; an empty list means the document is acceptable.</summary>
    public static IReadOnlyList<ValidationError> Validate(ModelDocument document, SizeLimits? limits = null)
    {
        var errors = new List<ValidationError>();
        TryBuild(document, limits ?? SizeLimits.Default, errors);
        return errors;
    }

    /// <summary>Validates and converts; throws <see cref="ModelValidationException"/> with every problem found.</summary>
    internal static ValidatedModel Build(ModelDocument document, SizeLimits limits)
    {
        var errors = new List<ValidationError>();
        var model = TryBuild(document, limits, errors);
        if (errors.Count > 0 || model is null)
        {
            throw new ModelValidationException(errors);
        }

        return model;
    }

    private static ValidatedModel? TryBuild(ModelDocument document, SizeLimits limits, List<ValidationError> errors)
    {
        if (document is null)
        {
            errors.Add(new("", "the model document is missing"));
            return null;
        }

        if (document.Plant is null)
        {
            errors.Add(new("plant", "is required"));
        }

        if (document.Cost is null)
        {
            errors.Add(new("cost", "is required"));
        }

        if (errors.Count > 0)
        {
            return null;
        }

        var plant = document.Plant!;
        var cost = document.Cost!;

        // Shapes first, from array lengths only: nothing large is allocated until they pass.
        int n = RowCount(plant.A, "plant.a", errors);
        int m = -1;
        if (n > 0)
        {
            if (n > limits.MaxStates)
            {
                errors.Add(new("plant.a", $"has {n} states; at most {limits.MaxStates} are allowed"));
                return null;
            }

            CheckRectangular(plant.A, "plant.a", n, n, errors);
            m = ColumnCountOf(plant.B, "plant.b", n, errors);
            if (m > limits.MaxInputs)
            {
                errors.Add(new("plant.b", $"has {m} inputs; at most {limits.MaxInputs} are allowed"));
                return null;
            }
        }

        int p = n;
        if (plant.C is not null && n > 0)
        {
            p = plant.C.Length;
            if (p == 0)
            {
                errors.Add(new("plant.c", "must have at least one row"));
            }
            else if (p > limits.MaxOutputs)
            {
                errors.Add(new("plant.c", $"has {p} outputs; at most {limits.MaxOutputs} are allowed"));
                return null;
            }
            else
            {
                CheckRectangular(plant.C, "plant.c", p, n, errors);
            }
        }

        if (!double.IsFinite(plant.SampleTime) || plant.SampleTime <= 0)
        {
            errors.Add(new("plant.sampleTime", "must be a finite number of seconds greater than 0"));
        }

        if (!Enum.IsDefined(plant.TimeDomain))
        {
            errors.Add(new("plant.timeDomain", "must be 'discrete' or 'continuous'"));
        }

        int horizon = cost.Horizon;
        if (horizon < 1)
        {
            errors.Add(new("cost.horizon", "must be at least 1"));
        }
        else if (horizon > limits.MaxHorizon)
        {
            errors.Add(new("cost.horizon", $"is {horizon}; at most {limits.MaxHorizon} is allowed"));
        }
        else if (m > 0 && (long)horizon * m > limits.MaxDecisionVariables)
        {
            errors.Add(new("cost.horizon", $"horizon × inputs = {(long)horizon * m} decision variables; at most {limits.MaxDecisionVariables} are allowed"));
        }

        if (n <= 0 || m <= 0 || p <= 0)
        {
            return null;
        }

        CheckWeightShape(cost.OutputWeight, "cost.outputWeight", p, errors, required: true);
        CheckWeightShape(cost.InputWeight, "cost.inputWeight", m, errors, required: true);
        CheckWeightShape(cost.InputRateWeight, "cost.inputRateWeight", m, errors, required: false);
        var terminal = cost.TerminalWeight ?? TerminalWeightSpec.Riccati;
        if (!Enum.IsDefined(terminal.Kind))
        {
            errors.Add(new("cost.terminalWeight", "must be 'riccati', 'stage' or an n×n matrix"));
        }
        else if (terminal.Kind == TerminalWeightKind.Explicit)
        {
            if (terminal.Matrix is null)
            {
                errors.Add(new("cost.terminalWeight", "an explicit terminal weight needs a matrix"));
            }
            else
            {
                CheckRectangular(terminal.Matrix, "cost.terminalWeight", n, n, errors);
            }
        }

        var validatedLimits = CheckLimits(document.Limits, m, p, errors);
        CheckLabels(document.Labels, n, m, p, errors);
        if (errors.Count > 0)
        {
            return null;
        }

        // Shapes are right: now numbers and definiteness.
        var a = ToMatrix(plant.A, "plant.a", errors);
        var b = ToMatrix(plant.B, "plant.b", errors);
        var c = plant.C is null ? Matrix<double>.Build.DenseIdentity(n) : ToMatrix(plant.C, "plant.c", errors);
        var q = ToWeight(cost.OutputWeight, "cost.outputWeight", errors);
        var r = ToWeight(cost.InputWeight, "cost.inputWeight", errors);
        var s = cost.InputRateWeight is null ? Matrix<double>.Build.Dense(m, m) : ToWeight(cost.InputRateWeight, "cost.inputRateWeight", errors);
        Matrix<double>? pTerminal = terminal.Kind == TerminalWeightKind.Explicit ? ToWeight(WeightSpec.FromMatrix(terminal.Matrix!), "cost.terminalWeight", errors) : null;
        if (errors.Count > 0)
        {
            return null;
        }

        CheckDefinite(q, "cost.outputWeight", strict: false, errors);
        CheckDefinite(r, "cost.inputWeight", strict: true, errors);
        CheckDefinite(s, "cost.inputRateWeight", strict: false, errors);
        if (pTerminal is not null)
        {
            CheckDefinite(pTerminal, "cost.terminalWeight", strict: false, errors);
        }

        if (errors.Count > 0)
        {
            return null;
        }

        return new ValidatedModel(document, a, b, c, plant.C is null, plant.SampleTime, plant.TimeDomain, horizon, q, r, s, terminal.Kind, pTerminal, validatedLimits!);
    }

    private static int RowCount(double[][]? rows, string path, List<ValidationError> errors)
    {
        if (rows is null)
        {
            errors.Add(new(path, "is required"));
            return -1;
        }

        if (rows.Length == 0)
        {
            errors.Add(new(path, "must have at least one row"));
            return -1;
        }

        return rows.Length;
    }

    private static int ColumnCountOf(double[][]? rows, string path, int expectedRows, List<ValidationError> errors)
    {
        if (RowCount(rows, path, errors) < 0)
        {
            return -1;
        }

        if (rows![0] is null || rows[0].Length == 0)
        {
            errors.Add(new($"{path}[0]", "must have at least one column"));
            return -1;
        }

        int columns = rows[0].Length;
        CheckRectangular(rows, path, expectedRows, columns, errors);
        return columns;
    }

    private static void CheckRectangular(double[][] rows, string path, int expectedRows, int expectedColumns, List<ValidationError> errors)
    {
        if (rows.Length != expectedRows)
        {
            errors.Add(new(path, $"has {rows.Length} rows; expected {expectedRows}"));
            return;
        }

        for (int i = 0; i < rows.Length; i++)
        {
            if (rows[i] is null)
            {
                errors.Add(new($"{path}[{i}]", "is missing"));
            }
            else if (rows[i].Length != expectedColumns)
            {
                errors.Add(new($"{path}[{i}]", $"has {rows[i].Length} entries; expected {expectedColumns}"));
            }
        }
    }

    private static void CheckWeightShape(WeightSpec? weight, string path, int size, List<ValidationError> errors, bool required)
    {
        if (weight is null)
        {
            if (required)
            {
                errors.Add(new(path, "is required"));
            }

            return;
        }

        if (weight.Diagonal is not null)
        {
            if (weight.Diagonal.Length != size)
            {
                errors.Add(new(path, $"has {weight.Diagonal.Length} diagonal entries; expected {size}"));
            }
        }
        else if (weight.Matrix is not null)
        {
            CheckRectangular(weight.Matrix, path, size, size, errors);
        }
        else
        {
            errors.Add(new(path, "must be a vector (diagonal) or a square matrix"));
        }
    }

    private static Matrix<double> ToMatrix(double[][] rows, string path, List<ValidationError> errors)
    {
        var matrix = Matrix<double>.Build.Dense(rows.Length, rows[0].Length);
        for (int i = 0; i < rows.Length; i++)
        {
            for (int j = 0; j < rows[i].Length; j++)
            {
                double v = rows[i][j];
                if (!double.IsFinite(v))
                {
                    errors.Add(new($"{path}[{i}][{j}]", "must be a finite number"));
                }

                matrix[i, j] = v;
            }
        }

        return matrix;
    }

    private static Matrix<double> ToWeight(WeightSpec weight, string path, List<ValidationError> errors)
    {
        if (weight.Diagonal is not null)
        {
            var d = weight.Diagonal;
            for (int i = 0; i < d.Length; i++)
            {
                if (!double.IsFinite(d[i]))
                {
                    errors.Add(new($"{path}[{i}]", "must be a finite number"));
                }
            }

            return Matrix<double>.Build.DenseOfDiagonalArray(d);
        }

        var matrix = ToMatrix(weight.Matrix!, path, errors);
        double scale = Math.Max(1.0, matrix.Enumerate().Select(Math.Abs).DefaultIfEmpty(0).Max());
        for (int i = 0; i < matrix.RowCount; i++)
        {
            for (int j = i + 1; j < matrix.ColumnCount; j++)
            {
                if (Math.Abs(matrix[i, j] - matrix[j, i]) > SymmetryTolerance * scale)
                {
                    errors.Add(new($"{path}[{i}][{j}]", $"must equal {path}[{j}][{i}]: the weight must be symmetric (relative tolerance {SymmetryTolerance:g})"));
                    return matrix;
                }
            }
        }

        // Exact symmetry keeps later factorisations honest.
        return (matrix + matrix.Transpose()) * 0.5;
    }

    private static void CheckDefinite(Matrix<double> weight, string path, bool strict, List<ValidationError> errors)
    {
        var eigenvalues = weight.Evd(Symmetricity.Symmetric).EigenValues.Select(z => z.Real).ToArray();
        double largest = Math.Max(1.0, eigenvalues.Select(Math.Abs).Max());
        double smallest = eigenvalues.Min();
        if (strict && smallest <= DefinitenessTolerance * largest)
        {
            errors.Add(new(path, $"must be positive definite (smallest eigenvalue {smallest:g6})"));
        }
        else if (!strict && smallest < -DefinitenessTolerance * largest)
        {
            errors.Add(new(path, $"must be positive semidefinite (smallest eigenvalue {smallest:g6})"));
        }
    }

    private static ValidatedLimits? CheckLimits(LimitsSpec? spec, int m, int p, List<ValidationError> errors)
    {
        spec ??= new LimitsSpec();
        var inputMin = Bounds(spec.InputMin, "limits.inputMin", m, double.NegativeInfinity, errors);
        var inputMax = Bounds(spec.InputMax, "limits.inputMax", m, double.PositiveInfinity, errors);
        var rateMin = Bounds(spec.InputRateMin, "limits.inputRateMin", m, double.NegativeInfinity, errors);
        var rateMax = Bounds(spec.InputRateMax, "limits.inputRateMax", m, double.PositiveInfinity, errors);
        var outputMin = Bounds(spec.OutputMin, "limits.outputMin", p, double.NegativeInfinity, errors);
        var outputMax = Bounds(spec.OutputMax, "limits.outputMax", p, double.PositiveInfinity, errors);
        Ordered(inputMin, inputMax, "limits.inputMin", "limits.inputMax", errors);
        Ordered(rateMin, rateMax, "limits.inputRateMin", "limits.inputRateMax", errors);
        Ordered(outputMin, outputMax, "limits.outputMin", "limits.outputMax", errors);
        for (int i = 0; i < m; i++)
        {
            if (rateMin[i] > 0)
            {
                errors.Add(new($"limits.inputRateMin[{i}]", "must be ≤ 0 so that holding the input is always allowed"));
            }

            if (rateMax[i] < 0)
            {
                errors.Add(new($"limits.inputRateMax[{i}]", "must be ≥ 0 so that holding the input is always allowed"));
            }
        }

        var weight = new double[p];
        if (spec.OutputViolationWeight is { } given)
        {
            if (given.Length != p)
            {
                errors.Add(new("limits.outputViolationWeight", $"has {given.Length} entries; expected {p}"));
            }
            else
            {
                for (int j = 0; j < p; j++)
                {
                    // An output without limits may carry weight 0; one with limits needs a positive weight.
                    bool limited = double.IsFinite(outputMin[j]) || double.IsFinite(outputMax[j]);
                    if (!double.IsFinite(given[j]) || given[j] < 0 || (limited && given[j] == 0))
                    {
                        errors.Add(new($"limits.outputViolationWeight[{j}]", limited ? "must be a finite number greater than 0 for an output with limits" : "must be a finite number ≥ 0"));
                    }

                    weight[j] = given[j];
                }
            }
        }
        else
        {
            bool anyOutputBound = outputMin.Any(double.IsFinite) || outputMax.Any(double.IsFinite);
            if (anyOutputBound)
            {
                errors.Add(new("limits.outputViolationWeight", "is required when output limits are given (one weight > 0 per output)"));
            }
        }

        return new ValidatedLimits(inputMin, inputMax, rateMin, rateMax, outputMin, outputMax, weight);
    }

    private static double[] Bounds(double?[]? given, string path, int size, double unbounded, List<ValidationError> errors)
    {
        var bounds = new double[size];
        Array.Fill(bounds, unbounded);
        if (given is null)
        {
            return bounds;
        }

        if (given.Length != size)
        {
            errors.Add(new(path, $"has {given.Length} entries; expected {size}"));
            return bounds;
        }

        for (int i = 0; i < size; i++)
        {
            if (given[i] is double v)
            {
                if (!double.IsFinite(v))
                {
                    errors.Add(new($"{path}[{i}]", "must be a finite number or null (unbounded)"));
                }
                else
                {
                    bounds[i] = v;
                }
            }
        }

        return bounds;
    }

    private static void Ordered(double[] low, double[] high, string lowPath, string highPath, List<ValidationError> errors)
    {
        for (int i = 0; i < low.Length; i++)
        {
            if (low[i] > high[i])
            {
                errors.Add(new($"{lowPath}[{i}]", $"is {low[i]:g}, above {highPath}[{i}] = {high[i]:g}"));
            }
        }
    }

    private static void CheckLabels(LabelsSpec? labels, int n, int m, int p, List<ValidationError> errors)
    {
        if (labels is null)
        {
            return;
        }

        CheckNames(labels.States, "labels.states", n, errors);
        CheckNames(labels.Inputs, "labels.inputs", m, errors);
        CheckNames(labels.Outputs, "labels.outputs", p, errors);
    }

    private static void CheckNames(string[]? names, string path, int size, List<ValidationError> errors)
    {
        if (names is null)
        {
            return;
        }

        if (names.Length != size)
        {
            errors.Add(new(path, $"has {names.Length} names; expected {size}"));
            return;
        }

        var seen = new HashSet<string>(StringComparer.Ordinal);
        for (int i = 0; i < names.Length; i++)
        {
            if (string.IsNullOrWhiteSpace(names[i]) || names[i].Length > 64)
            {
                errors.Add(new($"{path}[{i}]", "must be a non-empty name of at most 64 characters"));
            }
            else if (!seen.Add(names[i]))
            {
                errors.Add(new($"{path}[{i}]", $"'{names[i]}' is used twice"));
            }
        }
    }
}
