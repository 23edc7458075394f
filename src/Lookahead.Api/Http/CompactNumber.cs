using System.Buffers.Text;

namespace Lookahead.Api.Http;

/// <summary>
/// Writes a double with 15 significant digits by integer arithmetic — about twice as fast as the runtime's shortest
/// round-trip formatting and 1.1–2× as fast as its G15 (CompactNumberBenchmarks, docs/performance.md); formatting
/// was the largest cost of a plan response (hundreds of numbers each).
/// 15 digits is what a double holds reliably (relative error ≤ 1e-15), far finer than any actuator moves.
/// Values in [1e-7, 1e15) are written in fixed notation, others down to 1e-290 and up to 1e290 as d.ddde±x;
/// beyond that the runtime's round-trip format is used.
/// </summary>
internal static class CompactNumber
{
    public const int MaxLength = 32;

    // 10^k correctly rounded for k = 0 … 308; exact up to 10^22, within half an ulp beyond.
    private static readonly double[] PowersOfTen = Enumerable.Range(0, 309).Select(k => double.Parse($"1e{k}", System.Globalization.CultureInfo.InvariantCulture)).ToArray();

    /// <summary>Formats <paramref name="value"/> into <paramref name="destination"/> (at least <see cref="MaxLength"/> bytes) and returns the length.</summary>
    public static int Format(double value, Span<byte> destination)
    {
        if (value == 0)
        {
            destination[0] = (byte)'0';
            return 1;
        }

        if (!double.IsFinite(value))
        {
            // JSON has no NaN or ∞; the core refuses such results, so this is a bug, not bad input.
            throw new ArgumentOutOfRangeException(nameof(value), "a non-finite number cannot be written as JSON");
        }

        double magnitude = Math.Abs(value);
        if (!(magnitude >= 1e-290 && magnitude <= 1e290))
        {
            return Fallback(value, destination);
        }

        bool scientific = !(magnitude >= 1e-7 && magnitude < 1e15);

        // digits · 10^(exponent − 14) = |value|, with 10^14 ≤ digits < 10^15. Each scale is one exact power of ten,
        // so the only rounding is the multiplication's (half an ulp).
        // Decimal exponent from the binary one (log10 2 ≈ 0.30103); Scale corrects it when it is off by one.
        int binaryExponent = (int)((BitConverter.DoubleToInt64Bits(magnitude) >> 52) & 0x7FF) - 1023;
        int exponent = (int)Math.Floor(binaryExponent * 0.30102999566398120);
        long digits = Scale(magnitude, ref exponent);
        if (digits < 0)
        {
            return Fallback(value, destination);
        }

        Span<byte> text = stackalloc byte[16];
        for (int i = 14; i >= 1; i -= 2)
        {
            // Two digits per division.
            long pair = digits % 100;
            digits /= 100;
            text[i] = (byte)('0' + (pair % 10));
            text[i - 1] = (byte)('0' + (pair / 10));
        }

        text[0] = (byte)('0' + digits);

        int significant = 15;
        while (significant > 1 && text[significant - 1] == '0')
        {
            significant--;
        }

        int at = 0;
        if (value < 0)
        {
            destination[at++] = (byte)'-';
        }

        if (scientific)
        {
            // d.ddde±x for very small and very large values (decaying states reach 1e−20 and below).
            destination[at++] = text[0];
            if (significant > 1)
            {
                destination[at++] = (byte)'.';
                for (int i = 1; i < significant; i++)
                {
                    destination[at++] = text[i];
                }
            }

            destination[at++] = (byte)'e';
            if (exponent < 0)
            {
                destination[at++] = (byte)'-';
            }

            int e = Math.Abs(exponent);
            if (e >= 100)
            {
                destination[at++] = (byte)('0' + (e / 100));
            }

            if (e >= 10)
            {
                destination[at++] = (byte)('0' + (e / 10 % 10));
            }

            destination[at++] = (byte)('0' + (e % 10));
        }
        else if (exponent >= 0)
        {
            int integerDigits = exponent + 1;
            for (int i = 0; i < integerDigits; i++)
            {
                destination[at++] = text[i];
            }

            if (significant > integerDigits)
            {
                destination[at++] = (byte)'.';
                for (int i = integerDigits; i < significant; i++)
                {
                    destination[at++] = text[i];
                }
            }
        }
        else
        {
            destination[at++] = (byte)'0';
            destination[at++] = (byte)'.';
            for (int i = 1; i < -exponent; i++)
            {
                destination[at++] = (byte)'0';
            }

            for (int i = 0; i < significant; i++)
            {
                destination[at++] = text[i];
            }
        }

        return at;
    }

    /// <summary>The 15-digit integer for |value|, correcting a Log10 that is off by one; −1 when out of range.</summary>
    private static long Scale(double magnitude, ref int exponent)
    {
        for (int attempt = 0; attempt < 4; attempt++)
        {
            int k = 14 - exponent;
            if (k <= -PowersOfTen.Length || k >= PowersOfTen.Length)
            {
                return -1;
            }

            double product = k >= 0 ? magnitude * PowersOfTen[k] : magnitude / PowersOfTen[-k];
            double scaled = Math.Round(product, MidpointRounding.AwayFromZero);
            if (scaled < 1e14)
            {
                exponent--;
                continue;
            }

            if (scaled >= 1e15)
            {
                // Either Log10 undershot or rounding carried into a new digit (9.99…95 → 10.0…0).
                if (product >= 1e15 - 0.5 && product < 1e15)
                {
                    exponent++;
                    return 100_000_000_000_000;
                }

                exponent++;
                continue;
            }

            return (long)scaled;
        }

        return -1;
    }

    private static int Fallback(double value, Span<byte> destination) =>
        Utf8Formatter.TryFormat(value, destination, out int written) ? written : throw new InvalidOperationException("number buffer too small");
}
