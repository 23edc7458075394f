using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Storage;

/// <summary>Where registered models and aliases are kept ("Store" section).</summary>
public sealed class StoreOptions
{
    public const string Section = "Store";

    /// <summary>"sqlite" (default, one file next to the service) or "postgres" (shared by several instances).</summary>
    [Required]
    [RegularExpression("^(sqlite|postgres)$", ErrorMessage = "Store:Provider must be 'sqlite' or 'postgres'")]
    public string Provider { get; set; } = "sqlite";

    /// <summary>SQLite file; a relative path is taken from the content root.</summary>
    [Required]
    public string SqlitePath { get; set; } = "data/lookahead.db";

    /// <summary>Npgsql connection string, required when <see cref="Provider"/> is "postgres".</summary>
    public string? PostgresConnectionString { get; set; }

    /// <summary>Schema holding the tables; interpolated into DDL, hence the strict pattern.</summary>
    [RegularExpression("^[a-z_][a-z0-9_]{0,62}$", ErrorMessage = "Store:PostgresSchema must be a lower-case SQL identifier")]
    public string PostgresSchema { get; set; } = "lookahead";
}
