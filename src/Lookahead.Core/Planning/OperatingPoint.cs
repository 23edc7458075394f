namespace Lookahead.Core.Planning;

/// <summary>
/// The engineering values (x_op, u_op, y_op) around which a model was linearised. The compiled model plans in
/// deviations δx = x − x_op, δu = u − u_op, δy = y − y_op; this converts a request into deviations and a plan back
/// into engineering units at the model's boundary, so that the solver, the gains and the cost never see the offsets
/// (the cost is a function of differences, so J is the same in both). Immutable.
/// </summary>
public sealed class OperatingPoint
{
    /// <param name="state">x_op (n).</param>
    /// <param name="input">u_op (m).</param>
    /// <param name="output">y_op (p).</param>
    /// <param name="disturbance">v_op (q), the measured disturbances' values at the operating point.</param>
    public OperatingPoint(double[] state, double[] input, double[] output, double[]? disturbance = null)
    {
        State = state;
        Input = input;
        Output = output;
        Disturbance = disturbance ?? [];
        IsOrigin = state.All(v => v == 0) && input.All(v => v == 0) && output.All(v => v == 0) && Disturbance.All(v => v == 0);
    }

    public double[] State { get; }

    public double[] Input { get; }

    public double[] Output { get; }

    public double[] Disturbance { get; }

    /// <summary>True when every offset is zero: the model's units are the client's, nothing is converted.</summary>
    public bool IsOrigin { get; }

    public static OperatingPoint Origin(int states, int inputs, int outputs, int disturbances = 0) => new(new double[states], new double[inputs], new double[outputs], new double[disturbances]);

    /// <summary>The request in deviations (new arrays; the caller's are left alone). Vectors of the wrong length pass through for validation to name.</summary>
    public PlanRequest ToDeviations(PlanRequest request) => IsOrigin ? request : new PlanRequest(
        Minus(request.State, State)!,
        Minus(request.Reference, Output),
        Minus(request.PreviousInput, Input),
        request.ReferenceSchedule?.Select(row => Minus(row, Output)!).ToArray(),
        request.Disturbance?.Select(row => Minus(row, Disturbance)!).ToArray(),
        request.DisturbanceEstimate);

    /// <summary>Adds the offsets to the plan's trajectories and target, in place.</summary>
    public void ToEngineering(Plan plan)
    {
        if (IsOrigin)
        {
            return;
        }

        AddRows(plan.Inputs, Input);
        AddRows(plan.States, State);
        AddRows(plan.Outputs, Output);
        if (plan.Target is { } target)
        {
            plan.Target = target with { State = Plus(target.State, State), Input = Plus(target.Input, Input), Output = Plus(target.Output, Output) };
        }
    }

    /// <summary>x − offset for a vector of the offset's length; anything else (null, wrong length) unchanged.</summary>
    public static double[]? Minus(double[]? values, double[] offset)
    {
        if (values is null || values.Length != offset.Length)
        {
            return values;
        }

        var result = new double[values.Length];
        for (int i = 0; i < values.Length; i++)
        {
            result[i] = values[i] - offset[i];
        }

        return result;
    }

    /// <summary>x + offset (a new array).</summary>
    public static double[] Plus(double[] values, double[] offset)
    {
        var result = new double[values.Length];
        for (int i = 0; i < values.Length; i++)
        {
            result[i] = values[i] + offset[i];
        }

        return result;
    }

    /// <summary>Adds <paramref name="offset"/> to every row of a row-major block whose rows have the offset's length.</summary>
    public static void AddRows(Span<double> rows, ReadOnlySpan<double> offset)
    {
        if (offset.Length == 0)
        {
            return;
        }

        for (int start = 0; start + offset.Length <= rows.Length; start += offset.Length)
        {
            var row = rows.Slice(start, offset.Length);
            for (int i = 0; i < offset.Length; i++)
            {
                row[i] += offset[i];
            }
        }
    }
}
