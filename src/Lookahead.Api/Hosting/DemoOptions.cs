using System.ComponentModel.DataAnnotations;

namespace Lookahead.Api.Hosting;

/// <summary>The demo model registered at start ("Demo" section).</summary>
public sealed class DemoOptions
{
    public const string Section = "Demo";

    public bool Enabled { get; set; } = true;

    /// <summary>Checked against the alias naming rule where the options are registered.</summary>
    [Required]
    public string Alias { get; set; } = "cold-store-demo";

    /// <summary>Relative paths are taken from the application's folder.</summary>
    [Required]
    public string DocumentPath { get; set; } = "Demo/cold-store.json";

    /// <summary>The tenant the demo and its alias are registered for (Auth:Keys:N:Tenant); the default tenant when empty.</summary>
    public string Tenant { get; set; } = "";
}
