using Lookahead.Core.Validation;

namespace Lookahead.Core.Planning;

/// <summary>Settings for <see cref="ModelCompiler"/>.</summary>
public sealed record CompileOptions
{
    public SizeLimits SizeLimits { get; init; } = SizeLimits.Default;

    /// <summary>Active-set iteration cap per limited plan; null means max(50, 2 × limit rows) (see <see cref="CompiledModel.MaxSolverIterations"/>).</summary>
    public int? MaxSolverIterations { get; init; }

    /// <summary>
    /// Linear soft-limit weight ρ (the same for every output). Null: chosen automatically and raised while a
    /// violation still shrinks (see <see cref="ConstrainedProblem"/>); set it only to reproduce a reference solution.
    /// </summary>
    public double? SoftLimitLinearWeight { get; init; }

    /// <summary>Condition number above which the Hessian is reported as ill-conditioned: beyond 1e10 a plan keeps fewer than six of double's sixteen digits.</summary>
    public double IllConditionedThreshold { get; init; } = 1e10;

    /// <summary>
    /// Cache the stacked-preview maps when they fit (<see cref="PreviewMaps.Fits"/>); false answers every preview by
    /// the Newton step, which tests use to hold the two paths to the same references.
    /// </summary>
    public bool CachePreviewMaps { get; init; } = true;

    /// <summary>
    /// Limit rows up to which cold plans go to the range-space active set rather than the interior point
    /// (<see cref="ModelCompiler.RangeSpaceRowsUpTo"/>); the benchmarks move it to compare the two on one model.
    /// </summary>
    internal int RangeSpaceRowsUpTo { get; init; } = ModelCompiler.RangeSpaceRowsUpTo;

    public static CompileOptions Default { get; } = new();
}
