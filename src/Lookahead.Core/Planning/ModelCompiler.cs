using Lookahead.Core.Models;
using Lookahead.Core.Numerics;
using Lookahead.Core.Validation;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Planning;

/// <summary>Validates, discretises, condenses and factorises a model once, producing an immutable <see cref="CompiledModel"/>.</summary>
public static class ModelCompiler
{
    /// <summary>Compiles <paramref name="document"/>.</summary>
    /// <exception cref="ModelValidationException">The document is invalid, or the requested terminal weight does not exist.</exception>
    public static CompiledModel Compile(ModelDocument document, CompileOptions? options = null)
    {
        options ??= CompileOptions.Default;
        var model = ModelValidator.Build(document, options.SizeLimits);
        int n = model.StateCount;
        var a = model.A;
        var b = model.B;
        if (model.TimeDomain == TimeDomain.Continuous)
        {
            try
            {
                (a, b) = ZeroOrderHold.Discretise(a, b, model.SampleTime);
            }
            catch (ArgumentException ex)
            {
                throw new ModelValidationException("plant", $"cannot be discretised at this sample time: {ex.Message}");
            }
        }

        var qx = model.C.TransposeThisAndMultiply(model.OutputWeight * model.C);
        qx = (qx + qx.Transpose()) * 0.5;
        var warnings = new List<Warning>();

        RiccatiSolution? riccati = null;
        Matrix<double> terminal;
        switch (model.TerminalKind)
        {
            case TerminalWeightKind.Riccati:
                try
                {
                    riccati = DiscreteRiccati.Solve(a, b, qx, model.InputWeight);
                }
                catch (RiccatiException ex)
                {
                    throw new ModelValidationException("cost.terminalWeight", $"'riccati' is not available for this plant: {ex.Message}. Use 'stage' or an explicit matrix");
                }

                terminal = riccati.P;
                break;
            case TerminalWeightKind.Stage:
                terminal = qx;
                break;
            default:
                terminal = model.TerminalMatrix!;
                break;
        }

        bool hasRateWeight = model.InputRateWeight.Enumerate().Any(v => v != 0);
        var withoutPrevious = BuildGains(model, a, b, terminal, withPreviousInput: false);
        var withPrevious = hasRateWeight ? BuildGains(model, a, b, terminal, withPreviousInput: true) : withoutPrevious;
        var targets = TargetMap.Build(a, b, model.C, model.OutputWeight);
        ConstrainedProblem? constrainedWithout = null;
        ConstrainedProblem? constrainedWith = null;
        TargetSolver? targetSolver = null;
        if (model.Limits.Any)
        {
            long entries = ConstrainedProblem.OutputRowEntries(model);
            if (entries > ConstrainedProblem.MaxOutputRowEntries)
            {
                throw new ModelValidationException("limits", $"soft output limits over this horizon need {entries:N0} coefficients; at most {ConstrainedProblem.MaxOutputRowEntries:N0} are allowed — limit fewer outputs or shorten the horizon");
            }

            constrainedWithout = new ConstrainedProblem(model, a, b, withoutPrevious);
            constrainedWith = ReferenceEquals(withPrevious, withoutPrevious) ? constrainedWithout : new ConstrainedProblem(model, a, b, withPrevious);
            if (model.Limits.HasInputBounds)
            {
                targetSolver = new TargetSolver(a, b, model.C, model.OutputWeight, model.Limits);
            }
        }

        // Diagnostics: what an engineer should read before closing the loop.
        int rank = SystemProperties.ControllabilityRank(a, b);
        var stabilisable = SystemProperties.Stabilisable(a, b);
        var detectable = SystemProperties.Detectable(a, qx);
        double openLoopRadius = SystemProperties.SpectralRadius(a);
        var gainRows = Matrix<double>.Build.Dense(model.InputCount, n, (i, j) => withoutPrevious.Kx[(j * model.Horizon * model.InputCount) + i]);
        var closedLoop = SystemProperties.Eigenvalues(a - (b * gainRows));
        double closedLoopRadius = closedLoop.Select(z => z.Magnitude).DefaultIfEmpty(0).Max();
        double condition = HessianCondition.Compute(withoutPrevious.Hessian, withoutPrevious.Factor);

        if (closedLoopRadius >= 1)
        {
            warnings.Add(new Warning(WarningCode.ClosedLoopUnstable) { Amount = closedLoopRadius });
        }

        if (!stabilisable.Holds)
        {
            warnings.Add(new Warning(WarningCode.NotStabilisable) { Eigenvalue = stabilisable.Witness });
        }
        else if (rank < n)
        {
            warnings.Add(new Warning(WarningCode.NotControllable) { Count = rank });
        }

        if (!detectable.Holds)
        {
            warnings.Add(new Warning(WarningCode.ModeUnseenByCost) { Eigenvalue = detectable.Witness });
        }

        if (condition > options.IllConditionedThreshold)
        {
            warnings.Add(new Warning(WarningCode.HessianIllConditioned) { Amount = condition });
        }

        var diagnostics = new ModelDiagnostics(rank, rank == n, stabilisable.Holds, detectable.Holds, openLoopRadius, riccati?.RelativeResidual, riccati?.Iterations, condition, closedLoopRadius, warnings);
        var gain = new RecedingHorizonGain(DenseMatrix.Rows(gainRows), closedLoop, closedLoopRadius);
        return new CompiledModel(model, a, b, terminal, withoutPrevious, withPrevious, constrainedWithout, constrainedWith, targets, targetSolver, diagnostics, gain, options);
    }

    private static GainSet BuildGains(ValidatedModel model, Matrix<double> a, Matrix<double> b, Matrix<double> terminal, bool withPreviousInput)
    {
        var condensed = Condensing.Build(a, b, model.C, model.OutputWeight, model.InputWeight, model.InputRateWeight, terminal, model.Horizon, withPreviousInput);
        if (!DenseMatrix.AllFinite(condensed.Hessian) || !DenseMatrix.AllFinite(condensed.Fx))
        {
            throw new ModelValidationException("cost.horizon", "the predictions overflow over this horizon: the plant grows too fast for condensing; shorten the horizon or pre-stabilise the plant");
        }

        var cholesky = condensed.Hessian.Cholesky();
        var maps = condensed.Fx.Append(condensed.Fr).Append(condensed.Fxs).Append(condensed.Fus).Append(condensed.Fup);
        var gains = cholesky.Solve(maps);
        int n = a.RowCount;
        int m = b.ColumnCount;
        int p = model.C.RowCount;
        double[] Columns(int from, int count) => DenseMatrix.ColumnMajor(gains.SubMatrix(0, gains.RowCount, from, count));
        return new GainSet(
            condensed.Hessian,
            new CholeskyFactor(cholesky),
            Columns(0, n),
            Columns(n, p),
            Columns(n + p, n),
            Columns(n + p + n, m),
            Columns(n + p + n + m, m),
            new CostForm(condensed.FreeCost, maps, gains, n, m, p));
    }
}
