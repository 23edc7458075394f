namespace Lookahead.Api.Models;

/// <summary>n states, m inputs, p outputs, horizon N and the N·m decision variables of each plan.</summary>
public sealed record ModelDimensions(int N, int M, int P, int Horizon, int DecisionVariables);
