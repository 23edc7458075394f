using System.Net;
using Lookahead.Client.Tests.Support;
using Xunit;

namespace Lookahead.Client.Tests;

/// <summary>Models through the typed client: the weight unions survive the round trip, listing, deleting, the gain.</summary>
public class ClientModelTests
{
    [Fact]
    public async Task Matrix_weights_and_a_matrix_terminal_weight_read_back_as_matrices()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();

        var diagonal = await client.RegisterModelAsync(Models.DoubleIntegrator());
        var matrices = await client.RegisterModelAsync(Models.DoubleIntegratorWithMatrices());

        // The shape is part of the content: a diagonal and the equivalent matrix are different models.
        Assert.NotEqual(diagonal.Id, matrices.Id);

        var read = await client.GetModelAsync(matrices.Id);
        var output = Assert.IsType<MatrixWeight>(read.Document.Cost.OutputWeight);
        Assert.Equal([1.0, 0.0], output.Rows[0]);
        Assert.Equal([0.0, 0.1], output.Rows[1]);
        Assert.IsType<MatrixWeight>(read.Document.Cost.InputWeight);
        Assert.Equal([0.001], Assert.IsType<DiagonalWeight>(read.Document.Cost.InputRateWeight).Values);
        var terminal = Assert.IsType<MatrixTerminalWeight>(read.Document.Cost.TerminalWeight);
        Assert.Equal([0.5, 2.0], terminal.Rows[1]);

        // Registering the document read back gives the same id: nothing was lost or reshaped.
        Assert.Equal(matrices.Id, (await client.RegisterModelAsync(read.Document)).Id);

        var plain = await client.GetModelAsync(diagonal.Id);
        Assert.Equal([1.0, 0.1], Assert.IsType<DiagonalWeight>(plain.Document.Cost.OutputWeight).Values);
        Assert.Equal("riccati", Assert.IsType<NamedTerminalWeight>(plain.Document.Cost.TerminalWeight).Name);
        Assert.Equal([-1.0], plain.Document.Limits!.InputMin!.Select(v => v!.Value));
    }

    [Fact]
    public async Task Models_are_listed_page_by_page_and_deleted()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        string demo = await Demo.IdAsync(client);
        var first = await client.RegisterModelAsync(Models.DoubleIntegrator());
        var second = await client.RegisterModelAsync(Models.DoubleIntegratorWithMatrices());

        var page = await client.ListModelsAsync(offset: 0, limit: 2);
        Assert.Equal(3, page.Total);
        Assert.Equal(2, page.Items.Count);
        var all = new List<string>();
        await foreach (var model in client.ListAllModelsAsync(pageSize: 1))
        {
            all.Add(model.Id);
        }

        Assert.Equal([demo, first.Id, second.Id], all);

        await client.DeleteModelAsync(first.Id);
        var gone = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.GetModelAsync(first.Id));
        Assert.Equal(HttpStatusCode.NotFound, gone.Status);

        // The demo's alias holds its model: the refusal names the alias.
        var held = await Assert.ThrowsAsync<LookaheadProblemException>(() => client.DeleteModelAsync(demo));
        Assert.Equal(HttpStatusCode.Conflict, held.Status);
        Assert.Contains(Demo.Alias, held.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task The_gain_is_read_for_a_registered_model()
    {
        await using var service = new ServiceFactory();
        using var client = service.CreateLookaheadClient();
        var model = await client.RegisterModelAsync(Models.DoubleIntegrator());

        var gain = await client.GetGainAsync(model.Id);
        Assert.Single(gain.K);
        Assert.Equal(2, gain.K[0].Length);
        Assert.Equal(2, gain.ClosedLoopEigenvalues.Count);
        Assert.InRange(gain.SpectralRadius, 0.0, 1.0 - 1e-6);
    }
}
