using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;
using MathNet.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Estimation;

/// <summary>
/// Checks an <see cref="EstimatorSpec"/> against the plant's sizes and reports every problem with its JSON path
/// (<c>estimator.processNoise</c>, <c>estimator.measurementNoise</c>, <c>estimator.disturbanceModel</c>).
/// Shapes are checked from array lengths before any matrix is allocated. Symmetry and definiteness are judged
/// relative to each covariance's own scale (the tolerances of <see cref="ModelValidator"/>), so its units do not decide.
/// </summary>
public static class EstimatorSpecValidator
{
    /// <summary>JSON path of the process noise covariance.</summary>
    public const string ProcessNoisePath = "estimator.processNoise";

    /// <summary>JSON path of the measurement noise covariance.</summary>
    public const string MeasurementNoisePath = "estimator.measurementNoise";

    /// <summary>JSON path of the disturbance model.</summary>
    public const string DisturbanceModelPath = "estimator.disturbanceModel";

    /// <summary>Returns every problem found in <paramref name="spec"/> for a plant of the given sizes; empty means acceptable.</summary>
    /// <param name="spec">The estimator settings.</param>
    /// <param name="states">n.</param>
    /// <param name="inputs">m.</param>
    /// <param name="outputs">p.</param>
    public static IReadOnlyList<ValidationError> Validate(EstimatorSpec spec, int states, int inputs, int outputs)
    {
        var errors = new List<ValidationError>();
        TryBuild(spec, states, inputs, outputs, errors);
        return errors;
    }

    /// <summary>Validates and returns W ((n+n_d)×(n+n_d), exactly symmetric) and V (p×p, exactly symmetric).</summary>
    /// <exception cref="ModelValidationException">Every problem found, with its path.</exception>
    internal static (Matrix<double> ProcessNoise, Matrix<double> MeasurementNoise) Build(EstimatorSpec spec, int states, int inputs, int outputs)
    {
        var errors = new List<ValidationError>();
        var built = TryBuild(spec, states, inputs, outputs, errors);
        if (errors.Count > 0 || built is null)
        {
            throw new ModelValidationException(errors);
        }

        return built.Value;
    }

    private static (Matrix<double>, Matrix<double>)? TryBuild(EstimatorSpec spec, int n, int m, int p, List<ValidationError> errors)
    {
        if (spec is null)
        {
            errors.Add(new("estimator", "is required"));
            return null;
        }

        if (!Enum.IsDefined(spec.DisturbanceModel))
        {
            errors.Add(new(DisturbanceModelPath, "must be 'output', 'input' or 'none'"));
            return null;
        }

        int nd = AugmentedModel.DisturbanceCount(spec.DisturbanceModel, m, p);
        string augmented = nd == 0 ? $"n = {n} (the states; the disturbance model adds none)" : $"n + n_d = {n} + {nd} = {n + nd} (states, then disturbances)";
        bool processShape = CheckShape(spec.ProcessNoise, ProcessNoisePath, n + nd, augmented, errors);
        bool measurementShape = CheckShape(spec.MeasurementNoise, MeasurementNoisePath, p, $"p = {p} (one per output)", errors);
        if (!processShape || !measurementShape)
        {
            return null;
        }

        var w = ToMatrix(spec.ProcessNoise!, ProcessNoisePath, errors);
        var v = ToMatrix(spec.MeasurementNoise!, MeasurementNoisePath, errors);
        if (w is null || v is null)
        {
            return null;
        }

        ModelValidator.CheckDefinite(w, ProcessNoisePath, strict: false, errors);
        ModelValidator.CheckDefinite(v, MeasurementNoisePath, strict: true, errors, "a noise-free measurement would make the filter gain undefined");
        return errors.Count > 0 ? null : (w, v);
    }

    private static bool CheckShape(WeightSpec? spec, string path, int size, string sizeMeaning, List<ValidationError> errors)
    {
        if (spec is null)
        {
            errors.Add(new(path, $"is required: a vector of {size} variances or a {size}×{size} covariance matrix"));
            return false;
        }

        if (spec.Diagonal is { } diagonal)
        {
            if (diagonal.Length != size)
            {
                errors.Add(new(path, $"has {diagonal.Length} diagonal entries; expected {sizeMeaning}"));
                return false;
            }

            return true;
        }

        if (spec.Matrix is not { } rows)
        {
            errors.Add(new(path, "must be a vector (a diagonal covariance) or a square matrix"));
            return false;
        }

        if (rows.Length != size)
        {
            errors.Add(new(path, $"has {rows.Length} rows; expected {sizeMeaning}"));
            return false;
        }

        for (int i = 0; i < rows.Length; i++)
        {
            if (rows[i] is null || rows[i].Length != size)
            {
                errors.Add(new($"{path}[{i}]", $"has {rows[i]?.Length ?? 0} entries; expected {size}"));
                return false;
            }
        }

        return true;
    }

    private static Matrix<double>? ToMatrix(WeightSpec spec, string path, List<ValidationError> errors)
    {
        int before = errors.Count;
        Matrix<double> matrix;
        if (spec.Diagonal is { } diagonal)
        {
            for (int i = 0; i < diagonal.Length; i++)
            {
                CheckEntry(diagonal[i], $"{path}[{i}]", errors);
            }

            matrix = Matrix<double>.Build.DenseOfDiagonalArray(diagonal);
        }
        else
        {
            var rows = spec.Matrix!;
            for (int i = 0; i < rows.Length; i++)
            {
                for (int j = 0; j < rows[i].Length; j++)
                {
                    CheckEntry(rows[i][j], $"{path}[{i}][{j}]", errors);
                }
            }

            matrix = Matrix<double>.Build.DenseOfRowArrays(rows);
        }

        if (errors.Count > before)
        {
            return null;
        }

        double scale = MatrixScale.MaxAbs(matrix);
        for (int i = 0; i < matrix.RowCount; i++)
        {
            for (int j = i + 1; j < matrix.ColumnCount; j++)
            {
                if (Math.Abs(matrix[i, j] - matrix[j, i]) > ModelValidator.SymmetryTolerance * scale)
                {
                    errors.Add(new(path, $"must be symmetric: entry [{i}][{j}] = {matrix[i, j]:g6} differs from entry [{j}][{i}] = {matrix[j, i]:g6} (relative tolerance {ModelValidator.SymmetryTolerance:g} of its largest entry)"));
                    return null;
                }
            }
        }

        // Exact symmetry keeps the Riccati iteration and the factorisations honest.
        return (matrix + matrix.Transpose()) * 0.5;
    }

    private static void CheckEntry(double value, string path, List<ValidationError> errors)
    {
        if (!double.IsFinite(value))
        {
            errors.Add(new(path, "must be a finite number"));
        }
        else if (Math.Abs(value) > ModelValidator.MaxMagnitude)
        {
            errors.Add(new(path, $"is {value:g3}; entries larger than {ModelValidator.MaxMagnitude:g3} in magnitude are refused — express the covariance in units that keep its numbers nearer 1"));
        }
    }
}
