using Lookahead.Api.Catalog;
using Microsoft.Extensions.Options;
using Xunit;

namespace Lookahead.Api.Tests;

/// <summary>
/// The turns registrations take to parse and check their documents: no more at once than configured, a waiting
/// registration whose client leaves gives up its place, and a turn given back twice frees one turn only.
/// </summary>
public class RegistrationIntakeTests
{
    [Fact]
    public async Task A_second_registration_waits_for_the_only_turn_and_takes_it_when_given_back()
    {
        using var intake = new RegistrationIntake(Options.Create(new CompileBudgetOptions { IntakeConcurrency = 1 }));
        var first = await intake.EnterAsync(CancellationToken.None);

        var second = intake.EnterAsync(CancellationToken.None);
        await Task.Delay(50);
        Assert.False(second.IsCompleted);

        first.Dispose();
        (await second.WaitAsync(TimeSpan.FromSeconds(10))).Dispose();
    }

    [Fact]
    public async Task A_waiting_registration_whose_client_leaves_is_cancelled_and_takes_no_turn()
    {
        using var intake = new RegistrationIntake(Options.Create(new CompileBudgetOptions { IntakeConcurrency = 1 }));
        var first = await intake.EnterAsync(CancellationToken.None);
        using var leaving = new CancellationTokenSource();

        var waiting = intake.EnterAsync(leaving.Token);
        await leaving.CancelAsync();
        await Assert.ThrowsAnyAsync<OperationCanceledException>(() => waiting);

        first.Dispose();
        (await intake.EnterAsync(CancellationToken.None).WaitAsync(TimeSpan.FromSeconds(10))).Dispose();
    }

    [Fact]
    public async Task A_turn_given_back_twice_frees_one_turn_only()
    {
        using var intake = new RegistrationIntake(Options.Create(new CompileBudgetOptions { IntakeConcurrency = 1 }));
        var turn = await intake.EnterAsync(CancellationToken.None);
        turn.Dispose();
        turn.Dispose();

        var taken = await intake.EnterAsync(CancellationToken.None);
        var next = intake.EnterAsync(CancellationToken.None);
        await Task.Delay(50);
        Assert.False(next.IsCompleted);
        taken.Dispose();
        (await next.WaitAsync(TimeSpan.FromSeconds(10))).Dispose();
    }
}
