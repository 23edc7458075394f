using System.Numerics;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;
using MathNet.Numerics;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Estimation;

/// <summary>
/// Designs the steady-state Kalman estimator of the disturbance-augmented plant
/// x(k+1) = A x + B u + B_d d, d(k+1) = d, y = C x + C_d d (see <see cref="DisturbanceModelKind"/>).
/// The design is refused, with a reason on a JSON path, when constant disturbances could not be estimated without
/// offset, when a mode that does not decay is hidden from the outputs, or when the noise leaves the filter Riccati
/// equation without a stabilising solution.
/// </summary>
public static class EstimatorDesign
{
    /// <summary>
    /// A computed eigenvalue of A_a this close to the unit circle in magnitude is treated as on it when checking
    /// that the process noise drives it. Loose on purpose: an integrator coupled to a disturbance integrator forms a
    /// Jordan block whose computed eigenvalues split by about √ε ≈ 1.5e-8.
    /// </summary>
    public const double UnitCircleBand = 1e-6;

    /// <summary>
    /// Designs the estimator: checks the noise covariances, the offset-free condition, detectability of (A_a, C_a)
    /// and that the noise drives every mode on the unit circle; solves P = A_a P A_aᵀ − A_a P C_aᵀ (C_a P C_aᵀ + V)⁻¹ C_a P A_aᵀ + W
    /// (the prior error covariance) as the Riccati equation of the dual system, <c>DiscreteRiccati.Solve(A_aᵀ, C_aᵀ, W, V)</c>,
    /// and forms the filter gain L = P C_aᵀ (C_a P C_aᵀ + V)⁻¹ ((n+n_d)×p).
    /// </summary>
    /// <param name="a">A, n×n, discrete.</param>
    /// <param name="b">B, n×m.</param>
    /// <param name="c">C, p×n.</param>
    /// <param name="spec">Noise covariances and disturbance model.</param>
    /// <exception cref="ArgumentNullException">A matrix or the spec is null.</exception>
    /// <exception cref="ArgumentException">The plant matrices' shapes disagree or an entry is not finite (the model validator rules these out).</exception>
    /// <exception cref="ModelValidationException">
    /// The spec is invalid (<c>estimator.processNoise</c>, <c>estimator.measurementNoise</c>, <c>estimator.disturbanceModel</c>),
    /// the disturbance model is refused (<c>estimator.disturbanceModel</c>: offset-free rank test or detectability), or
    /// the filter Riccati equation has no usable stabilising solution for this noise (<c>estimator.processNoise</c>).
    /// Every iteration inside is bounded; a numeric failure is reported here, never thrown raw.
    /// </exception>
    public static Estimator Build(Matrix<double> a, Matrix<double> b, Matrix<double> c, EstimatorSpec spec)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        ArgumentNullException.ThrowIfNull(c);
        ArgumentNullException.ThrowIfNull(spec);
        int n = a.RowCount;
        if (n == 0 || a.ColumnCount != n || b.RowCount != n || b.ColumnCount == 0 || c.ColumnCount != n || c.RowCount == 0)
        {
            throw new ArgumentException($"the plant's shapes disagree: A is {a.RowCount}×{a.ColumnCount}, B {b.RowCount}×{b.ColumnCount}, C {c.RowCount}×{c.ColumnCount}; expected n×n, n×m, p×n with n, m, p ≥ 1");
        }

        if (!MatrixScale.AllFinite(a) || !MatrixScale.AllFinite(b) || !MatrixScale.AllFinite(c))
        {
            throw new ArgumentException("the plant matrices must be finite");
        }

        int m = b.ColumnCount;
        int p = c.RowCount;
        var (w, v) = EstimatorSpecValidator.Build(spec, n, m, p);
        var model = AugmentedModel.Build(a, b, c, spec.DisturbanceModel);

        try
        {
            if (spec.DisturbanceModel != DisturbanceModelKind.None)
            {
                RequireOffsetFree(a, b, c, model, spec.DisturbanceModel);
            }

            RequireDetectable(model);
            RequireNoiseOnUnitCircle(model, w);
        }
        catch (NumericScaleException ex)
        {
            throw new ModelValidationException(EstimatorSpecValidator.DisturbanceModelPath, $"the plant's structure could not be checked for this disturbance model: {ex.Message}");
        }

        RiccatiSolution riccati;
        Matrix<double> gain;
        Complex[] eigenvalues;
        try
        {
            riccati = DiscreteRiccati.Solve(model.A.Transpose(), model.C.Transpose(), w, v);
            gain = FilterGain(model.C, riccati.P, v);
            eigenvalues = SystemProperties.Eigenvalues(model.A - (model.A * gain * model.C));
        }
        catch (RiccatiException ex)
        {
            throw new ModelValidationException(EstimatorSpecValidator.ProcessNoisePath, $"the filter Riccati equation has no usable stabilising solution for this process and measurement noise: {ex.Message}");
        }
        catch (NumericScaleException ex)
        {
            throw new ModelValidationException(EstimatorSpecValidator.ProcessNoisePath, $"the estimator could not be designed for this noise: {ex.Message}");
        }

        double radius = eigenvalues.Select(z => z.Magnitude).DefaultIfEmpty(0).Max();
        if (!(radius < 1.0) || !MatrixScale.AllFinite(gain))
        {
            throw new ModelValidationException(EstimatorSpecValidator.ProcessNoisePath, $"the designed estimator is not stable (spectral radius of A_a − A_a L C_a is {radius:g6}): the noise covariances are too far apart in scale for a usable gain");
        }

        Matrix<double> steadyState;
        try
        {
            steadyState = SteadyStatePseudoInverse(a, model);
        }
        catch (NumericScaleException ex)
        {
            throw new ModelValidationException(EstimatorSpecValidator.DisturbanceModelPath, $"the steady-state equations used to initialise the estimate could not be factorised: {ex.Message}");
        }

        return new Estimator(spec.DisturbanceModel, n, m, p, model, riccati, gain, eigenvalues, radius, steadyState);
    }

    /// <summary>
    /// Offset-free condition: the disturbances must be as many as the outputs (n_d = p) and
    /// rank [[A − I, B_d], [C, C_d]] = n + n_d, so that at steady state every output offset is attributed to a
    /// unique disturbance and state. The rank is computed with the block rows, and then the disturbance columns,
    /// each scaled by a power of two to a largest entry in [1, 2): state, output and input units do not decide it.
    /// </summary>
    private static void RequireOffsetFree(Matrix<double> a, Matrix<double> b, Matrix<double> c, AugmentedModel model, DisturbanceModelKind kind)
    {
        int n = a.RowCount;
        int m = b.ColumnCount;
        int p = c.RowCount;
        int nd = model.DisturbanceInput.ColumnCount;
        string name = kind == DisturbanceModelKind.Output ? "output" : "input";
        string perWhat = kind == DisturbanceModelKind.Output ? "output" : "input";
        if (nd > p)
        {
            throw new ModelValidationException(EstimatorSpecValidator.DisturbanceModelPath,
                $"the {name} disturbance model has one disturbance per {perWhat} ({nd}) but the plant has only {p} output{(p == 1 ? "" : "s")}: [[A − I, B_d], [C, C_d]] has n + p = {n + p} rows, so its rank cannot reach n + n_d = {n + nd} and the disturbances cannot be told apart from the measurements — use the output disturbance model");
        }

        if (nd < p)
        {
            throw new ModelValidationException(EstimatorSpecValidator.DisturbanceModelPath,
                $"input disturbances need at least as many inputs as outputs: {nd} input disturbance{(nd == 1 ? "" : "s")} cannot account for a steady offset in each of the {p} outputs (offset-free estimation needs n_d = p), so the estimate would not follow the measurement at steady state — use the output disturbance model");
        }

        var identity = Matrix<double>.Build.DenseIdentity(n);
        var top = (a - identity).Append(model.DisturbanceInput);
        var bottom = c.Append(model.DisturbanceOutput);
        var stacked = UnitScaled(top).Stack(UnitScaled(bottom));
        var disturbanceColumns = stacked.SubMatrix(0, n + p, n, nd);
        stacked.SetSubMatrix(0, n, UnitScaled(disturbanceColumns));
        int rank = NumericalRank(stacked);
        int required = n + nd;
        if (rank >= required)
        {
            return;
        }

        int rankAMinusI = NumericalRank(UnitScaled(a - identity));
        string why;
        if (kind == DisturbanceModelKind.Output)
        {
            // With B_d = 0 and C_d = I the rank is p + rank(A − I): only a singular A − I can lose it.
            why = $"A − I is singular (rank {rankAMinusI} of {n}), so the plant has an integrator (eigenvalue 1 of A): the drift of its integrating state gives the same measurement as an output disturbance, so output disturbances cannot be told from states — use the input disturbance model";
        }
        else if (rankAMinusI == n)
        {
            // With A − I invertible the rank is n + rank(C (I − A)⁻¹ B), the steady-state gain.
            why = "the plant's steady-state gain C(I − A)⁻¹B is singular (a zero at z = 1): some combination of input disturbances has no steady effect on any output, so it cannot be estimated — use the output disturbance model or fewer, independent inputs";
        }
        else
        {
            why = $"A − I is singular (rank {rankAMinusI} of {n}) and some steady drift of the states combined with input disturbances leaves every measurement unchanged, so they cannot be told apart";
        }

        throw new ModelValidationException(EstimatorSpecValidator.DisturbanceModelPath,
            $"offset-free estimation needs rank [[A − I, B_d], [C, C_d]] = n + n_d = {required}, but its rank is {rank}: {why}");
    }

    /// <summary>Hautus test: rank [A_a − λI; C_a] = n + n_d for every eigenvalue of A_a with |λ| ≥ 1.</summary>
    private static void RequireDetectable(AugmentedModel model)
    {
        var test = SystemProperties.Detectable(model.A, model.C);
        if (!test.Holds)
        {
            throw new ModelValidationException(EstimatorSpecValidator.DisturbanceModelPath,
                $"the augmented model (A_a, C_a) is not detectable: the mode at λ = {Format(test.Witness)} (|λ| ≥ 1) is seen by no output (Hautus test: rank [A_a − λI; C_a] < {model.A.RowCount}), so its estimation error cannot be made to decay — measure an output that sees it{(model.DisturbanceInput.ColumnCount > 0 ? " or choose another disturbance model" : "")}");
        }
    }

    /// <summary>
    /// The filter Riccati equation has a stabilising solution only if the process noise drives every mode on the
    /// unit circle: rank [A_a − λI, W] = n + n_d there (range W = range W^½). The disturbance integrators sit at
    /// λ = 1 exactly, so λ = 1 is always tested when there are disturbances; other modes within
    /// <see cref="UnitCircleBand"/> of the circle are tested at their computed value.
    /// </summary>
    private static void RequireNoiseOnUnitCircle(AugmentedModel model, Matrix<double> w)
    {
        int size = model.A.RowCount;
        var candidates = SystemProperties.Eigenvalues(model.A).Where(z => Math.Abs(z.Magnitude - 1) <= UnitCircleBand).ToList();
        if (model.DisturbanceInput.ColumnCount > 0)
        {
            candidates.Insert(0, Complex.One);
        }

        if (candidates.Count == 0)
        {
            return;
        }

        // A_a and λ share one power of two; W is scaled on its own, which changes no rank.
        int exponent = MatrixScale.Exponent(MatrixScale.MaxAbs(model.A));
        var aUnit = MatrixScale.ScaleDown(model.A, exponent);
        var wUnit = MatrixScale.ScaleDown(w, MatrixScale.Exponent(MatrixScale.MaxAbs(w)));
        double scale = Math.Max(aUnit.FrobeniusNorm(), wUnit.FrobeniusNorm());
        foreach (var lambda in candidates)
        {
            var lambdaUnit = new Complex(Math.ScaleB(lambda.Real, -exponent), Math.ScaleB(lambda.Imaginary, -exponent));
            var test = Matrix<Complex>.Build.Dense(size, 2 * size);
            for (int i = 0; i < size; i++)
            {
                for (int j = 0; j < size; j++)
                {
                    test[i, j] = aUnit[i, j] - (i == j ? lambdaUnit : Complex.Zero);
                    test[i, size + j] = wUnit[i, j];
                }
            }

            double smallest;
            try
            {
                smallest = test.Svd(computeVectors: false).S[size - 1].Magnitude;
            }
            catch (NonConvergenceException ex)
            {
                throw new NumericScaleException("the singular value iteration of the unit-circle noise test did not converge", ex);
            }

            if (smallest <= SystemProperties.RankTolerance * scale)
            {
                int n = model.B.RowCount - model.DisturbanceInput.ColumnCount;
                string hint = model.DisturbanceInput.ColumnCount > 0
                    ? $" — give the disturbance entries (indices {n} to {size - 1}) a positive variance, and make sure every state on the unit circle receives noise"
                    : " — give the states of that mode a positive variance";
                throw new ModelValidationException(EstimatorSpecValidator.ProcessNoisePath,
                    $"the process noise drives no part of the mode at λ = {Format(lambda)} on the unit circle (rank [A_a − λI, W] < {size}): the estimator would never correct it and the filter Riccati equation has no stabilising solution{hint}");
            }
        }
    }

    /// <summary>L = P C_aᵀ (C_a P C_aᵀ + V)⁻¹ = ((C_a P C_aᵀ + V)⁻¹ C_a P)ᵀ, with P and V symmetric.</summary>
    private static Matrix<double> FilterGain(Matrix<double> ca, Matrix<double> p, Matrix<double> v)
    {
        var cp = ca * p;
        var innovationCovariance = cp.TransposeAndMultiply(ca) + v;
        innovationCovariance = (innovationCovariance + innovationCovariance.Transpose()) * 0.5;
        try
        {
            return innovationCovariance.Cholesky().Solve(cp).Transpose();
        }
        catch (ArgumentException ex)
        {
            throw new RiccatiException("C_a P C_aᵀ + V is not numerically positive definite, so the filter gain does not exist in double precision", ex);
        }
    }

    /// <summary>
    /// The minimum-norm least-squares inverse of the steady-state equations [[I − A, −B_d], [C, C_d]] [x; d] = [B u; y]
    /// ((n+n_d)×(n+p)), from an SVD with singular values at or below <see cref="SystemProperties.RankTolerance"/>·σ_max
    /// dropped. The matrix is scaled by a power of two (exact) for the SVD and the inverse scaled back.
    /// </summary>
    private static Matrix<double> SteadyStatePseudoInverse(Matrix<double> a, AugmentedModel model)
    {
        int n = a.RowCount;
        var top = (Matrix<double>.Build.DenseIdentity(n) - a).Append(-model.DisturbanceInput);
        var equations = top.Stack(model.C);
        int exponent = MatrixScale.Exponent(MatrixScale.MaxAbs(equations));
        MathNet.Numerics.LinearAlgebra.Factorization.Svd<double> svd;
        try
        {
            svd = MatrixScale.ScaleDown(equations, exponent).Svd(computeVectors: true);
        }
        catch (NonConvergenceException ex)
        {
            throw new NumericScaleException("the singular value iteration of the steady-state equations did not converge", ex);
        }

        var s = svd.S;
        double threshold = SystemProperties.RankTolerance * (s.Count > 0 ? s[0] : 0);
        var inverse = Matrix<double>.Build.Dense(equations.ColumnCount, equations.RowCount);
        var u = svd.U;
        var vt = svd.VT;
        for (int k = 0; k < s.Count; k++)
        {
            if (!(s[k] > threshold))
            {
                break;
            }

            // (σ_k 2^{−e})⁻¹ v_k u_kᵀ, with the 2^{e} of the scaled matrix undone by ScaleB.
            double factor = Math.ScaleB(1.0 / s[k], -exponent);
            for (int i = 0; i < inverse.RowCount; i++)
            {
                double vi = vt[k, i] * factor;
                for (int j = 0; j < inverse.ColumnCount; j++)
                {
                    inverse[i, j] += vi * u[j, k];
                }
            }
        }

        return inverse;
    }

    private static Matrix<double> UnitScaled(Matrix<double> m) => MatrixScale.ScaleDown(m, MatrixScale.Exponent(MatrixScale.MaxAbs(m)));

    private static int NumericalRank(Matrix<double> m)
    {
        double[] s;
        try
        {
            s = m.Svd(computeVectors: false).S.ToArray();
        }
        catch (NonConvergenceException ex)
        {
            throw new NumericScaleException("the singular value iteration of the offset-free rank test did not converge", ex);
        }

        if (s.Length == 0 || s[0] == 0)
        {
            return 0;
        }

        double threshold = SystemProperties.RankTolerance * s[0];
        return s.Count(x => x > threshold);
    }

    /// <summary>An eigenvalue's imaginary part below this is shown as a real number in messages (display only).</summary>
    private const double ShownAsReal = 1e-12;

    internal static string Format(Complex z) =>
        Math.Abs(z.Imaginary) < ShownAsReal ? $"{z.Real:g6}" : $"{z.Real:g6}{(z.Imaginary >= 0 ? "+" : "−")}{Math.Abs(z.Imaginary):g6}i";
}
