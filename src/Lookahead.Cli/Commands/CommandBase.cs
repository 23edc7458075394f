using Lookahead.Client;
using Spectre.Console;
using Spectre.Console.Cli;

namespace Lookahead.Cli.Commands;

/// <summary>Shared by the commands: the host, the client, and one way of reporting a refusal.</summary>
public abstract class CommandBase<TSettings> : AsyncCommand<TSettings>
    where TSettings : ServiceSettings
{
    public override async Task<int> ExecuteAsync(CommandContext context, TSettings settings, CancellationToken cancellationToken)
    {
        var host = context.Data as CliHost ?? CliHost.ForConsole();
        using var client = host.CreateClient(settings);
        try
        {
            return await RunAsync(host.Console, client, settings, cancellationToken);
        }
        catch (LookaheadProblemException problem)
        {
            Problems.Write(host.Console, problem);
            return ExitCodes.Refused;
        }
        catch (CliInputException bad)
        {
            host.Console.MarkupLineInterpolated($"[red]error:[/] {bad.Message}");
            return ExitCodes.BadInput;
        }
        catch (HttpRequestException unreachable)
        {
            host.Console.MarkupLineInterpolated($"[red]error:[/] the service at {settings.Service} could not be reached: {unreachable.Message}");
            return ExitCodes.Refused;
        }
    }

    protected abstract Task<int> RunAsync(IAnsiConsole console, LookaheadClient client, TSettings settings, CancellationToken cancellationToken);
}

/// <summary>A mistake in the command line or a local file, said in one sentence.</summary>
public sealed class CliInputException : Exception
{
    public CliInputException()
    {
    }

    public CliInputException(string message)
        : base(message)
    {
    }

    public CliInputException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
