using System.Globalization;
using Lookahead.Core.Models;
using Lookahead.Core.Planning;
using Lookahead.Core.Validation;

namespace Lookahead.Benchmarks;

/// <summary>
/// <c>--model-memory [limits] n×m×N …</c>: compiles a random stable plant of each size and prints the bytes the
/// compiled model keeps (GC heap after a full collection, model alive, minus before), the core's own
/// <see cref="CompiledModel.EstimatedBytes"/>, and the count from docs/sizing.md's formula, so the formula can be
/// checked against what the runtime really holds. With <c>limits</c> every input gets ±1 and the model's first
/// limited plan is run too, to show the solver workspace it leaves pooled.
/// </summary>
/// <remarks>
/// Plant: A entries uniform in ±0.9/√n, B in ±1 (seed 1), outputs = states, Q = I, R = S = 0.1·I, Riccati terminal
/// weight, no measured disturbances. Size limits are lifted so any size can be asked for.
/// </remarks>
public static class ModelMemory
{
    public static int Run(IReadOnlyList<string> arguments, TextWriter output)
    {
        bool limits = arguments.Contains("limits", StringComparer.OrdinalIgnoreCase);
        var sizes = arguments.Where(a => a.Contains('x', StringComparison.Ordinal)).Select(Parse).ToList();
        if (sizes.Count == 0)
        {
            sizes = [(3, 3, 30), (12, 3, 30), (4, 2, 100), (50, 10, 50), (100, 5, 100), (200, 10, 100)];
        }

        // One small compile first, so that JIT code, statics and pools are not charged to the first size.
        _ = ModelCompiler.Compile(Document(4, 2, 10, limits), Options);

        output.WriteLine(limits ? "input limits ±1 on every input" : "no limits");
        output.WriteLine("| n×m×N | N·m | kept after compiling | EstimatedBytes | formula | kept after one limited plan | formula + one workspace |");
        output.WriteLine("| --- | ---: | ---: | ---: | ---: | ---: | ---: |");
        foreach (var (n, m, horizon) in sizes)
        {
            var document = Document(n, m, horizon, limits);
            long before = GC.GetTotalMemory(forceFullCollection: true);
            CompiledModel? model = ModelCompiler.Compile(document, Options);
            long kept = GC.GetTotalMemory(forceFullCollection: true) - before;
            string afterPlan = "", withWorkspace = "";
            if (limits)
            {
                var state = Enumerable.Range(0, n).Select(i => i % 2 == 0 ? 3.0 : -3.0).ToArray();
                _ = model.Plan(new PlanRequest(state));
                afterPlan = Megabytes(GC.GetTotalMemory(forceFullCollection: true) - before);
                withWorkspace = Megabytes(FormulaBytes(n, m, n, horizon, limits) + WorkspaceBytes(m, horizon));
            }

            output.WriteLine($"| {n}×{m}×{horizon} | {horizon * m} | {Megabytes(kept)} | {Megabytes(model.EstimatedBytes)} | {Megabytes(FormulaBytes(n, m, n, horizon, limits))} | {afterPlan} | {withWorkspace} |");

            // Released before the next size is measured: a model still referenced from this frame would be counted
            // in the next size's baseline and hide that much of its own size.
            model = null;
        }

        return 0;
    }

    /// <summary>
    /// docs/sizing.md's count for this benchmark's models (p = n, q = 0, S ≠ 0 so two variants; with limits, bounds on
    /// every input): per variant the gain maps V·L, the cost form L², the Hessian's factor V², the preview map V·N·p
    /// when it fits; under limits J₀ V² and, up to 1,000 rows, the active-set guesser's r·(r + V) with r = 2V rows.
    /// </summary>
    public static long FormulaBytes(int n, int m, int p, int horizon, bool limits)
    {
        const int variants = 2;
        long v = (long)horizon * m;
        long l = (2L * n) + p + (2L * m);
        long doubles = (v * l) + (l * l) + (v * v);
        long previewColumns = (long)horizon * p;
        if (v * previewColumns <= 2_000_000 && previewColumns * 2.0 * v * v <= 5e8)
        {
            doubles += v * previewColumns;
        }

        if (limits)
        {
            long rows = 2 * v;
            doubles += v * v;
            if (rows <= 1000)
            {
                doubles += rows * (rows + v);
            }
        }

        return sizeof(double) * variants * doubles;
    }

    /// <summary>
    /// One pooled solver workspace, which a limited plan takes from its variant's pool and leaves there: J and R of the
    /// active-set method (V² each) and, when the active-set guesser runs (at most 1,000 rows), its factor (V²).
    /// </summary>
    public static long WorkspaceBytes(int m, int horizon)
    {
        long v = (long)horizon * m;
        return sizeof(double) * ((2 * v * v) + (2 * v <= 1000 ? v * v : 0));
    }

    private static CompileOptions Options { get; } = new()
    {
        SizeLimits = new SizeLimits { MaxStates = 10_000, MaxInputs = 1_000, MaxOutputs = 10_000, MaxHorizon = 100_000, MaxDecisionVariables = 100_000 },
    };

    private static ModelDocument Document(int n, int m, int horizon, bool limits)
    {
        var random = new Random(1);
        var a = Enumerable.Range(0, n).Select(_ => Enumerable.Range(0, n).Select(_ => ((random.NextDouble() * 2) - 1) * 0.9 / Math.Sqrt(n)).ToArray()).ToArray();
        var b = Enumerable.Range(0, n).Select(_ => Enumerable.Range(0, m).Select(_ => (random.NextDouble() * 2) - 1).ToArray()).ToArray();
        var cost = new CostSpec(
            horizon,
            WeightSpec.FromDiagonal(Enumerable.Repeat(1.0, n).ToArray()),
            WeightSpec.FromDiagonal(Enumerable.Repeat(0.1, m).ToArray()),
            WeightSpec.FromDiagonal(Enumerable.Repeat(0.1, m).ToArray()),
            TerminalWeightSpec.Riccati);
        var bounds = limits
            ? new LimitsSpec(InputMin: Enumerable.Repeat<double?>(-1, m).ToArray(), InputMax: Enumerable.Repeat<double?>(1, m).ToArray())
            : null;
        return new ModelDocument($"memory-{n}x{m}x{horizon}", new PlantSpec(a, b, null, 1.0), cost, bounds);
    }

    private static (int N, int M, int Horizon) Parse(string size)
    {
        var parts = size.Split('x', '×');
        if (parts.Length != 3)
        {
            throw new ArgumentException($"'{size}' is not n×m×N (e.g. 50x10x50)", nameof(size));
        }

        return (int.Parse(parts[0], CultureInfo.InvariantCulture), int.Parse(parts[1], CultureInfo.InvariantCulture), int.Parse(parts[2], CultureInfo.InvariantCulture));
    }

    private static string Megabytes(long bytes) => (bytes / 1e6).ToString("0.00", CultureInfo.InvariantCulture) + " MB";
}
