using Lookahead.Api.Catalog;
using Lookahead.Api.Http;
using Lookahead.Api.Storage;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;

namespace Lookahead.Api.Models;

/// <summary>Compiled models to the wire: registration answer, dimensions, diagnostics, the discretised plant and the gain.</summary>
public static class ModelResponses
{
    public static ModelDimensions Dimensions(CompiledModel model) =>
        new(model.StateCount, model.InputCount, model.OutputCount, model.Horizon, model.DecisionVariables);

    public static ModelDimensions Dimensions(int n, int m, int p, int horizon) => new(n, m, p, horizon, horizon * m);

    public static DiagnosticsDto Diagnostics(CompiledModel model) => Diagnostics(model.Diagnostics) with
    {
        Estimator = model.Estimator is { } e
            ? new EstimatorDiagnosticsDto(e.DisturbanceModel.ToString().ToLowerInvariant(), e.DisturbanceCount, e.SpectralRadius, e.Eigenvalues.Select(z => new ComplexDto(z.Real, z.Imaginary)).ToArray())
            : null,
    };

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

    private static bool IsContinuous(CompiledModel model) => model.Document.Plant.TimeDomain == TimeDomain.Continuous;

    public static GainResponse Gain(string id, CompiledModel model) => new(
        id,
        model.Gain.K,
        model.Gain.ClosedLoopEigenvalues.Select(z => new ComplexDto(z.Real, z.Imaginary)).ToArray(),
        model.Gain.SpectralRadius);

    public static ModelRegistrationResponse Registration(string id, CompiledModel model, bool created)
    {
        bool continuous = IsContinuous(model);
        return new ModelRegistrationResponse(
            id,
            model.Document.Name,
            created,
            Dimensions(model),
            model.SampleTime,
            ModelDocumentMapping.TimeDomainName(model.Document.Plant.TimeDomain),
            continuous ? model.DiscreteA : null,
            continuous ? model.DiscreteB : null,
            Diagnostics(model),
            WarningText.ToDtos(model.Diagnostics.Warnings));
    }

    public static ModelDetailsResponse Details(string id, (StoredModel Stored, CanonicalModel Canonical) stored, CompiledModel model)
    {
        bool continuous = IsContinuous(model);
        return new ModelDetailsResponse(
            id,
            stored.Stored.Summary.RegisteredAt,
            stored.Canonical.Dto,
            Dimensions(model),
            continuous ? model.DiscreteA : null,
            continuous ? model.DiscreteB : null,
            Diagnostics(model),
            WarningText.ToDtos(model.Diagnostics.Warnings));
    }
}
