using Lookahead.Api.Http;
using Lookahead.Api.Tests.Support;
using Lookahead.Core.Planning;
using Xunit;

namespace Lookahead.Api.Tests.Contract;

/// <summary>The document says which members a request needs and an answer always has, and lists every closed set.</summary>
public class OpenApiRequiredAndClosedSetsTests
{
    [Fact]
    public async Task Request_members_the_service_refuses_to_go_without_are_required()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);

        Assert.Equal(["a", "b", "sampleTime", "timeDomain"], ServedDocument.Strings(ServedDocument.Schema(document, "PlantDto")["required"]).Order());
        Assert.Equal(["cost", "plant"], ServedDocument.Strings(ServedDocument.Schema(document, "ModelDocumentDto")["required"]).Order());
        Assert.Contains("horizon", ServedDocument.Strings(ServedDocument.Schema(document, "CostDto")["required"]));
        Assert.Equal(["initialState", "steps"], ServedDocument.Strings(ServedDocument.Schema(document, "SimulationRequestDto")["required"]).Order());
        Assert.Equal(["sequence"], ServedDocument.Strings(ServedDocument.Schema(document, "StationStepRequest")["required"]));

        // Optional members stay optional.
        Assert.DoesNotContain("c", ServedDocument.Strings(ServedDocument.Schema(document, "PlantDto")["required"]));
    }

    [Fact]
    public async Task Answer_members_the_service_always_writes_are_required_and_the_ones_it_may_leave_out_are_not()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);

        var plan = ServedDocument.Strings(ServedDocument.Schema(document, "PlanResponse")["required"]);
        Assert.Contains("status", plan);
        Assert.Contains("inputs", plan);
        Assert.Contains("warnings", plan);
        Assert.DoesNotContain("alias", plan);

        var step = ServedDocument.Strings(ServedDocument.Schema(document, "StationStepResponse")["required"]);
        Assert.Contains("sequence", step);
        Assert.DoesNotContain("firstMove", step);
    }

    [Fact]
    public async Task Closed_sets_are_enums_with_exactly_the_values_the_service_writes()
    {
        await using var factory = new LookaheadFactory();
        var document = await ServedDocument.ReadAsync(factory);
        IReadOnlyList<string> EnumOf(string schema, string member) => ServedDocument.Strings(ServedDocument.Schema(document, schema)["properties"]![member]!["enum"]);

        Assert.Equal(["discrete", "continuous"], EnumOf("PlantDto", "timeDomain"));
        Assert.Equal(Enum.GetValues<PlanStatus>().Select(WireNames.Status), EnumOf("PlanResponse", "status"));
        Assert.Equal([.. Enum.GetValues<WarningCode>().Select(WireNames.Warning), "detail-after-requests"], EnumOf("WarningDto", "code"));
        Assert.Equal(Enum.GetValues<LimitKind>().Select(WireNames.Limit), EnumOf("ActiveLimitDto", "kind"));
        Assert.Equal(["first-move", "full"], EnumOf("ReplayRequest", "detail"));
        Assert.Equal(["first-move", "full"], EnumOf("StationRequest", "detail"));
        Assert.Equal(["auto", "track"], EnumOf("StationStepRequest", "mode"));
        Assert.Contains("tracking", EnumOf("StationStepResponse", "status"));
        Assert.Contains("error", EnumOf("ReplayRowResult", "status"));
        Assert.Equal(["output", "input", "none"], EnumOf("EstimatorDto", "disturbanceModel"));
        Assert.Equal(["state", "estimate"], EnumOf("SimulationRequestDto", "feedback"));

        var operations = ServedDocument.Operations(document).ToDictionary(o => o.Operation["operationId"]!.GetValue<string>(), o => o.Operation);
        IReadOnlyList<string> QueryEnum(string operation, string name) => ServedDocument.Strings(
            operations[operation]["parameters"]!.AsArray().Single(p => p!["name"]!.GetValue<string>() == name)!["schema"]!["enum"]);
        Assert.Equal(["json", "svg", "csv"], QueryEnum("PlanForModel", "format"));
        Assert.Equal(["json", "svg", "csv"], QueryEnum("SimulateModel", "format"));
        Assert.Equal(["first-move", "full"], QueryEnum("ReplayPlans", "detail"));
        Assert.Equal(["json", "csv"], QueryEnum("GetStationSteps", "format"));
    }
}
