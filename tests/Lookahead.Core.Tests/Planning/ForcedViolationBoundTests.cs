using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>
/// The interval bound on the soft-limit violation that the hard limits force decides when raising the penalty is
/// skipped, so it must never exceed the violation an optimal plan actually leaves (else a plan could be cut short).
/// </summary>
public class ForcedViolationBoundTests
{
    [Fact]
    public void TheBoundNeverExceedsTheViolationOfAPlanThatMinimisesIt()
    {
        // A penalty weight far above the automatic one makes the plan minimise the violation first (exact penalty),
        // so its violation is the least any plan within the hard limits can have: the bound must stay below it.
        var reference = WarmStartTests.ColdStore();
        var model = ModelCompiler.Compile(reference.Document, new CompileOptions { SoftLimitLinearWeight = 1e6 * reference.ConstrainedWithPrevious!.SoftLimits.AutomaticLinearWeight });
        var random = new Random(3);
        int tight = 0;
        for (int i = 0; i < 120; i++)
        {
            double[] state = [random.NextDouble() * 9 - 3, random.NextDouble() * 9 - 3, random.NextDouble() * 9 - 3];
            double[]? previous = i % 2 == 0 ? null : [random.NextDouble(), random.NextDouble(), random.NextDouble()];
            var plan = model.Plan(new PlanRequest(state, PreviousInput: previous));
            var variant = previous is null ? model.ConstrainedWithoutPrevious! : model.ConstrainedWithPrevious!;
            var relaxed = previous is null ? [] : variant.Rows.UnreachableFirstMoves(previous);
            double bound = variant.ForcedViolation!.Compute(state, previous ?? [], relaxed);

            Assert.True(bound <= plan.MaxOutputViolation + 1e-9, $"state {string.Join(", ", state)}: bound {bound:R} above the least violation {plan.MaxOutputViolation:R}");
            if (bound > 0 && bound >= 0.99 * plan.MaxOutputViolation)
            {
                tight++;
            }
        }

        // Some warm states are pinned against the hard limits, where the bound is the whole story.
        Assert.True(tight > 0, "the bound was never tight on these states");
    }
}
