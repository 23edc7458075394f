namespace Lookahead.Core.Numerics;

/// <summary>
/// A numeric step met data whose scale it cannot handle: an entry was not finite, a result overflowed the
/// double range, or an iteration did not converge within its bound. Callers name the input the data came from.
/// </summary>
public sealed class NumericScaleException : ArithmeticException
{
    public NumericScaleException()
    {
    }

    public NumericScaleException(string message)
        : base(message)
    {
    }

    public NumericScaleException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
