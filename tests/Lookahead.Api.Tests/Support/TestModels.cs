using System.Text.Json.Nodes;

namespace Lookahead.Api.Tests.Support;

/// <summary>Model documents used across tests. Small and discrete unless a test needs otherwise.</summary>
public static class TestModels
{
    /// <summary>A discrete double integrator (position, velocity), one force input, horizon 10.</summary>
    public const string DoubleIntegrator = """
        {
          "name": "double-integrator",
          "plant": {
            "a": [[1.0, 0.1], [0.0, 1.0]],
            "b": [[0.005], [0.1]],
            "sampleTime": 0.1,
            "timeDomain": "discrete"
          },
          "cost": {
            "horizon": 10,
            "outputWeight": [1.0, 0.1],
            "inputWeight": [0.01]
          }
        }
        """;

    /// <summary>Two tanks draining into each other, continuous, two inputs, labelled, with a rate weight.</summary>
    public const string TwoTanks = """
        {
          "name": "two-tanks",
          "plant": {
            "a": [[-0.02, 0.01], [0.01, -0.03]],
            "b": [[0.05, 0.0], [0.0, 0.04]],
            "c": [[1.0, 0.0], [0.0, 1.0]],
            "sampleTime": 5,
            "timeDomain": "continuous"
          },
          "cost": {
            "horizon": 20,
            "outputWeight": [[2.0, 0.0], [0.0, 1.0]],
            "inputWeight": [0.5, 0.5],
            "inputRateWeight": [0.1, 0.1],
            "terminalWeight": "stage"
          },
          "labels": { "states": ["level_1", "level_2"], "inputs": ["valve_1", "valve_2"], "outputs": ["h1", "h2"] }
        }
        """;

    /// <summary>Two zones in engineering units with an output-disturbance estimator, a move weight, input and rate limits (invented numbers).</summary>
    public const string TwoZonesWithEstimator = """
        {
          "name": "two-zones-station",
          "plant": { "a": [[0.9, 0.05], [0.04, 0.85]], "b": [[0.1, 0.0], [0.02, 0.08]], "c": [[1, 0], [0, 1]], "sampleTime": 60, "timeDomain": "discrete" },
          "cost": { "horizon": 15, "outputWeight": [1.0, 1.0], "inputWeight": [0.05, 0.05], "inputRateWeight": [0.1, 0.1] },
          "limits": { "inputMin": [0, 0], "inputMax": [100, 100], "inputRateMin": [-5, -5], "inputRateMax": [5, 5] },
          "operatingPoint": { "state": [-20, -20], "input": [60, 60], "output": [-20, -20] },
          "estimator": { "processNoise": [1e-4, 1e-4, 1e-2, 1e-2], "measurementNoise": [1e-3, 1e-3] }
        }
        """;

    public static JsonNode Node(string json) => JsonNode.Parse(json)!;

    public static string DemoDocument => File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "Demo", "cold-store.json"));
}
