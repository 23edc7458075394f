using Lookahead.Core.Planning;

namespace Lookahead.Benchmarks;

/// <summary>
/// The cold store one load-test station controls: the model's own discrete plant (zero-order hold at its sample
/// time, in deviations from the operating point) with what a real store adds and the model does not know — door
/// openings that warm one zone for a few minutes, a little process noise, noisy thermometers — and an outdoor
/// temperature that follows a daily cycle. Every station has its own seed, so the load is repeatable and the
/// stations do not move in step.
/// </summary>
/// <remarks>
/// Sample k: <see cref="Measure"/> reads y_k = C x_k + y_op + noise; the station's answer gives u_k; <see cref="Advance"/>
/// applies u_k over the sample: x_{k+1} = A x_k + B (u_k − u_op) + E (v_k − v_op) + door load + w_k.
/// </remarks>
public sealed class StationPlant
{
    /// <summary>Samples between setpoint changes (four hours of one-minute samples).</summary>
    public const int SetpointPeriod = 240;

    /// <summary>Samples in the outdoor temperature's cycle (a day of one-minute samples).</summary>
    private const int OutdoorPeriod = 1440;
    private const double OutdoorSwing = 6.0;
    private const double OutdoorNoise = 0.2;
    private const double ThermometerNoise = 0.02;
    private const double ProcessNoise = 0.002;

    /// <summary>Chance per sample that a door opens; it then warms its zone by 0.02–0.08 °C per sample for 3–10 samples.</summary>
    private const double DoorOpenChance = 1.0 / 120;

    private readonly CompiledModel model;
    private readonly Random random;
    private readonly double[] state;
    private readonly double[] next;
    private readonly double[] inputMin;
    private readonly double[] inputMax;
    private readonly double outdoorPhase;
    private int doorZone = -1;
    private int doorSamplesLeft;
    private double doorLoad;

    public StationPlant(CompiledModel model, int seed)
    {
        this.model = model;
        random = new Random(seed);
        int n = model.StateCount;
        state = new double[n];
        next = new double[n];
        var limits = model.Document.Limits;
        inputMin = Enumerable.Range(0, model.InputCount).Select(j => limits?.InputMin?[j] ?? double.NegativeInfinity).ToArray();
        inputMax = Enumerable.Range(0, model.InputCount).Select(j => limits?.InputMax?[j] ?? double.PositiveInfinity).ToArray();
        outdoorPhase = random.NextDouble() * OutdoorPeriod;

        // The store has been running for a while on some input: start near the steady state it holds.
        Input = RandomHeldInput();
        SteadyState(Input, model.OperatingPoint.Disturbance).CopyTo(state, 0);
        for (int i = 0; i < n; i++)
        {
            state[i] += (random.NextDouble() - 0.5) * 0.6;
        }

        Reference = SteadyOutput(RandomHeldInput());
    }

    /// <summary>The sample count since the start.</summary>
    public int Sample { get; private set; }

    /// <summary>The input the plant received over the last sample (engineering units).</summary>
    public double[] Input { get; private set; }

    /// <summary>The setpoint now: a steady output reachable within the input limits, changed every <see cref="SetpointPeriod"/> samples.</summary>
    public double[] Reference { get; private set; }

    /// <summary>The thermometers now, in engineering units.</summary>
    public double[] Measure()
    {
        var y = Output(state);
        for (int i = 0; i < y.Length; i++)
        {
            y[i] += ThermometerNoise * Gaussian();
        }

        return y;
    }

    /// <summary>The measured disturbances now (the outdoor temperature), in engineering units.</summary>
    public double[] Disturbance()
    {
        var point = model.OperatingPoint.Disturbance;
        var v = new double[point.Length];
        for (int i = 0; i < v.Length; i++)
        {
            v[i] = point[i] + (OutdoorSwing * Math.Sin(2 * Math.PI * (Sample + outdoorPhase) / OutdoorPeriod)) + (OutdoorNoise * Gaussian());
        }

        return v;
    }

    /// <summary>Applies <paramref name="move"/> (clamped to the input limits, as an actuator would) over one sample with the disturbance <paramref name="disturbance"/>.</summary>
    public void Advance(double[] move, double[] disturbance)
    {
        var u = new double[move.Length];
        for (int j = 0; j < u.Length; j++)
        {
            u[j] = Math.Clamp(move[j], inputMin[j], inputMax[j]);
        }

        Step(state, u, disturbance, next);
        if (doorSamplesLeft == 0 && random.NextDouble() < DoorOpenChance)
        {
            doorZone = random.Next(state.Length);
            doorSamplesLeft = random.Next(3, 11);
            doorLoad = 0.02 + (0.06 * random.NextDouble());
        }

        if (doorSamplesLeft > 0)
        {
            next[doorZone] += doorLoad;
            doorSamplesLeft--;
        }

        for (int i = 0; i < state.Length; i++)
        {
            state[i] = next[i] + (ProcessNoise * Gaussian());
        }

        Input = u;
        Sample++;
        if (Sample % SetpointPeriod == 0)
        {
            Reference = SteadyOutput(RandomHeldInput());
        }
    }

    /// <summary>x⁺ = A x + B (u − u_op) + E (v − v_op), in deviations.</summary>
    private void Step(double[] x, double[] u, double[] v, double[] result)
    {
        var point = model.OperatingPoint;
        for (int i = 0; i < x.Length; i++)
        {
            double sum = 0;
            for (int j = 0; j < x.Length; j++)
            {
                sum += model.DiscreteA[i][j] * x[j];
            }

            for (int j = 0; j < u.Length; j++)
            {
                sum += model.DiscreteB[i][j] * (u[j] - point.Input[j]);
            }

            for (int j = 0; j < v.Length; j++)
            {
                sum += model.DiscreteE[i][j] * (v[j] - point.Disturbance[j]);
            }

            result[i] = sum;
        }
    }

    /// <summary>y = C x + y_op (C is the identity when the model gives none).</summary>
    private double[] Output(double[] x)
    {
        var c = model.Document.Plant.C;
        var y = (double[])model.OperatingPoint.Output.Clone();
        for (int i = 0; i < y.Length; i++)
        {
            if (c is null)
            {
                y[i] += x[i];
                continue;
            }

            for (int j = 0; j < x.Length; j++)
            {
                y[i] += c[i][j] * x[j];
            }
        }

        return y;
    }

    private double[] SteadyOutput(double[] heldInput) => Output(SteadyState(heldInput, model.OperatingPoint.Disturbance));

    /// <summary>Where the noiseless plant settles under a held input: the demo's plant is stable, so iterating it converges.</summary>
    private double[] SteadyState(double[] heldInput, double[] disturbance)
    {
        var x = new double[state.Length];
        var y = new double[state.Length];
        for (int k = 0; k < 100_000; k++)
        {
            Step(x, heldInput, disturbance, y);
            double change = 0;
            for (int i = 0; i < x.Length; i++)
            {
                change = Math.Max(change, Math.Abs(y[i] - x[i]));
            }

            (x, y) = (y, x);
            if (change < 1e-12)
            {
                return x;
            }
        }

        throw new InvalidOperationException("the plant does not settle under a held input; the load test needs a stable plant");
    }

    /// <summary>An input the store could hold: the lower part of each input's range (chillers and fan rarely run flat out).</summary>
    private double[] RandomHeldInput()
    {
        var u = new double[inputMin.Length];
        for (int j = 0; j < u.Length; j++)
        {
            double low = double.IsFinite(inputMin[j]) ? inputMin[j] : model.OperatingPoint.Input[j] - 1;
            double high = double.IsFinite(inputMax[j]) ? inputMax[j] : model.OperatingPoint.Input[j] + 1;
            u[j] = low + ((high - low) * 0.5 * random.NextDouble());
        }

        return u;
    }

    /// <summary>A standard normal draw (Box–Muller).</summary>
    private double Gaussian() => Math.Sqrt(-2 * Math.Log(1 - random.NextDouble())) * Math.Cos(2 * Math.PI * random.NextDouble());
}
