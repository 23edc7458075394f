namespace Lookahead.Api.Catalog;

/// <summary>Why a compile was refused; the metric label is <see cref="CompileRefusalLabels"/>.</summary>
public enum CompileRefusal
{
    /// <summary>The model alone is larger than a model may be (400).</summary>
    TooLarge,

    /// <summary>Compiles in flight claim the memory budget (503).</summary>
    MemoryBusy,

    /// <summary>Every slot is busy and the queue is full (503).</summary>
    QueueFull,

    /// <summary>The compile ran past its time budget and was cancelled (503).</summary>
    Timeout,
}

/// <summary>Stable metric labels of <see cref="CompileRefusal"/>.</summary>
public static class CompileRefusalLabels
{
    public static string Of(CompileRefusal reason) => reason switch
    {
        CompileRefusal.TooLarge => "too_large",
        CompileRefusal.MemoryBusy => "memory",
        CompileRefusal.QueueFull => "queue",
        _ => "timeout",
    };
}
