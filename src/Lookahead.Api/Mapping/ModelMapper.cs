using Lookahead.Api.Contracts;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Mapping;

/// <summary>Compiled models to the wire: dimensions, diagnostics, the discretised plant and the gain.</summary>
public static class ModelMapper
{
    public static ModelDimensions Dimensions(CompiledModel model) =>
        new(model.StateCount, model.InputCount, model.OutputCount, model.Horizon, model.DecisionVariables);

    public static ModelDimensions Dimensions(int n, int m, int p, int horizon) => new(n, m, p, horizon, horizon * m);

    public static DiagnosticsDto Diagnostics(ModelDiagnostics d) => new(
        d.ControllabilityRank,
        d.Controllable,
        d.Stabilisable,
        d.Detectable,
        Rows.Finite(d.OpenLoopSpectralRadius),
        d.RiccatiResidual is double r ? Rows.Finite(r) : null,
        d.RiccatiIterations,
        Rows.Finite(d.HessianCondition),
        Rows.Finite(d.ClosedLoopSpectralRadius));

    public static bool IsContinuous(CompiledModel model) => model.Document.Plant.TimeDomain == TimeDomain.Continuous;

    public static GainResponse Gain(string id, CompiledModel model) => new(
        id,
        model.Gain.K,
        model.Gain.ClosedLoopEigenvalues.Select(z => new ComplexDto(z.Real, z.Imaginary)).ToArray(),
        model.Gain.SpectralRadius);
}
