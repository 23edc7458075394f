using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Catalog;

/// <summary>Compiled-model cache ("Cache" section). Entries are sized by the core's own estimate.</summary>
public sealed class CacheOptions
{
    public const string Section = "Cache";

    [Range(1024, long.MaxValue)]
    public long SizeLimitBytes { get; set; } = 512L * 1024 * 1024;

    /// <summary>
    /// Seconds a plan by alias uses the alias's last resolution without reading the store (0: read on every plan).
    /// Bounds how late a re-pointing done on another instance takes effect here; during a store outage the last
    /// resolution is used regardless.
    /// </summary>
    [Range(0, 3600)]
    public int AliasSeconds { get; set; } = 5;

    /// <summary>
    /// Seconds a compiled model is planned with before the store is asked again whether it is still registered (0: on
    /// every plan). Bounds how late a delete done on another instance takes effect here; during a store outage the
    /// compiled model keeps planning.
    /// </summary>
    [Range(0, 3600)]
    public int ModelSeconds { get; set; } = 5;
}
