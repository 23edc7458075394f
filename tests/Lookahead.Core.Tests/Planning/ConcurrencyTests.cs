using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

public class ConcurrencyTests
{
    // One compiled model shared by many stations: plans computed at once on many threads must equal the same
    // plans computed one by one (no shared mutable state, pooled workspaces never shared).
    [Fact]
    public void ParallelPlansOnOneModelEqualSequentialPlans()
    {
        var random = new Random(5);
        var (a, b) = TestModels.Random(random, 6, 2, 1.1);
        var limits = new LimitsSpec(InputMin: [-0.3, -0.3], InputMax: [0.3, 0.3], InputRateMin: [-0.1, -0.1], InputRateMax: [0.1, 0.1], OutputMax: [0.5, null, null, null, null, null], OutputViolationWeight: [10, 0, 0, 0, 0, 0]);
        var model = ModelCompiler.Compile(TestModels.Discrete(a, b, 15, TestModels.Ones(6), [0.1, 0.1], limits: limits, s: [0.5, 0.5]));
        var requests = Enumerable.Range(0, 400).Select(i => new PlanRequest(
            TestModels.RandomVector(random, 6, 2),
            i % 3 == 0 ? TestModels.RandomVector(random, 6, 0.2) : null,
            i % 2 == 0 ? [0.05, -0.05] : null)).ToArray();
        var sequential = requests.Select(r => model.Plan(r)).ToArray();
        var parallel = new Plan[requests.Length];
        Parallel.For(0, requests.Length, new ParallelOptions { MaxDegreeOfParallelism = 8 }, i => parallel[i] = model.Plan(requests[i]));
        for (int i = 0; i < requests.Length; i++)
        {
            Assert.Equal(sequential[i].Inputs, parallel[i].Inputs);
            Assert.Equal(sequential[i].Cost, parallel[i].Cost);
            Assert.Equal(sequential[i].Status, parallel[i].Status);
        }

        Assert.Contains(sequential, p => p.ActiveLimits.Count > 0);
    }
}
