using Microsoft.Extensions.Options;

namespace Lookahead.Api.Catalog;

/// <summary>
/// Turns for the CPU-bound first half of a registration: parsing the document, checking it and forming its canonical
/// form and hash — for a large model hundreds of kilobytes of numbers, before any compile budget applies. A burst of
/// such uploads arriving together would otherwise fill the thread pool's queue ahead of small plans (measured: a plan
/// waited 0.84 s at the start of 20 concurrent registrations). Only <see cref="CompileBudgetOptions.IntakeConcurrency"/>
/// registrations take that step at once; the others wait without a thread. Bodies are received before a turn is taken,
/// so a slow upload holds none.
/// </summary>
public sealed class RegistrationIntake : IDisposable
{
    private readonly SemaphoreSlim turns;

    public RegistrationIntake(IOptions<CompileBudgetOptions> options)
    {
        int count = options.Value.EffectiveIntakeConcurrency;
        turns = new SemaphoreSlim(count, count);
    }

    /// <summary>Waits for a turn; disposing the result gives it back.</summary>
    public async Task<IDisposable> EnterAsync(CancellationToken cancellationToken)
    {
        await turns.WaitAsync(cancellationToken);
        return new Turn(turns);
    }

    public void Dispose() => turns.Dispose();

    private sealed class Turn(SemaphoreSlim turns) : IDisposable
    {
        private int released;

        public void Dispose()
        {
            if (Interlocked.Exchange(ref released, 1) == 0)
            {
                turns.Release();
            }
        }
    }
}
