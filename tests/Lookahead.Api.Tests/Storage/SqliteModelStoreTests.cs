using Lookahead.Api.Storage;

namespace Lookahead.Api.Tests.Storage;

public sealed class SqliteModelStoreTests : ModelStoreContract
{
    private readonly string folder = Directory.CreateTempSubdirectory("lookahead-sqlite-store-").FullName;

    protected override Task<IModelStore> CreateStoreAsync() =>
        Task.FromResult<IModelStore>(new SqliteModelStore(Path.Combine(folder, "nested", "store.db")));

    protected override Task DropStoreAsync()
    {
        (Store as IDisposable)?.Dispose();
        Microsoft.Data.Sqlite.SqliteConnection.ClearAllPools();
        Directory.Delete(folder, recursive: true);
        return Task.CompletedTask;
    }
}
