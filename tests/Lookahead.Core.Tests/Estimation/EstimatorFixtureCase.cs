using System.Text.Json;
using Lookahead.Core.Estimation;
using Lookahead.Core.Tests.Support;
using MathNet.Numerics.LinearAlgebra;

namespace Lookahead.Core.Tests.Estimation;

/// <summary>Reads a case of Fixtures/estimators.json, written by tests/reference/generate_estimators.py.</summary>
public static class EstimatorFixtureCase
{
    public const string File = "estimators.json";

    public static IEnumerable<object[]> Designed => Fixtures.CaseNames(File);

    public static IEnumerable<object[]> Refused =>
        Fixtures.Load(File).GetProperty("refused").EnumerateArray().Select(c => new object[] { c.GetProperty("name").GetString()! });

    public static JsonElement Get(string name) => Fixtures.Case(File, name);

    public static JsonElement GetRefused(string name) =>
        Fixtures.Load(File).GetProperty("refused").EnumerateArray().Single(c => c.GetProperty("name").GetString() == name);

    public static (Matrix<double> A, Matrix<double> B, Matrix<double> C, EstimatorSpec Spec) Plant(JsonElement c) => (
        M(c.GetProperty("a")),
        M(c.GetProperty("b")),
        M(c.GetProperty("c")),
        new EstimatorSpec(
            Fixtures.Weight(c.GetProperty("processNoise")),
            Fixtures.Weight(c.GetProperty("measurementNoise")),
            c.GetProperty("disturbanceModel").GetString() switch
            {
                "output" => DisturbanceModelKind.Output,
                "input" => DisturbanceModelKind.Input,
                "none" => DisturbanceModelKind.None,
                var other => throw new InvalidOperationException($"unknown disturbance model {other}"),
            }));

    public static Estimator Design(string name)
    {
        var (a, b, c, spec) = Plant(Get(name));
        return EstimatorDesign.Build(a, b, c, spec);
    }

    public static Matrix<double> M(JsonElement e) => Matrix<double>.Build.DenseOfRowArrays(e.Matrix());
}
