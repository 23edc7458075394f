using MathNet.Numerics.LinearAlgebra;
using Xunit;

namespace Lookahead.Core.Tests.Support;

/// <summary>Relative comparisons: |a − e| ≤ tol·max(1, ‖e‖∞) over a whole array, so one scale applies to every entry.</summary>
public static class Assertions
{
    public static void Close(double[] expected, double[] actual, double tolerance, string what = "")
    {
        Assert.Equal(expected.Length, actual.Length);
        double scale = Math.Max(1.0, expected.Select(Math.Abs).DefaultIfEmpty(0).Max());
        for (int i = 0; i < expected.Length; i++)
        {
            double error = Math.Abs(expected[i] - actual[i]);
            Assert.True(error <= tolerance * scale, $"{what}[{i}]: expected {expected[i]:R}, got {actual[i]:R} (error {error:g3}, allowed {tolerance * scale:g3})");
        }
    }

    public static void Close(double[][] expected, double[][] actual, double tolerance, string what = "") =>
        Close(expected.SelectMany(r => r).ToArray(), actual.SelectMany(r => r).ToArray(), tolerance, what);

    public static void Close(double[][] expected, Matrix<double> actual, double tolerance, string what = "") =>
        Close(expected, actual.ToRowArrays(), tolerance, what);

    public static void CloseScalar(double expected, double actual, double tolerance, string what = "")
    {
        double error = Math.Abs(expected - actual);
        Assert.True(error <= tolerance * Math.Max(1.0, Math.Abs(expected)), $"{what}: expected {expected:R}, got {actual:R} (relative error {error / Math.Max(1.0, Math.Abs(expected)):g3})");
    }

    public static double[] Flatten(this double[][] rows) => rows.SelectMany(r => r).ToArray();
}
