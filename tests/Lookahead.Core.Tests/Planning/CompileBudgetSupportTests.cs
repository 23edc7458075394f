using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Tests.Support;
using Xunit;

namespace Lookahead.Core.Tests.Planning;

/// <summary>What the service's compile budgets rely on from the core: a size estimate before compiling and a cancellable compile.</summary>
public class CompileBudgetSupportTests
{
    public static TheoryData<string, int, int, int, bool, string> Cases() => new()
    {
        // label, n, m, N, rate weight, limits: none | input | rate | soft
        { "small, no limits", 3, 3, 30, false, "none" },
        { "rate weight, no limits", 12, 3, 30, true, "none" },
        { "long horizon", 4, 2, 100, true, "none" },
        { "input bounds", 4, 2, 50, true, "input" },
        { "rate bounds", 6, 2, 40, true, "rate" },
        { "soft output limits", 5, 2, 30, false, "soft" },
    };

    [Theory]
    [MemberData(nameof(Cases))]
    public void The_estimate_from_the_document_covers_what_the_compiled_model_accounts_and_not_much_more(string label, int n, int m, int horizon, bool rateWeight, string limits)
    {
        var document = Document(n, m, horizon, rateWeight, limits);

        long estimate = CompiledSizeEstimate.Bytes(document);
        long accounted = ModelCompiler.Compile(document).EstimatedBytes;

        // The estimate adds the small matrices (11·n² doubles) and, under soft limits, the second factor, which the
        // compiled model's own count leaves out; beyond those it must stay within 10 % of it.
        Assert.True(estimate >= accounted * 0.98, $"{label}: estimate {estimate:N0} below the {accounted:N0} bytes the model accounts");
        long extras = (8L * 11 * n * n) + (limits == "soft" ? 2L * 8 * ((horizon * m) + n) * ((horizon * m) + n) : 0);
        Assert.True(estimate <= (accounted * 1.1) + extras, $"{label}: estimate {estimate:N0} far above the {accounted:N0} bytes the model accounts");
    }

    [Fact]
    public void The_estimate_grows_with_the_horizon_squared_without_compiling()
    {
        long shorter = CompiledSizeEstimate.Bytes(Document(4, 1, 50, true, "none"));
        long longer = CompiledSizeEstimate.Bytes(Document(4, 1, 200, true, "none"));

        // V = N·m dominates: four times the horizon is about sixteen times the bytes.
        Assert.InRange((double)longer / shorter, 12, 17);
    }

    [Fact]
    public void A_cancelled_token_stops_the_compile()
    {
        using var cancelled = new CancellationTokenSource();
        cancelled.Cancel();

        Assert.ThrowsAny<OperationCanceledException>(() => ModelCompiler.Compile(Document(4, 2, 50, true, "input"), null, cancelled.Token));
    }

    [Fact]
    public void A_token_that_is_never_cancelled_compiles_the_same_model()
    {
        var document = Document(4, 2, 50, true, "input");
        using var live = new CancellationTokenSource();

        var plain = ModelCompiler.Compile(document);
        var withToken = ModelCompiler.Compile(document, null, live.Token);

        var request = new PlanRequest(TestModels.RandomVector(new Random(3), 4), null, [0.2, -0.1]);
        Assert.Equal(plain.EstimatedBytes, withToken.EstimatedBytes);
        Assert.Equal(plain.Plan(request).Inputs, withToken.Plan(request).Inputs);
    }

    private static ModelDocument Document(int n, int m, int horizon, bool rateWeight, string limits)
    {
        var (a, b) = TestModels.Random(new Random(n * 1000 + m), n, m, 0.9);
        LimitsSpec? spec = limits switch
        {
            "input" => new LimitsSpec(InputMin: Bounds(m, -1), InputMax: Bounds(m, 1)),
            "rate" => new LimitsSpec(InputRateMin: Bounds(m, -0.1), InputRateMax: Bounds(m, 0.1)),
            "soft" => new LimitsSpec(OutputMax: [.. Bounds(1, 1), .. new double?[n - 1]], OutputViolationWeight: TestModels.Ones(n)),
            _ => null,
        };
        return TestModels.Discrete(a, b, horizon, TestModels.Ones(n), Enumerable.Repeat(0.1, m).ToArray(), s: rateWeight ? Enumerable.Repeat(0.1, m).ToArray() : null, limits: spec);
    }

    private static double?[] Bounds(int count, double value) => Enumerable.Repeat<double?>(value, count).ToArray();
}
