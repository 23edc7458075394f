namespace Lookahead.Api.Storage;

/// <summary>
/// One step of a store's schema. Once released it never changes: databases in the field have run it, and the
/// version recorded beside their data says exactly which steps they hold.
/// </summary>
/// <param name="Version">Position in the store's sequence, counting from 1.</param>
/// <param name="Name">What the step adds, as recorded in the database for whoever inspects it.</param>
/// <param name="Sql">The statements, run in one transaction together with the version record.</param>
internal sealed record SchemaMigration(int Version, string Name, string Sql);
