namespace Lookahead.Core.Planning;

/// <summary>
/// Reproducible standard-normal numbers for simulated measurement noise: a <see cref="Random"/> with a fixed seed and
/// the Box–Muller transform. Each pair of uniforms u₁ ∈ (0, 1], u₂ ∈ [0, 1) gives two numbers,
/// z₁ = √(−2 ln u₁) cos 2πu₂ and z₂ = √(−2 ln u₁) sin 2πu₂, returned in that order. Not thread-safe: one per run.
/// </summary>
/// <remarks>
/// Box–Muller rather than a faster method because it is exact, short and easy to reproduce elsewhere from the same
/// uniforms. u₁ is 1 − NextDouble() so that ln u₁ is finite.
/// </remarks>
public sealed class GaussianNoise
{
    private readonly Random uniforms;
    private double spare;
    private bool hasSpare;

    public GaussianNoise(int seed)
    {
        uniforms = new Random(seed);
    }

    /// <summary>The next standard-normal number.</summary>
    public double Next()
    {
        if (hasSpare)
        {
            hasSpare = false;
            return spare;
        }

        double radius = Math.Sqrt(-2.0 * Math.Log(1.0 - uniforms.NextDouble()));
        double angle = 2.0 * Math.PI * uniforms.NextDouble();
        spare = radius * Math.Sin(angle);
        hasSpare = true;
        return radius * Math.Cos(angle);
    }
}
