using System.Collections.ObjectModel;
using Complex = System.Numerics.Complex;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Estimation;

/// <summary>
/// A designed steady-state Kalman estimator of the disturbance-augmented plant (built by <see cref="EstimatorDesign.Build"/>).
/// Immutable and safe to share between threads: every matrix is private and only read after construction, and the
/// matrix properties return copies.
/// </summary>
/// <remarks>
/// <para>Timing. Sample k has a measurement y(k) and an input u(k) that is held from sample k until sample k + 1.
/// x̂⁻(k) is the prior (predicted before y(k) is known) and x̂⁺(k) the posterior (corrected with y(k)):</para>
/// <para>x̂⁺(k) = x̂⁻(k) + L (y(k) − C_a x̂⁻(k)) (<see cref="Correct(StateEstimate, double[])"/>),
/// x̂⁻(k+1) = A_a x̂⁺(k) + B_a u(k) (<see cref="Predict"/>).</para>
/// <para>Request paths used in validation errors: <c>estimate.state</c>, <c>estimate.disturbance</c>,
/// <c>measurement</c>, <c>appliedInput</c> (relative to the request that carries them).</para>
/// </remarks>
public sealed class Estimator
{
    /// <summary>Path of the estimate's plant-state part in validation errors.</summary>
    public const string StatePath = "estimate.state";

    /// <summary>Path of the estimate's disturbance part in validation errors.</summary>
    public const string DisturbancePath = "estimate.disturbance";

    /// <summary>Path of the measurement in validation errors.</summary>
    public const string MeasurementPath = "measurement";

    /// <summary>Path of the applied input in validation errors.</summary>
    public const string AppliedInputPath = "appliedInput";

    private readonly AugmentedModel model;
    private readonly Matrix<double> gain;
    private readonly Matrix<double> predictorGain;
    private readonly Matrix<double> covariance;
    private readonly Matrix<double> posteriorCovariance;
    private readonly Complex[] eigenvalues;
    private readonly Matrix<double> steadyStateInverse;

    internal Estimator(
        DisturbanceModelKind disturbanceModel,
        int states,
        int inputs,
        int outputs,
        AugmentedModel model,
        RiccatiSolution riccati,
        Matrix<double> gain,
        Complex[] eigenvalues,
        double spectralRadius,
        Matrix<double> steadyStateInverse)
    {
        DisturbanceModel = disturbanceModel;
        StateCount = states;
        InputCount = inputs;
        OutputCount = outputs;
        DisturbanceCount = model.A.RowCount - states;
        this.model = model;
        this.gain = gain;
        predictorGain = model.A * gain;
        covariance = riccati.P;

        // P⁺ = (I − L C_a) P⁻, the error covariance just after a correction.
        var posterior = covariance - (gain * (model.C * covariance));
        posteriorCovariance = (posterior + posterior.Transpose()) * 0.5;
        this.eigenvalues = eigenvalues;
        SpectralRadius = spectralRadius;
        RiccatiResidual = riccati.RelativeResidual;
        RiccatiIterations = riccati.Iterations;
        this.steadyStateInverse = steadyStateInverse;
    }

    /// <summary>Where the disturbances enter.</summary>
    public DisturbanceModelKind DisturbanceModel { get; }

    /// <summary>n, the plant's states.</summary>
    public int StateCount { get; }

    /// <summary>n_d, the integrating disturbances (p for output, m for input, 0 for none).</summary>
    public int DisturbanceCount { get; }

    /// <summary>m, the plant's inputs.</summary>
    public int InputCount { get; }

    /// <summary>p, the measured outputs.</summary>
    public int OutputCount { get; }

    /// <summary>A_a = [[A, B_d], [0, I]], (n+n_d)×(n+n_d) (a copy).</summary>
    public Matrix<double> AugmentedA => model.A.Clone();

    /// <summary>B_a = [B; 0], (n+n_d)×m (a copy).</summary>
    public Matrix<double> AugmentedB => model.B.Clone();

    /// <summary>C_a = [C, C_d], p×(n+n_d) (a copy).</summary>
    public Matrix<double> AugmentedC => model.C.Clone();

    /// <summary>Filter gain L = P C_aᵀ (C_a P C_aᵀ + V)⁻¹, (n+n_d)×p (a copy).</summary>
    public Matrix<double> Gain => gain.Clone();

    /// <summary>Predictor gain A_a L, (n+n_d)×p: x̂⁻(k+1) = A_a x̂⁻(k) + B_a u(k) + A_a L (y(k) − C_a x̂⁻(k)) (a copy).</summary>
    public Matrix<double> PredictorGain => predictorGain.Clone();

    /// <summary>Steady-state prior error covariance P, the stabilising solution of the filter Riccati equation (a copy).</summary>
    public Matrix<double> Covariance => covariance.Clone();

    /// <summary>Steady-state posterior error covariance (I − L C_a) P (a copy).</summary>
    public Matrix<double> PosteriorCovariance => posteriorCovariance.Clone();

    /// <summary>Eigenvalues of A_a − A_a L C_a, the dynamics of the prior estimation error (complex in general).</summary>
    public IReadOnlyList<Complex> Eigenvalues => new ReadOnlyCollection<Complex>((Complex[])eigenvalues.Clone());

    /// <summary>Largest |λ| over <see cref="Eigenvalues"/>; below 1 for every designed estimator.</summary>
    public double SpectralRadius { get; }

    /// <summary>Relative residual of the filter Riccati equation (as reported by the Riccati solver).</summary>
    public double RiccatiResidual { get; }

    /// <summary>Doubling steps the Riccati solver took.</summary>
    public int RiccatiIterations { get; }

    /// <summary>Corrects the prior of a sample with that sample's measurement: x̂⁺ = x̂⁻ + L (y − C_a x̂⁻).</summary>
    /// <param name="priorState">x̂⁻, n entries.</param>
    /// <param name="priorDisturbance">d̂⁻, n_d entries.</param>
    /// <param name="measurement">y, p entries; null when the measurement is missing: the prior is passed on uncorrected and the result says so.</param>
    /// <exception cref="ModelValidationException">A vector has the wrong length or a non-finite entry (paths in the class remarks).</exception>
    public CorrectedEstimate Correct(double[] priorState, double[] priorDisturbance, double[]? measurement) =>
        Correct(new StateEstimate(priorState, priorDisturbance), measurement);

    /// <summary>Corrects the prior of a sample with that sample's measurement: x̂⁺ = x̂⁻ + L (y − C_a x̂⁻).</summary>
    /// <param name="prior">x̂⁻ = [x; d] before the measurement.</param>
    /// <param name="measurement">y, p entries; null when the measurement is missing: the prior is passed on uncorrected and the result says so.</param>
    /// <exception cref="ModelValidationException">A vector has the wrong length or a non-finite entry (paths in the class remarks).</exception>
    public CorrectedEstimate Correct(StateEstimate prior, double[]? measurement)
    {
        var priorVector = Augmented(prior);
        if (measurement is not null)
        {
            RequireVector(measurement, OutputCount, MeasurementPath, "one per output");
        }

        var predicted = model.C * priorVector;
        if (measurement is null)
        {
            return new CorrectedEstimate(Split(priorVector), predicted.ToArray(), null, MeasurementUsed: false);
        }

        var innovation = Vector<double>.Build.DenseOfArray(measurement) - predicted;
        var posterior = priorVector + (gain * innovation);
        return new CorrectedEstimate(Split(posterior), predicted.ToArray(), innovation.ToArray(), MeasurementUsed: true);
    }

    /// <summary>The prior for the next sample: x̂⁻(k+1) = A_a x̂⁺(k) + B_a u(k) (disturbances are held: d̂⁻(k+1) = d̂⁺(k)).</summary>
    /// <param name="posterior">x̂⁺(k), the corrected estimate of this sample.</param>
    /// <param name="appliedInput">u(k), m entries: the input held from this sample until the next.</param>
    /// <exception cref="ModelValidationException">A vector has the wrong length or a non-finite entry.</exception>
    /// <param name="stateDrive">E v(k) of measured disturbances over the interval (n entries), or null for none.</param>
    public StateEstimate Predict(StateEstimate posterior, double[] appliedInput, double[]? stateDrive = null)
    {
        var x = Augmented(posterior);
        RequireVector(appliedInput, InputCount, AppliedInputPath, "one per input");
        var next = (model.A * x) + (model.B * Vector<double>.Build.DenseOfArray(appliedInput));
        for (int i = 0; stateDrive is not null && i < StateCount; i++)
        {
            next[i] += stateDrive[i];
        }

        return Split(next);
    }

    /// <summary>
    /// An estimate at steady state with the applied input that agrees with the measurement: the minimum-norm
    /// least-squares solution [x; d] of
    /// x = A x + B u + B_d d and y = C x + C_d d, i.e. [[I − A, −B_d], [C, C_d]] [x; d] = [B u; y].
    /// </summary>
    /// <remarks>
    /// Output model (B_d = 0, C_d = I): x solves (I − A) x = B u, and d = y − C x. Input model (B_d = B, C_d = 0):
    /// x = (I − A)⁻¹B(u + d) with d chosen so that C x = y. For both, a design that passed the offset-free test
    /// (n_d = p and full rank) makes the system square and nonsingular, so the estimate reproduces y exactly (to
    /// rounding) and is an equilibrium. None: x is the least-squares compromise between being an equilibrium and
    /// matching y; it reproduces y only when those agree.
    /// </remarks>
    /// <param name="measurement">y, p entries.</param>
    /// <param name="appliedInput">u, m entries, the input the plant has been held at.</param>
    /// <exception cref="ModelValidationException">A vector is missing, has the wrong length or a non-finite entry.</exception>
    /// <param name="stateDrive">E v of measured disturbances at that steady state (n entries), or null for none.</param>
    public StateEstimate Initialise(double[]? measurement, double[] appliedInput, double[]? stateDrive = null)
    {
        if (measurement is null)
        {
            throw new ModelValidationException(MeasurementPath, "is required to initialise the estimate (no estimate was given)");
        }

        RequireVector(measurement, OutputCount, MeasurementPath, "one per output");
        RequireVector(appliedInput, InputCount, AppliedInputPath, "one per input");
        int n = StateCount;
        var rhs = Vector<double>.Build.Dense(n + OutputCount);
        var bu = model.B.SubMatrix(0, n, 0, InputCount) * Vector<double>.Build.DenseOfArray(appliedInput);
        for (int i = 0; stateDrive is not null && i < n; i++)
        {
            bu[i] += stateDrive[i];
        }

        rhs.SetSubVector(0, n, bu);
        rhs.SetSubVector(n, OutputCount, Vector<double>.Build.DenseOfArray(measurement));
        return Split(steadyStateInverse * rhs);
    }

    /// <summary>
    /// One sample of the estimator, for a supervisory system that calls once per sample and keeps only what the
    /// previous call returned. Order: correct, then predict.
    /// <list type="number">
    /// <item><paramref name="estimate"/> is the prior x̂⁻(k) for this sample: the <see cref="EstimatorStep.NextPrior"/>
    /// returned by the previous call, unchanged. Null on the first call (or after a restart).</item>
    /// <item>It is corrected with <paramref name="measurement"/> y(k), taken at this sample, into x̂⁺(k)
    /// (<see cref="EstimatorStep.Corrected"/>: plan and report from this one). A null measurement skips the correction
    /// and the result's <see cref="CorrectedEstimate.MeasurementUsed"/> is false.</item>
    /// <item>x̂⁺(k) is propagated with <paramref name="appliedInput"/> u(k) into x̂⁻(k+1) = A_a x̂⁺(k) + B_a u(k)
    /// (<see cref="EstimatorStep.NextPrior"/>), which the caller sends back with the next measurement.</item>
    /// </list>
    /// u(k) is the input the supervisory system applied at this sample and holds until the next one (after any
    /// operator override or clipping — what the plant really gets, not the move that was proposed). So the call is
    /// made once that input is known. A caller that decides u(k) from this sample's corrected estimate calls
    /// <see cref="Correct(StateEstimate, double[])"/> first, plans, applies the input, then calls <see cref="Predict"/>;
    /// the result is the same as this method's.
    /// With a null <paramref name="estimate"/>, the corrected estimate is <see cref="Initialise"/>(y(k), u(k)): the
    /// steady state with this input that reproduces the measurement (<see cref="EstimatorStep.Initialised"/> is true).
    /// </summary>
    /// <param name="estimate">x̂⁻(k), the previous call's <see cref="EstimatorStep.NextPrior"/>; null to initialise.</param>
    /// <param name="appliedInput">u(k), m entries, held from this sample to the next.</param>
    /// <param name="measurement">y(k), p entries, or null when it is missing.</param>
    /// <exception cref="ModelValidationException">
    /// A vector has the wrong length or a non-finite entry, or both the estimate and the measurement are missing
    /// (path <c>measurement</c>: there is nothing to start from).
    /// </exception>
    public EstimatorStep Step(StateEstimate? estimate, double[] appliedInput, double[]? measurement)
    {
        if (estimate is null)
        {
            var initial = Initialise(measurement, appliedInput);
            var start = Augmented(initial);
            var predicted = model.C * start;
            var residual = Vector<double>.Build.DenseOfArray(measurement!) - predicted;
            var corrected = new CorrectedEstimate(initial, predicted.ToArray(), residual.ToArray(), MeasurementUsed: true);
            return new EstimatorStep(corrected, Predict(initial, appliedInput), Initialised: true);
        }

        var correction = Correct(estimate, measurement);
        return new EstimatorStep(correction, Predict(correction.Estimate, appliedInput), Initialised: false);
    }

    private Vector<double> Augmented(StateEstimate estimate)
    {
        if (estimate is null)
        {
            throw new ModelValidationException("estimate", "is required");
        }

        RequireVector(estimate.State, StateCount, StatePath, "one per state");
        RequireVector(estimate.Disturbance, DisturbanceCount, DisturbancePath, DisturbanceCount == 0 ? "the disturbance model has none" : "one per disturbance");
        var x = Vector<double>.Build.Dense(StateCount + DisturbanceCount);
        for (int i = 0; i < StateCount; i++)
        {
            x[i] = estimate.State[i];
        }

        for (int i = 0; i < DisturbanceCount; i++)
        {
            x[StateCount + i] = estimate.Disturbance[i];
        }

        return x;
    }

    private StateEstimate Split(Vector<double> x)
    {
        var values = x.ToArray();
        return new StateEstimate(values[..StateCount], values[StateCount..]);
    }

    private static void RequireVector(double[]? values, int length, string path, string meaning)
    {
        if (values is null)
        {
            throw new ModelValidationException(path, $"is required: {length} entries ({meaning})");
        }

        if (values.Length != length)
        {
            throw new ModelValidationException(path, $"has {values.Length} entries; expected {length} ({meaning})");
        }

        for (int i = 0; i < values.Length; i++)
        {
            if (!double.IsFinite(values[i]))
            {
                throw new ModelValidationException($"{path}[{i}]", "must be a finite number");
            }
        }
    }
}
