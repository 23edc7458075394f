namespace Lookahead.Api.Tests.Deploy;

/// <summary>One configuration value a deploy file gives the service.</summary>
/// <param name="Key">The configuration key, ':'-separated (<c>Lookahead__Store__Provider</c> becomes <c>Store:Provider</c>).</param>
/// <param name="Value">The value as written (placeholders such as <c>${VAR}</c> left in).</param>
/// <param name="Source">Where it is written: path relative to the repository root and 1-based line.</param>
/// <param name="WrittenAs">The name as written in the file (an environment variable, a ConfigMap key, a JSON path).</param>
public sealed record DeploySetting(string Key, string? Value, DeployLocation Source, string WrittenAs)
{
    public override string ToString() => $"{Source}: {WrittenAs} (key '{Key}')";
}

/// <summary>A place in a file under the repository root.</summary>
public sealed record DeployLocation(string File, int Line)
{
    public override string ToString() => $"{File}:{Line}";
}
