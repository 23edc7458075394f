namespace Lookahead.Client;

/// <summary>The answer to a registration. <see cref="Created"/> is false when the content was already registered (same id).</summary>
public sealed record ModelRegistration(
    string Id,
    string? Name,
    bool Created,
    ModelDimensions Dimensions,
    double SampleTime,
    string TimeDomain,
    double[][]? DiscreteA,
    double[][]? DiscreteB,
    ModelDiagnostics Diagnostics,
    IReadOnlyList<ServiceWarning> Warnings);

/// <summary>A registered model: the stored (canonical) document and what compiling it revealed.</summary>
public sealed record ModelDetails(
    string Id,
    DateTimeOffset RegisteredAt,
    ModelDocument Document,
    ModelDimensions Dimensions,
    double[][]? DiscreteA,
    double[][]? DiscreteB,
    ModelDiagnostics Diagnostics,
    IReadOnlyList<ServiceWarning> Warnings);

/// <summary>n states, m inputs, p outputs, horizon N and the N·m decision variables of each plan.</summary>
public sealed record ModelDimensions(int N, int M, int P, int Horizon, int DecisionVariables);

public sealed record ModelDiagnostics(
    int ControllabilityRank,
    bool Controllable,
    bool Stabilisable,
    bool Detectable,
    double? OpenLoopSpectralRadius,
    double? RiccatiResidual,
    int? RiccatiIterations,
    double? HessianCondition,
    double? ClosedLoopSpectralRadius,
    EstimatorDiagnostics? Estimator);

public sealed record EstimatorDiagnostics(string DisturbanceModel, int DisturbanceCount, double SpectralRadius, IReadOnlyList<ComplexNumber> Eigenvalues);

/// <summary>One page of the model listing, in registration order.</summary>
public sealed record ModelPage(IReadOnlyList<ModelSummary> Items, int Offset, int Limit, long Total);

public sealed record ModelSummary(string Id, string? Name, ModelDimensions Dimensions, DateTimeOffset RegisteredAt);

/// <summary>
/// A warning: a stable <see cref="Code"/> for programs (alarm on it, not on the sentence), a sentence for people,
/// and the numbers it is about where they apply.
/// </summary>
public sealed record ServiceWarning(
    string Code,
    string Message,
    int? Input = null,
    int? Output = null,
    int? Step = null,
    string? Limit = null,
    double? Amount = null,
    int? Count = null,
    ComplexNumber? Eigenvalue = null);

public sealed record ComplexNumber(double Re, double Im);
