using Lookahead.Api.Storage;
using Xunit;

namespace Lookahead.Api.Tests.Storage;

public sealed class MigrationSequenceTests
{
    private static readonly SchemaMigration First = new(1, "first", "CREATE TABLE a (x integer)");
    private static readonly SchemaMigration Second = new(2, "second", "CREATE TABLE b (x integer)");

    [Fact]
    public void Versions_must_count_from_one_in_list_order()
    {
        Assert.Throws<ArgumentException>(() => new MigrationSequence());
        Assert.Throws<ArgumentException>(() => new MigrationSequence(Second));
        Assert.Throws<ArgumentException>(() => new MigrationSequence(Second, First));
        Assert.Throws<ArgumentException>(() => new MigrationSequence(First, First));
        Assert.Throws<ArgumentException>(() => new MigrationSequence(First, Second with { Version = 3 }));
    }

    [Fact]
    public void Next_is_the_step_after_the_current_version_and_null_at_the_latest()
    {
        var sequence = new MigrationSequence(First, Second);

        Assert.Same(First, sequence.Next(0, "The test database"));
        Assert.Same(Second, sequence.Next(1, "The test database"));
        Assert.Null(sequence.Next(2, "The test database"));
    }

    [Fact]
    public void A_version_beyond_the_latest_or_below_zero_is_refused_naming_the_database()
    {
        var sequence = new MigrationSequence(First, Second);

        var newer = Assert.Throws<InvalidOperationException>(() => sequence.Next(3, "The test database"));
        var damaged = Assert.Throws<InvalidOperationException>(() => sequence.Next(-1, "The test database"));

        Assert.StartsWith("The test database is at schema version 3", newer.Message);
        Assert.Contains("knows schema versions up to 2", newer.Message);
        Assert.StartsWith("The test database records schema version -1", damaged.Message);
    }
}
