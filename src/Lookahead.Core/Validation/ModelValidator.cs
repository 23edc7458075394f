using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Numerics;
using MathNet.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Validation;

/// <summary>
/// Checks a <see cref="ModelDocument"/> field by field and reports every problem with its JSON path.
/// Sizes are checked against <see cref="SizeLimits"/> before any matrix is allocated.
/// </summary>
public static class ModelValidator
{
    /// <summary>Longest label: enough for any tag name, short enough for a chart axis and a CSV header.</summary>
    public const int MaxLabelLength = 64;

    /// <summary>Relative tolerance for symmetry: |W_ij − W_ji| ≤ tol·max|W|, against the weight's own scale.</summary>
    public const double SymmetryTolerance = 1e-9;

    /// <summary>
    /// Relative tolerance for definiteness, against the weight's own largest eigenvalue in magnitude λ*:
    /// semidefinite when λ_min ≥ −tol·λ*, definite when λ_min &gt; tol·λ*. Computed eigenvalues carry errors of
    /// about n·2.2e-16·λ* (≤ 4.4e-14·λ* for n ≤ 200); 1e-10 leaves room for data rounded when it was written.
    /// </summary>
    public const double DefinitenessTolerance = 1e-10;

    /// <summary>
    /// Largest magnitude accepted for an entry of A, B, C and the weights. Compiling multiplies up to five such
    /// numbers before any power of A (BᵀCᵀQCB in the Hessian) and sums up to 200⁴ of those products:
    /// (1e50)⁵ · 1.6e9 ≈ 2e259 stays below double's 1.8e308 with room left for the horizon's growth.
    /// </summary>
    public const double MaxMagnitude = 1e50;

    /// <summary>
    /// Smallest ‖A‖₁·T accepted for a continuous plant with A ≠ 0: below double's machine epsilon 2⁻⁵² ≈ 2.2e-16,
    /// e^{AT} differs from the identity by less than the rounding of its unit diagonal, so the plant's own
    /// dynamics would vanish from the discretised model.
    /// </summary>
    public const double MinHoldNorm = 2.220446049250313e-16;

    /// <summary>
    /// Shortest sample time accepted, in seconds: one 100 ns tick of the timestamps a station counts its samples by.
    /// A shorter one could not be told from the next sample (and a subnormal one divides any gap into infinity).
    /// </summary>
    public const double MinSampleTime = 1.0 / TimeSpan.TicksPerSecond;

    /// <summary>
    /// Longest sample time accepted, in seconds: the whole span a timestamp can name (about 10,000 years). A longer one
    /// has no sample after its first, and an enormous one (1e300 s) only carries overflow into every time it scales.
    /// </summary>
    public static readonly double MaxSampleTime = (DateTimeOffset.MaxValue - DateTimeOffset.MinValue).TotalSeconds;

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

        if (document.Name is { } name && HasControlCharacter(name))
        {
            errors.Add(new("name", ControlCharacterReason));
        }

        if (document.Plant is null)
        {
            errors.Add(new("plant", "is required"));
        }

        if (document.Cost is null)
        {
            errors.Add(new("cost", "is required"));
        }

        if (document.Plant is null || document.Cost is null)
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

            int before = errors.Count;
            CheckRectangular(plant.A, "plant.a", n, n, errors);
            if (errors.Count > before)
            {
                // A that is not square leaves the number of states unknown: checking B, C, E, the weights and the
                // limits against its row count would only report the same mistake again, in fields that may be right.
                n = -1;
            }
            else
            {
                m = ColumnCountOf(plant.B, "plant.b", n, errors);
                if (m > limits.MaxInputs)
                {
                    errors.Add(new("plant.b", $"has {m} inputs; at most {limits.MaxInputs} are allowed"));
                    return null;
                }
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

        int disturbances = 0;
        if (plant.E is not null && n > 0)
        {
            disturbances = ColumnCountOf(plant.E, "plant.e", n, errors);
            if (disturbances > limits.MaxInputs)
            {
                errors.Add(new("plant.e", $"has {disturbances} disturbances; at most {limits.MaxInputs} are allowed"));
                return null;
            }
        }

        if (!double.IsFinite(plant.SampleTime) || plant.SampleTime <= 0)
        {
            errors.Add(new("plant.sampleTime", "must be a finite number of seconds greater than 0"));
        }
        else if (plant.SampleTime < MinSampleTime || plant.SampleTime > MaxSampleTime)
        {
            errors.Add(new("plant.sampleTime", $"is {plant.SampleTime:g3} s; a sample time lies between {MinSampleTime:g3} s (one tick of a station's timestamps) and {MaxSampleTime:g3} s (the span of a timestamp)"));
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

        var operatingPoint = CheckOperatingPoint(document.OperatingPoint, n, m, p, Math.Max(disturbances, 0), errors);
        var validatedLimits = CheckLimits(document.Limits, m, p, errors);
        CheckLabels(document.Labels, n, m, p, Math.Max(disturbances, 0), errors);
        if (document.Estimator is { } estimator && n > 0 && m > 0)
        {
            errors.AddRange(Estimation.EstimatorSpecValidator.Validate(estimator, n, m, p));
        }

        if (errors.Count > 0)
        {
            return null;
        }

        // Shapes are right: now numbers and definiteness.
        var a = ToMatrix(plant.A, "plant.a", errors);
        var b = ToMatrix(plant.B, "plant.b", errors);
        var e = plant.E is null ? Matrix<double>.Build.Dense(n, 0) : ToMatrix(plant.E, "plant.e", errors);
        var c = plant.C is null ? Matrix<double>.Build.DenseIdentity(n) : ToMatrix(plant.C, "plant.c", errors);
        var q = ToWeight(cost.OutputWeight, "cost.outputWeight", errors);
        var r = ToWeight(cost.InputWeight, "cost.inputWeight", errors);
        var s = cost.InputRateWeight is null ? Matrix<double>.Build.Dense(m, m) : ToWeight(cost.InputRateWeight, "cost.inputRateWeight", errors);
        Matrix<double>? pTerminal = terminal.Kind == TerminalWeightKind.Explicit ? ToWeight(WeightSpec.FromMatrix(terminal.Matrix!), "cost.terminalWeight", errors) : null;
        if (errors.Count > 0)
        {
            return null;
        }

        if (plant.TimeDomain == TimeDomain.Continuous)
        {
            CheckHoldRange(a, plant.SampleTime, errors);
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

        return new ValidatedModel(document, a, b, c, plant.C is null, plant.SampleTime, plant.TimeDomain, horizon, q, r, s, terminal.Kind, pTerminal, validatedLimits!.InDeviations(operatingPoint), operatingPoint) { E = e };
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
        var largest = (Value: 0.0, Path: "");
        for (int i = 0; i < rows.Length; i++)
        {
            for (int j = 0; j < rows[i].Length; j++)
            {
                double v = rows[i][j];
                if (!double.IsFinite(v))
                {
                    errors.Add(new($"{path}[{i}][{j}]", "must be a finite number"));
                }
                else if (Math.Abs(v) > Math.Abs(largest.Value))
                {
                    largest = (v, $"{path}[{i}][{j}]");
                }

                matrix[i, j] = v;
            }
        }

        CheckMagnitude(largest.Value, largest.Path, errors);
        return matrix;
    }

    /// <summary>One error per field, at its largest entry, when that entry is beyond <see cref="MaxMagnitude"/>.</summary>
    private static void CheckMagnitude(double largest, string path, List<ValidationError> errors)
    {
        if (Math.Abs(largest) > MaxMagnitude)
        {
            errors.Add(new(path, $"is {largest:g3}; entries larger than {MaxMagnitude:g3} in magnitude make the products formed while compiling (such as BᵀCᵀQCB) overflow double precision — express the model in units that keep its numbers nearer 1"));
        }
    }

    private static Matrix<double> ToWeight(WeightSpec weight, string path, List<ValidationError> errors)
    {
        if (weight.Diagonal is not null)
        {
            var d = weight.Diagonal;
            var largest = (Value: 0.0, Path: "");
            for (int i = 0; i < d.Length; i++)
            {
                if (!double.IsFinite(d[i]))
                {
                    errors.Add(new($"{path}[{i}]", "must be a finite number"));
                }
                else if (Math.Abs(d[i]) > Math.Abs(largest.Value))
                {
                    largest = (d[i], $"{path}[{i}]");
                }
            }

            CheckMagnitude(largest.Value, largest.Path, errors);
            return Matrix<double>.Build.DenseOfDiagonalArray(d);
        }

        var matrix = ToMatrix(weight.Matrix!, path, errors);
        double scale = matrix.Enumerate().Where(double.IsFinite).Select(Math.Abs).DefaultIfEmpty(0).Max();
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

    /// <summary>
    /// Definiteness judged relative to the matrix's own scale, so its units do not decide it (weights here, noise
    /// covariances in the estimator's check). The eigenvalues are computed on the matrix divided by a power of two
    /// (exact), which keeps the iteration's norms in range.
    /// </summary>
    /// <param name="zeroReason">What an all-zero matrix would break, added to its message when definiteness is required.</param>
    internal static void CheckDefinite(Matrix<double> matrix, string path, bool strict, List<ValidationError> errors, string? zeroReason = null)
    {
        double scale = MatrixScale.MaxAbs(matrix);
        if (scale == 0)
        {
            if (strict)
            {
                errors.Add(new(path, zeroReason is null ? "must be positive definite: it is all zeros" : $"must be positive definite: it is all zeros ({zeroReason})"));
            }

            return;
        }

        int exponent = MatrixScale.Exponent(scale);
        double[] eigenvalues;
        try
        {
            eigenvalues = MatrixScale.ScaleDown(matrix, exponent).Evd(Symmetricity.Symmetric).EigenValues.Select(z => z.Real).ToArray();
        }
        catch (NonConvergenceException)
        {
            errors.Add(new(path, "its eigenvalues could not be computed (the iteration did not converge), so its definiteness cannot be judged"));
            return;
        }

        double largestUnit = eigenvalues.Select(Math.Abs).Max();
        double smallestUnit = eigenvalues.Min();
        double largest = Math.ScaleB(largestUnit, exponent);
        double smallest = Math.ScaleB(smallestUnit, exponent);
        const string why = "relative to its largest eigenvalue, that is relative to the matrix's own scale, so its units do not matter";
        if (strict && !(smallestUnit > DefinitenessTolerance * largestUnit))
        {
            errors.Add(new(path, $"must be positive definite: its smallest eigenvalue {smallest:g3} is not above {DefinitenessTolerance:g} × {largest:g3}, its largest eigenvalue in magnitude (definiteness is judged {why})"));
        }
        else if (!strict && smallestUnit < -DefinitenessTolerance * largestUnit)
        {
            errors.Add(new(path, $"must be positive semidefinite: its smallest eigenvalue {smallest:g3} is below −{DefinitenessTolerance:g} × {largest:g3}, its largest eigenvalue in magnitude (semidefiniteness is judged {why})"));
        }
    }

    /// <summary>
    /// A continuous plant is held by e^{AT}: ‖A‖₁·T must lie where the matrix exponential can represent it.
    /// The sample time is named: with A's entries within <see cref="MaxMagnitude"/>, it is the factor that
    /// does not fit this plant (or the units of the two disagree).
    /// </summary>
    private static void CheckHoldRange(Matrix<double> a, double sampleTime, List<ValidationError> errors)
    {
        double norm = a.L1Norm();
        double product = norm * sampleTime;
        if (product > MatrixExponential.MaxNorm)
        {
            errors.Add(new("plant.sampleTime", $"is {sampleTime:g3} s; times the plant's ‖A‖₁ = {norm:g3} that is {product:g3}, beyond the {MatrixExponential.MaxNorm:g3} a zero-order hold can represent (e^{{AT}} over- or underflows) — shorten the sample time or check the units of A"));
        }
        else if (product > 0 && product < MinHoldNorm)
        {
            errors.Add(new("plant.sampleTime", $"is {sampleTime:g3} s; times the plant's ‖A‖₁ = {norm:g3} that is {product:g3}, below double's machine epsilon {MinHoldNorm:g3}: e^{{AT}} would not differ from the identity and the plant's dynamics would be lost — lengthen the sample time or check the units of A"));
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
                    else if (given[j] > MaxMagnitude)
                    {
                        errors.Add(new($"limits.outputViolationWeight[{j}]", $"is {given[j]:g3}; weights above {MaxMagnitude:g3} overflow the penalty terms in double precision — express the model in units that keep its numbers nearer 1"));
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

    private static void CheckLabels(LabelsSpec? labels, int n, int m, int p, int q, List<ValidationError> errors)
    {
        if (labels is null)
        {
            return;
        }

        CheckNames(labels.States, "labels.states", n, errors);
        CheckNames(labels.Inputs, "labels.inputs", m, errors);
        CheckNames(labels.Outputs, "labels.outputs", p, errors);
        CheckNames(labels.Disturbances, "labels.disturbances", q, errors);
        if (labels.Units is { } units)
        {
            CheckUnits(units.Disturbances, "labels.units.disturbances", q, errors);
            CheckUnits(units.States, "labels.units.states", n, errors);
            CheckUnits(units.Inputs, "labels.units.inputs", m, errors);
            CheckUnits(units.Outputs, "labels.units.outputs", p, errors);
        }
    }

    /// <summary>Units are free text and may repeat (three zones all in °C); an empty string means "no unit".</summary>
    private static void CheckUnits(string[]? units, string path, int size, List<ValidationError> errors)
    {
        if (units is null)
        {
            return;
        }

        if (units.Length != size)
        {
            errors.Add(new(path, $"has {units.Length} units; expected {size}"));
            return;
        }

        for (int i = 0; i < units.Length; i++)
        {
            if (units[i] is null || units[i].Length > MaxLabelLength)
            {
                errors.Add(new($"{path}[{i}]", $"must be a text of at most {MaxLabelLength} characters (empty for none)"));
            }
            else if (HasControlCharacter(units[i]))
            {
                errors.Add(new($"{path}[{i}]", ControlCharacterReason));
            }
        }
    }

    /// <summary>The operating point with missing parts as zeros; every given entry finite and within <see cref="MaxMagnitude"/>.</summary>
    private static OperatingPoint CheckOperatingPoint(OperatingPointSpec? spec, int n, int m, int p, int q, List<ValidationError> errors)
    {
        if (spec is null)
        {
            return OperatingPoint.Origin(n, m, p, q);
        }

        return new OperatingPoint(
            OperatingValues(spec.State, "operatingPoint.state", n, errors),
            OperatingValues(spec.Input, "operatingPoint.input", m, errors),
            OperatingValues(spec.Output, "operatingPoint.output", p, errors),
            OperatingValues(spec.Disturbance, "operatingPoint.disturbance", q, errors));
    }

    private static double[] OperatingValues(double[]? given, string path, int size, List<ValidationError> errors)
    {
        if (given is null)
        {
            return new double[size];
        }

        if (given.Length != size)
        {
            errors.Add(new(path, $"has {given.Length} entries; expected {size}"));
            return new double[size];
        }

        for (int i = 0; i < size; i++)
        {
            if (!double.IsFinite(given[i]) || Math.Abs(given[i]) > MaxMagnitude)
            {
                errors.Add(new($"{path}[{i}]", $"must be a finite number of magnitude at most {MaxMagnitude:g3}"));
            }
        }

        return (double[])given.Clone();
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
            if (string.IsNullOrWhiteSpace(names[i]) || names[i].Length > MaxLabelLength)
            {
                errors.Add(new($"{path}[{i}]", $"must be a non-empty name of at most {MaxLabelLength} characters"));
            }
            else if (HasControlCharacter(names[i]))
            {
                errors.Add(new($"{path}[{i}]", ControlCharacterReason));
            }
            else if (!seen.Add(names[i]))
            {
                errors.Add(new($"{path}[{i}]", $"'{names[i]}' is used twice"));
            }
        }
    }

    private const string ControlCharacterReason = "must not contain control characters (U+0000–U+001F, U+007F–U+009F): names and labels end up in CSV headers, chart text and logs";

    /// <summary>
    /// A control character (C0, DEL or C1) in a name or a label: they would break the CSV headers, the SVG charts and the
    /// log lines the text is written into, and none of them is printable.
    /// </summary>
    private static bool HasControlCharacter(string text)
    {
        foreach (char c in text)
        {
            if (char.IsControl(c))
            {
                return true;
            }
        }

        return false;
    }
}
