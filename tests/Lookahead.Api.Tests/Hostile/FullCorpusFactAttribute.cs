using Xunit;

namespace Lookahead.Api.Tests.Hostile;

/// <summary>A fact that runs only with LOOKAHEAD_FUZZ_FULL=1: the full hostile corpus takes minutes, not seconds.</summary>
[AttributeUsage(AttributeTargets.Method)]
public sealed class FullCorpusFactAttribute : FactAttribute
{
    public const string Variable = "LOOKAHEAD_FUZZ_FULL";

    public FullCorpusFactAttribute()
    {
        if (Environment.GetEnvironmentVariable(Variable) != "1")
        {
            Skip = $"{Variable} is not 1: the full hostile corpus runs on demand (DEVELOPERS.md)";
        }
    }
}
