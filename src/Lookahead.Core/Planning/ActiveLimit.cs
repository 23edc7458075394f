namespace Lookahead.Core.Planning;

/// <summary>Which kind of limit a plan is pressing against.</summary>
public enum LimitKind
{
    InputMin,
    InputMax,
    InputRateMin,
    InputRateMax,
    OutputMin,
    OutputMax,
}

/// <summary>A limit that holds with equality in the plan: <paramref name="Step"/> k and the input or output <paramref name="Index"/>.</summary>
public sealed record ActiveLimit(LimitKind Kind, int Step, int Index);
