namespace Lookahead.Api.Stations;

/// <summary>
/// The station events worth a line of their own; each carries the station's name as a property, so a plant's log
/// search by station finds them. Every step's request log line also carries it (through the diagnostic context).
/// </summary>
public sealed partial class StationLog(ILogger<StationLog> logger)
{
    [LoggerMessage(Level = LogLevel.Debug, Message = "Station {Station} stepped to sequence {Sequence} ({Mode}, {Status}) with model {ModelId}")]
    public partial void Stepped(string station, long sequence, string mode, string status, string modelId);

    [LoggerMessage(Level = LogLevel.Information, Message = "Station {Station} refused a step with sequence {Given}; it is at {Current}")]
    public partial void Conflict(string station, long given, long current);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Station {Station} started its estimate over after {MissedSamples} missed samples")]
    public partial void RestartedAfterGap(string station, int missedSamples);

    [LoggerMessage(Level = LogLevel.Information, Message = "Station {Station} follows alias {Alias} from model {From} to {To}; estimate {Carried}")]
    public partial void ModelChanged(string station, string alias, string from, string to, string carried);

    [LoggerMessage(Level = LogLevel.Warning, Message = "Station {Station} is bound to alias {Alias}, which no longer exists; stepping with model {ModelId}")]
    public partial void AliasGone(string station, string alias, string modelId);
}
