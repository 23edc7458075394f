namespace Lookahead.Core.Numerics;

/// <summary>No stabilising solution of the discrete algebraic Riccati equation exists or could be found.</summary>
public sealed class RiccatiException : Exception
{
    public RiccatiException()
    {
    }

    public RiccatiException(string message)
        : base(message)
    {
    }

    public RiccatiException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
