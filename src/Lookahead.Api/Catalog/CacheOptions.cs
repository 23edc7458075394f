using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Catalog;

/// <summary>Compiled-model cache ("Cache" section). Entries are sized by the core's own estimate.</summary>
public sealed class CacheOptions
{
    public const string Section = "Cache";

    [Range(1024, long.MaxValue)]
    public long SizeLimitBytes { get; set; } = 512L * 1024 * 1024;
}
