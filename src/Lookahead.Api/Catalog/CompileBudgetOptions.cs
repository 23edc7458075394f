using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Catalog;

/// <summary>
/// Budgets for compiling models ("Compile" section): how many compile at once, how many may wait, how much memory the
/// compiles in flight may claim by the core's estimate, and how long one may run.
/// </summary>
public sealed class CompileBudgetOptions : IValidatableObject
{
    public const string Section = "Compile";

    /// <summary>Compiles running at the same time; 0 means one per processor but one (at least one).</summary>
    [Range(0, 1024)]
    public int MaxConcurrent { get; set; }

    /// <summary>Compiles that may wait for a free slot; one more is refused with 503 and Retry-After.</summary>
    [Range(0, 100_000)]
    public int QueueLimit { get; set; } = 16;

    /// <summary>Seconds one compile may run (waiting in the queue not counted) before it is cancelled.</summary>
    [Range(1, 3600)]
    public int TimeoutSeconds { get; set; } = 30;

    /// <summary>Largest estimated size of one compiled model; a larger model is refused with 400 at registration.</summary>
    [Range(1024, long.MaxValue)]
    public long MaxModelBytes { get; set; } = 1024L * 1024 * 1024;

    /// <summary>Sum of the estimates of compiles in flight (running or queued); beyond it a compile is refused with 503.</summary>
    [Range(1024, long.MaxValue)]
    public long MemoryBudgetBytes { get; set; } = 2048L * 1024 * 1024;

    /// <summary>Registrations parsed and checked at once, before compiling (0: one per processor but one, at least one).</summary>
    [Range(0, 1024)]
    public int IntakeConcurrency { get; set; }

    /// <summary>The turns <see cref="IntakeConcurrency"/> stands for on this machine.</summary>
    public int EffectiveIntakeConcurrency => IntakeConcurrency > 0 ? IntakeConcurrency : Math.Max(1, Environment.ProcessorCount - 1);

    /// <summary>The slots <see cref="MaxConcurrent"/> stands for on this machine.</summary>
    /// <remarks>
    /// One processor is left to plans by default: compiles run at lower priority, but with every core compiling, small
    /// plans' p99 sat at the 5 ms goal on two cores (4.8–5.3 ms in the compile-load script), and with one core left
    /// it was 3.0 ms.
    /// </remarks>
    public int EffectiveConcurrency => MaxConcurrent > 0 ? MaxConcurrent : Math.Max(1, Environment.ProcessorCount - 1);

    public IEnumerable<ValidationResult> Validate(ValidationContext validationContext)
    {
        if (MaxModelBytes > MemoryBudgetBytes)
        {
            // Otherwise a model admitted by size could never find room and would be refused as "busy" forever.
            yield return new ValidationResult("Compile:MaxModelBytes must not exceed Compile:MemoryBudgetBytes.", [nameof(MaxModelBytes), nameof(MemoryBudgetBytes)]);
        }
    }
}
