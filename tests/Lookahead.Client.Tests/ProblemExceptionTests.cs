using System.Net;
using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests;

/// <summary>Refusals become <see cref="LookaheadProblemException"/> with the problem document's members and field paths.</summary>
public class ProblemExceptionTests
{
    [Fact]
    public async Task A_weight_of_the_wrong_length_is_thrown_with_its_field_path_type_and_trace()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        var model = Models.DoubleIntegrator() with
        {
            Cost = Models.DoubleIntegrator().Cost with { InputWeight = Weight.Diagonal(0.01, 0.02) },
        };

        var problem = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.RegisterModelAsync(model));
        Assert.Equal(HttpStatusCode.BadRequest, problem.Status);
        Assert.Equal("urn:lookahead:problem:validation", problem.Type);
        Assert.False(string.IsNullOrEmpty(problem.TraceId));
        Assert.False(string.IsNullOrEmpty(problem.Title));
        var error = Assert.Single(problem.Errors, e => e.Path.StartsWith("cost.inputWeight", StringComparison.Ordinal));
        Assert.False(string.IsNullOrEmpty(error.Reason));
        Assert.Contains("cost.inputWeight", problem.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task An_unknown_field_in_a_document_sent_as_written_is_named_by_its_path()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        const string json = """
            {"plant":{"a":[[1]],"b":[[1]],"sampleTime":1,"timeDomain":"discrete"},
             "cost":{"horizn":5,"outputWeight":[1],"inputWeight":[1]}}
            """;

        var problem = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.RegisterModelJsonAsync(json));
        Assert.Equal(HttpStatusCode.BadRequest, problem.Status);
        Assert.Contains(problem.Errors, e => e.Path == "cost.horizn");
    }

    [Fact]
    public async Task A_state_of_the_wrong_length_names_state_and_a_missing_model_is_404()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        var model = await client.RegisterModelAsync(Models.DoubleIntegrator());

        var wrong = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.PlanAsync(model.Id, new PlanRequest { State = [1.0, 2.0, 3.0] }));
        Assert.Equal(HttpStatusCode.BadRequest, wrong.Status);
        Assert.Contains(wrong.Errors, e => e.Path == "state");

        var missing = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.PlanAsync(new string('a', 64), new PlanRequest { State = [1.0, 2.0] }));
        Assert.Equal(HttpStatusCode.NotFound, missing.Status);
        Assert.False(string.IsNullOrEmpty(missing.TraceId));
    }
}
