namespace Lookahead.Core.Planning;

/// <summary>
/// A small model's matrices as zero-padded 4×4 tiles (see <see cref="Tile"/>), with the transposes the tile products
/// need, on the pinned heap for the model's lifetime: A, Aᵀ, B, Bᵀ, CᵀQC, R, Rᵀ, S, Sᵀ, the terminal weight P, the rows
/// C_s of the softly limited outputs and C_sᵀ. Only for n, m, ns ≤ 4.
/// </summary>
internal sealed unsafe class ModelTiles
{
    private const int Count = 12;
    private readonly double[] tiles;
    private readonly double* start;

    /// <param name="a">A, n×n row-major.</param>
    /// <param name="b">B, n×m row-major.</param>
    /// <param name="qx">CᵀQC, n×n.</param>
    /// <param name="r">R, m×m.</param>
    /// <param name="s">S, m×m.</param>
    /// <param name="terminal">P, n×n.</param>
    /// <param name="cs">C_s, ns×n.</param>
    public ModelTiles(double[] a, double[] b, double[] qx, double[] r, double[] s, double[] terminal, double[] cs, int n, int m, int ns)
    {
        tiles = GC.AllocateArray<double>(Count * 16, pinned: true);
        start = (double*)System.Runtime.CompilerServices.Unsafe.AsPointer(ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(tiles));
        Put(0, a, n, n);
        Put(2, b, n, m);
        Put(4, qx, n, n);
        Put(5, r, m, m);
        Put(7, s, m, m);
        Put(9, terminal, n, n);
        Put(10, cs, ns, n);
    }

    public double* A => start;
    public double* ATransposed => start + 16;
    public double* B => start + 32;
    public double* BTransposed => start + 48;
    public double* Qx => start + 64;
    public double* R => start + 80;
    public double* RTransposed => start + 96;
    public double* S => start + 112;
    public double* STransposed => start + 128;
    public double* Terminal => start + 144;
    public double* Cs => start + 160;
    public double* CsTransposed => start + 176;

    /// <summary>Keeps the pinned block reachable while a caller works through the pointers.</summary>
    public void KeepAlive() => GC.KeepAlive(tiles);

    /// <summary>The matrix into tile <paramref name="tile"/> and, except for the symmetric weights on the state, its transpose into the next.</summary>
    private void Put(int tile, double[] source, int rows, int columns)
    {
        bool withTranspose = tile is 0 or 2 or 5 or 7 or 10;
        for (int i = 0; i < rows; i++)
        {
            for (int j = 0; j < columns; j++)
            {
                tiles[(tile * 16) + (i * 4) + j] = source[(i * columns) + j];
                if (withTranspose)
                {
                    tiles[((tile + 1) * 16) + (j * 4) + i] = source[(i * columns) + j];
                }
            }
        }
    }
}
