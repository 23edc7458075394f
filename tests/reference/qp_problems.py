#!/usr/bin/python3
"""Small published convex QP test problems, cross-checked with CVXOPT.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 tests/reference/qp_problems.py

It writes tests/Lookahead.Core.Tests/Fixtures/qp_problems.json and prints a
summary table.  The script exits with a non-zero status if any check fails.

Every problem is written as

    minimise   f(x) = 1/2 x'Gx + a'x + constant
    subject to E x  = e          ("eq")
               F x >= g          ("ineq"; upper/lower bounds and <= rows are
                                  rewritten into this form, one row each)

The problem data were typed in from the published definitions as remembered
(Hock & Schittkowski (1981), Springer; Schittkowski (1987), Springer, for
problem 268; Maros & Mészáros (1999), Optim. Methods Softw. 11–12).  The
printed sources were not available when this file was written, so every
case carries "fromMemory": true.  The independent evidence that the
typed-in data are right is:

  1. CVXOPT's solvers.qp optimum (+ constant) agrees with the published
     optimal value (relative 1e-6, or absolute 1e-8 when f* = 0);
  2. the published x* (when one is stated) is feasible, to 1e-9, and its
     objective equals f*;
  3. G is symmetric; its smallest eigenvalue (numpy.linalg.eigvalsh) is
     recorded and "strictlyConvex" is true only when it is positive (above
     1e-12 times the largest eigenvalue).  A dual active-set method of the
     Goldfarb-Idnani type needs G positive definite, so the C# tests must
     skip the cases with "strictlyConvex": false.  An eigenvalue below
     1e-12 times the largest is stored as exactly 0 (these G are
     rank-deficient by construction).
  4. CVXOPT's x is polished by one KKT solve on CVXOPT's active set
     ("refinedX", "refinedOptimum"); it must be feasible, dual feasible, no
     worse than CVXOPT's, agree with f*, and equal the published x* to 1e-7
     where one is given.  "cvxoptX"/"cvxoptOptimum" are CVXOPT's raw output.
"""

import json
import os
import sys
from fractions import Fraction

import cvxopt
import numpy as np
from cvxopt import matrix, solvers

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "..", "Lookahead.Core.Tests", "Fixtures", "qp_problems.json")

REL_TOL = 1e-6
ABS_TOL = 1e-8
FEAS_TOL = 1e-9


def frac(p, q):
    return float(Fraction(p, q))


def bounds_rows(n, lower=None, upper=None):
    """Rows of F x >= g for simple bounds; None entries are absent bounds."""
    rows, rhs = [], []
    for i in range(n):
        if lower is not None and lower[i] is not None:
            r = [0.0] * n
            r[i] = 1.0
            rows.append(r)
            rhs.append(float(lower[i]))
    for i in range(n):
        if upper is not None and upper[i] is not None:
            r = [0.0] * n
            r[i] = -1.0
            rows.append(r)
            rhs.append(-float(upper[i]))
    return rows, rhs


def sum_of_squares(terms, n):
    """f = sum_k (c_k' x - d_k)^2 as (G, a, constant)."""
    g = np.zeros((n, n))
    a = np.zeros(n)
    c = 0.0
    for coef, d in terms:
        v = np.array(coef, dtype=float)
        g += 2.0 * np.outer(v, v)
        a += -2.0 * d * v
        c += d * d
    return g, a, c


# ---------------------------------------------------------------- problems

def hs21():
    # min 0.01 x1^2 + x2^2 - 100
    # 10 x1 - x2 - 10 >= 0, 2 <= x1 <= 50, -50 <= x2 <= 50
    g = [[0.02, 0.0], [0.0, 2.0]]
    rows, rhs = [[10.0, -1.0]], [10.0]
    br, bh = bounds_rows(2, [2, -50], [50, 50])
    return dict(name="HS21", source="Hock & Schittkowski (1981), problem 21",
                g=g, a=[0.0, 0.0], constant=-100.0,
                eq=([], []), ineq=(rows + br, rhs + bh),
                publishedOptimum=-99.96, publishedX=[2.0, 0.0],
                note="f = 0.01 x1^2 + x2^2 - 100; 10 x1 - x2 >= 10; "
                     "2 <= x1 <= 50, -50 <= x2 <= 50.")


def hs35():
    # min 9 - 8x1 - 6x2 - 4x3 + 2x1^2 + 2x2^2 + x3^2 + 2x1x2 + 2x1x3
    # 3 - x1 - x2 - 2x3 >= 0, x >= 0
    g = [[4.0, 2.0, 2.0], [2.0, 4.0, 0.0], [2.0, 0.0, 2.0]]
    rows, rhs = [[-1.0, -1.0, -2.0]], [-3.0]
    br, bh = bounds_rows(3, [0, 0, 0])
    return dict(name="HS35", source="Hock & Schittkowski (1981), problem 35",
                g=g, a=[-8.0, -6.0, -4.0], constant=9.0,
                eq=([], []), ineq=(rows + br, rhs + bh),
                publishedOptimum=frac(1, 9),
                publishedX=[frac(4, 3), frac(7, 9), frac(4, 9)],
                note="f = 9 - 8x1 - 6x2 - 4x3 + 2x1^2 + 2x2^2 + x3^2 + 2x1x2 "
                     "+ 2x1x3; x1 + x2 + 2x3 <= 3; x >= 0. f* = 1/9.")


HS51_OBJ = [([1, -1, 0, 0, 0], 0.0), ([0, 1, 1, 0, 0], 2.0),
            ([0, 0, 0, 1, 0], 1.0), ([0, 0, 0, 0, 1], 1.0)]
HS52_OBJ = [([4, -1, 0, 0, 0], 0.0), ([0, 1, 1, 0, 0], 2.0),
            ([0, 0, 0, 1, 0], 1.0), ([0, 0, 0, 0, 1], 1.0)]


def hs51():
    g, a, c = sum_of_squares(HS51_OBJ, 5)
    e = [[1.0, 3.0, 0.0, 0.0, 0.0], [0.0, 0.0, 1.0, 1.0, -2.0],
         [0.0, 1.0, 0.0, 0.0, -1.0]]
    return dict(name="HS51", source="Hock & Schittkowski (1981), problem 51",
                g=g.tolist(), a=a.tolist(), constant=c,
                eq=(e, [4.0, 0.0, 0.0]), ineq=([], []),
                publishedOptimum=0.0, publishedX=[1.0] * 5,
                note="f = (x1-x2)^2 + (x2+x3-2)^2 + (x4-1)^2 + (x5-1)^2; "
                     "x1 + 3x2 = 4, x3 + x4 - 2x5 = 0, x2 - x5 = 0. G has rank 4 "
                     "(positive semidefinite); the equalities make the "
                     "problem strictly convex on the feasible set only.")


def hs52():
    g, a, c = sum_of_squares(HS52_OBJ, 5)
    e = [[1.0, 3.0, 0.0, 0.0, 0.0], [0.0, 0.0, 1.0, 1.0, -2.0],
         [0.0, 1.0, 0.0, 0.0, -1.0]]
    return dict(name="HS52", source="Hock & Schittkowski (1981), problem 52",
                g=g.tolist(), a=a.tolist(), constant=c,
                eq=(e, [0.0, 0.0, 0.0]), ineq=([], []),
                publishedOptimum=frac(1859, 349),
                publishedX=[frac(-33, 349), frac(11, 349), frac(180, 349),
                            frac(-158, 349), frac(11, 349)],
                note="f = (4x1-x2)^2 + (x2+x3-2)^2 + (x4-1)^2 + (x5-1)^2; "
                     "x1 + 3x2 = 0, x3 + x4 - 2x5 = 0, x2 - x5 = 0. "
                     "f* = 1859/349, x* = (-33, 11, 180, -158, 11)/349. "
                     "G has rank 4 (positive semidefinite).")


def hs53():
    g, a, c = sum_of_squares(HS51_OBJ, 5)
    e = [[1.0, 3.0, 0.0, 0.0, 0.0], [0.0, 0.0, 1.0, 1.0, -2.0],
         [0.0, 1.0, 0.0, 0.0, -1.0]]
    br, bh = bounds_rows(5, [-10] * 5, [10] * 5)
    return dict(name="HS53", source="Hock & Schittkowski (1981), problem 53",
                g=g.tolist(), a=a.tolist(), constant=c,
                eq=(e, [0.0, 0.0, 0.0]), ineq=(br, bh),
                publishedOptimum=frac(176, 43),
                publishedX=[frac(-33, 43), frac(11, 43), frac(27, 43),
                            frac(-5, 43), frac(11, 43)],
                note="Objective of HS51, equalities of HS52 (right-hand sides "
                     "zero), -10 <= x <= 10 (no bound active). f* = 176/43, "
                     "x* = (-33, 11, 27, -5, 11)/43. G has rank 4 (positive "
                     "semidefinite).")


def hs76():
    # min x1^2 + 0.5x2^2 + x3^2 + 0.5x4^2 - x1x3 + x3x4 - x1 - 3x2 + x3 - x4
    g = [[2.0, 0.0, -1.0, 0.0], [0.0, 1.0, 0.0, 0.0],
         [-1.0, 0.0, 2.0, 1.0], [0.0, 0.0, 1.0, 1.0]]
    rows = [[-1.0, -2.0, -1.0, -1.0],   # x1 + 2x2 + x3 + x4 <= 5
            [-3.0, -1.0, -2.0, 1.0],    # 3x1 + x2 + 2x3 - x4 <= 4
            [0.0, 1.0, 4.0, 0.0]]       # x2 + 4x3 >= 1.5
    rhs = [-5.0, -4.0, 1.5]
    br, bh = bounds_rows(4, [0, 0, 0, 0])
    return dict(name="HS76", source="Hock & Schittkowski (1981), problem 76",
                g=g, a=[-1.0, -3.0, 1.0, -1.0], constant=0.0,
                eq=([], []), ineq=(rows + br, rhs + bh),
                publishedOptimum=-4.681818181,
                publishedX=[frac(3, 11), frac(23, 11), 0.0, frac(6, 11)],
                note="f = x1^2 + 0.5x2^2 + x3^2 + 0.5x4^2 - x1x3 + x3x4 - x1 "
                     "- 3x2 + x3 - x4; x1 + 2x2 + x3 + x4 <= 5; "
                     "3x1 + x2 + 2x3 - x4 <= 4; x2 + 4x3 >= 1.5; x >= 0. "
                     "f* printed as -4.681818181 (= -103/22); x* printed as "
                     "decimals (0.2727273, 2.090909, ~0, 0.5454545), stored "
                     "here as (3/11, 23/11, 0, 6/11).")


def hs118():
    n = 15
    lin = [2.3, 1.7, 2.2]
    quad = [0.0001, 0.0001, 0.00015]
    g = np.zeros((n, n))
    a = np.zeros(n)
    for k in range(5):
        for j in range(3):
            g[3 * k + j, 3 * k + j] = 2.0 * quad[j]
            a[3 * k + j] = lin[j]
    rows, rhs = [], []
    upper_ramp = [13.0, 14.0, 13.0]
    for blk in range(1, 5):           # 0 <= x_{3j+i} - x_{3j-3+i} + 7 <= U_i
        for i in range(3):
            r = [0.0] * n
            r[3 * blk + i] = 1.0
            r[3 * (blk - 1) + i] = -1.0
            rows.append(r)
            rhs.append(-7.0)
            rows.append([-v for v in r])
            rhs.append(7.0 - upper_ramp[i])
    for k, demand in enumerate([60.0, 50.0, 70.0, 85.0, 100.0]):
        r = [0.0] * n
        r[3 * k:3 * k + 3] = [1.0, 1.0, 1.0]
        rows.append(r)
        rhs.append(demand)
    lower = [8, 43, 3] + [0] * 12
    upper = [21, 57, 16] + [90, 120, 60] * 4
    br, bh = bounds_rows(n, lower, upper)
    return dict(name="HS118", source="Hock & Schittkowski (1981), problem 118",
                g=g.tolist(), a=a.tolist(), constant=0.0,
                eq=([], []), ineq=(rows + br, rhs + bh),
                publishedOptimum=664.82045,
                publishedX=[8.0, 49.0, 3.0, 1.0, 56.0, 0.0, 1.0, 63.0, 6.0,
                            3.0, 70.0, 12.0, 5.0, 77.0, 18.0],
                note="f = sum_{k=0..4} (2.3 x_{3k+1} + 0.0001 x_{3k+1}^2 + 1.7 "
                     "x_{3k+2} + 0.0001 x_{3k+2}^2 + 2.2 x_{3k+3} + 0.00015 "
                     "x_{3k+3}^2); ramp rows 0 <= x_{3j+i} - x_{3j-3+i} + 7 <= "
                     "(13, 14, 13) for j = 1..4, i = 1..3; block sums >= (60, "
                     "50, 70, 85, 100); 8<=x1<=21, 43<=x2<=57, 3<=x3<=16, "
                     "0 <= (x_{3k+1}, x_{3k+2}, x_{3k+3}) <= (90, 120, 60). "
                     "f* printed as 664.8204500. Highly degenerate: many ramp "
                     "rows and bounds are active at x*, G is diagonal but "
                     "tiny (eigenvalues 2e-4 and 3e-4).")


HS268_D = [[-74, 80, 18, -11, -4],
           [14, -69, 21, 28, 0],
           [66, -72, -5, 7, 1],
           [-12, 66, -30, -23, 3],
           [3, 8, -7, -4, 1]]
HS268_d = [51, -61, -56, 69, 10]


def hs268():
    g, a, c = sum_of_squares(list(zip(HS268_D, HS268_d)), 5)
    rows = [[-1.0, -1.0, -1.0, -1.0, -1.0],
            [10.0, 10.0, -3.0, 5.0, 4.0],
            [-8.0, 1.0, -2.0, -5.0, 3.0],
            [8.0, -1.0, 2.0, 5.0, -3.0],
            [-4.0, -2.0, 3.0, -5.0, 1.0]]
    rhs = [-5.0, 20.0, -40.0, 11.0, -30.0]
    return dict(name="HS268",
                source="Schittkowski (1987), Springer, problem 268 (the "
                       "continuation of Hock & Schittkowski (1981))",
                g=g.tolist(), a=a.tolist(), constant=c,
                eq=([], []), ineq=(rows, rhs),
                publishedOptimum=0.0, publishedX=[1.0, 2.0, -1.0, 3.0, -4.0],
                note="f = x'D'Dx - 2 d'Dx + d'd = ||Dx - d||^2 with the 5x5 "
                     "integer D and d = (51, -61, -56, 69, 10); constant "
                     "d'd = 14319. Five general inequality rows, no bounds. "
                     "D x* = d exactly, so f* = 0 and the fifth row is active "
                     "at x* with zero multiplier (degenerate). Problem 268 is "
                     "in the 1987 continuation volume, not the 1981 book. The "
                     "Maros & Mészáros table gives a tiny positive value "
                     "(about 5.7e-7, as remembered) for its HS268 instead of "
                     "0; 0 is used here. The large constant means f is a "
                     "difference of numbers near 1e4: compare f with an "
                     "absolute tolerance of about 1e-6, or compare x.")


def genhs28():
    n = 10
    terms = []
    for i in range(n - 1):
        v = [0.0] * n
        v[i] = 1.0
        v[i + 1] = 1.0
        terms.append((v, 0.0))
    g, a, c = sum_of_squares(terms, n)
    e = []
    for i in range(n - 2):
        r = [0.0] * n
        r[i], r[i + 1], r[i + 2] = 1.0, 2.0, 3.0
        e.append(r)
    return dict(name="GENHS28",
                source="Maros & Mészáros (1999), problem GENHS28",
                g=g.tolist(), a=a.tolist(), constant=c,
                eq=(e, [1.0] * (n - 2)), ineq=([], []),
                publishedOptimum=0.9271737142, publishedX=None,
                note="Generalisation of Hock & Schittkowski problem 28 to "
                     "n = 10: f = sum_{i=1..9} (x_i + x_{i+1})^2; "
                     "x_i + 2x_{i+1} + 3x_{i+2} = 1 for i = 1..8. Published "
                     "f* as remembered: 9.271737142E-01; no x* published. G "
                     "is positive semidefinite (rank 9). The exact optimum of "
                     "these problem data (rational KKT solve) is 4596/4957 = "
                     "0.92717369377, 2.2e-8 relative below the remembered "
                     "value: within the 1e-6 check, and of the size expected "
                     "if the table's value came from an interior-point run, "
                     "but it may also be an error in the remembered last "
                     "digits. Compare with refinedOptimum for tight checks.")


def zecevic2():
    # min -2x1 - 3x2 + 2x2^2; x1 + x2 <= 2; x1 + 4x2 <= 4; 0 <= x <= 10
    g = [[0.0, 0.0], [0.0, 4.0]]
    rows, rhs = [[-1.0, -1.0], [-1.0, -4.0]], [-2.0, -4.0]
    br, bh = bounds_rows(2, [0, 0], [10, 10])
    return dict(name="ZECEVIC2",
                source="Maros & Mészáros (1999), problem ZECEVIC2",
                g=g, a=[-2.0, -3.0], constant=0.0,
                eq=([], []), ineq=(rows + br, rhs + bh),
                publishedOptimum=-4.125, publishedX=None,
                note="f = -2x1 - 3x2 + 2x2^2; x1 + x2 <= 2; x1 + 4x2 <= 4; "
                     "0 <= x <= 10. f* = -4.125 at x = (1.75, 0.25) (x derived "
                     "by hand, not a published value). G is singular "
                     "(x1 enters linearly).")


def tame():
    # min (x1 - x2)^2; x1 + x2 = 1; x >= 0
    g, a, c = sum_of_squares([([1, -1], 0.0)], 2)
    br, bh = bounds_rows(2, [0, 0])
    return dict(name="TAME", source="Maros & Mészáros (1999), problem TAME",
                g=g.tolist(), a=a.tolist(), constant=c,
                eq=([[1.0, 1.0]], [1.0]), ineq=(br, bh),
                publishedOptimum=0.0, publishedX=None,
                note="f = (x1 - x2)^2; x1 + x2 = 1; x >= 0. f* = 0 at "
                     "x = (0.5, 0.5) (x derived by hand). G = [[2,-2],[-2,2]] "
                     "is singular.")


def qps_example():
    # min 4 + 1.5x1 - 2x2 + 1/2 (8x1^2 + 2x1x2 + 2x2x1 + 10x2^2)
    # 2x1 + x2 >= 2; -x1 + 2x2 <= 6; 0 <= x1 <= 20; x2 >= 0
    g = [[8.0, 2.0], [2.0, 10.0]]
    rows, rhs = [[2.0, 1.0], [1.0, -2.0]], [2.0, -6.0]
    br, bh = bounds_rows(2, [0, 0], [20, None])
    return dict(name="MM_QPS_EXAMPLE",
                source="Maros & Mészáros (1999), the two-variable example "
                       "used to explain the QPS format",
                g=g, a=[1.5, -2.0], constant=4.0,
                eq=([], []), ineq=(rows + br, rhs + bh),
                publishedOptimum=None, publishedX=None,
                analyticOptimum=frac(66975, 8000),
                analyticX=[frac(61, 80), frac(19, 40)],
                note="f = 4 + 1.5x1 - 2x2 + 1/2 (8x1^2 + 2x1x2 + 2x2x1 + "
                     "10x2^2); 2x1 + x2 >= 2; -x1 + 2x2 <= 6; 0 <= x1 <= 20, "
                     "x2 >= 0 (the constant 4 comes from the objective "
                     "right-hand side -4 in the QPS listing). The report gives "
                     "no optimal value for this example, so publishedOptimum "
                     "is null. analyticOptimum is derived by hand, not "
                     "published: only 2x1 + x2 >= 2 is active, x = (0.7625, "
                     "0.475), f = 20 - 30.5^2/80 = 8.371875; CVXOPT is "
                     "checked against it.")


PROBLEMS = [hs21, hs35, hs51, hs52, hs53, hs76, hs118, hs268,
            genhs28, zecevic2, tame, qps_example]


# ---------------------------------------------------------------- checks

def objective(p, x):
    g = np.array(p["g"], dtype=float)
    a = np.array(p["a"], dtype=float)
    x = np.asarray(x, dtype=float)
    return float(0.5 * x @ g @ x + a @ x + p["constant"])


def solve(p):
    g = np.array(p["g"], dtype=float)
    n = g.shape[0]
    kw = {}
    fm, fr = p["ineq"]
    if fm:
        kw["G"] = matrix(-np.array(fm, dtype=float))
        kw["h"] = matrix(-np.array(fr, dtype=float))
    em, er = p["eq"]
    if em:
        kw["A"] = matrix(np.array(em, dtype=float))
        kw["b"] = matrix(np.array(er, dtype=float))
    solvers.options.update(dict(show_progress=False, abstol=1e-12,
                                reltol=1e-12, feastol=1e-12, maxiters=200))
    # kktsolver="ldl": the default Cholesky-based KKT solver needs P + F'W F
    # positive definite, which fails for the semidefinite G with no
    # inequalities (HS52); LDL only needs rank([G; E; F]) = n.
    sol = solvers.qp(matrix(g), matrix(np.array(p["a"], dtype=float)),
                     kktsolver="ldl", **kw)
    x = np.array(sol["x"]).ravel()
    assert x.shape == (n,)
    z = np.array(sol["z"]).ravel() if fm else np.zeros(0)
    return sol["status"], x, z


def refine(p, x, z):
    """One exact KKT solve on the set of inequalities CVXOPT reports active.

    Interior-point iterates stop at a relative duality gap, so x can be off
    by about sqrt(gap / min eigenvalue) (6e-4 for HS268).  Here the rows
    with a clearly positive multiplier z (CVXOPT's) are made equalities and

        [G  A'] [x     ]   [-a]
        [A  0 ] [lambda] = [ b ]

    is solved by least squares (the active rows may be dependent).  The
    result is accepted only if it satisfies every constraint, the active
    multipliers are nonnegative and the KKT residual is tiny; otherwise
    None is returned and only CVXOPT's own x is used.
    """
    g = np.array(p["g"], dtype=float)
    a = np.array(p["a"], dtype=float)
    n = g.shape[0]
    em, er = p["eq"]
    fm, fr = p["ineq"]
    rows, rhs = [], []
    n_eq = len(em)
    rows += list(em)
    rhs += list(er)
    if fm:
        act = np.nonzero(z > 1e-7 * max(1.0, float(np.max(z))))[0]
        rows += [fm[i] for i in act]
        rhs += [fr[i] for i in act]
    m = len(rows)
    amat = np.array(rows, dtype=float).reshape(m, n)
    kkt = np.block([[g, amat.T], [amat, np.zeros((m, m))]])
    rhs_v = np.concatenate([-a, np.array(rhs, dtype=float)])
    sol = np.linalg.lstsq(kkt, rhs_v, rcond=None)[0]
    xr, lam = sol[:n], sol[n:]
    scale = max(1.0, float(np.max(np.abs(rhs_v))))
    if np.max(np.abs(kkt @ sol - rhs_v)) > 1e-10 * scale:
        return None
    if violation(p, xr) > 1e-10 * max(1.0, float(np.max(np.abs(xr)))):
        return None
    # G x + a = A' lambda with lambda >= 0 for the inequality rows.
    if m > n_eq and np.min(-lam[n_eq:]) < -1e-9:
        return None
    return xr


def violation(p, x):
    x = np.asarray(x, dtype=float)
    v = 0.0
    em, er = p["eq"]
    if em:
        v = max(v, float(np.max(np.abs(np.array(em) @ x - np.array(er)))))
    fm, fr = p["ineq"]
    if fm:
        v = max(v, float(np.max(np.array(fr) - np.array(fm) @ x)))
    return max(v, 0.0)


def agree(ref, val):
    if ref == 0.0:
        return abs(val) <= ABS_TOL, abs(val)
    d = abs(val - ref) / abs(ref)
    return d <= REL_TOL, d


def to_json(obj, depth=0):
    """JSON with one line per vector / matrix row; floats round-trip."""
    pad = "  " * (depth + 1)
    end = "  " * depth
    if isinstance(obj, dict):
        if not obj:
            return "{}"
        items = [pad + json.dumps(k, ensure_ascii=False) + ": " + to_json(v, depth + 1)
                 for k, v in obj.items()]
        return "{\n" + ",\n".join(items) + "\n" + end + "}"
    if isinstance(obj, list):
        if not obj:
            return "[]"
        if all(not isinstance(v, (list, dict)) for v in obj):
            return "[" + ", ".join(json.dumps(v, allow_nan=False)
                                   for v in obj) + "]"
        return ("[\n" + ",\n".join(pad + to_json(v, depth + 1) for v in obj)
                + "\n" + end + "]")
    return json.dumps(obj, allow_nan=False, ensure_ascii=False)


def main():
    failures = []
    cases = []
    header = ("%-15s %3s %4s %5s %17s %19s %9s %19s %9s %11s"
              % ("problem", "n", "#eq", "#ineq", "published f*", "CVXOPT f",
                 "diff", "refined f", "diff", "min eig G"))
    print(header)
    print("-" * len(header))
    for make in PROBLEMS:
        p = make()
        name = p["name"]
        g = np.array(p["g"], dtype=float)
        n = g.shape[0]
        if not np.array_equal(g, g.T):
            failures.append(name + ": G not symmetric")
        eig = np.linalg.eigvalsh(g)
        min_eig = float(eig[0])
        strict = bool(min_eig > 1e-12 * max(1.0, float(eig[-1])))
        if abs(min_eig) < 1e-12 * max(1.0, float(eig[-1])):
            min_eig = 0.0   # exact zero in exact arithmetic (rank-deficient G)

        status, x, z = solve(p)
        if status != "optimal":
            failures.append("%s: CVXOPT status %s" % (name, status))
        f_cvx = objective(p, x)
        viol = violation(p, x)
        if viol > 1e-8:
            failures.append("%s: CVXOPT x infeasible by %g" % (name, viol))

        ref = p["publishedOptimum"]
        kind = "published"
        if ref is None:
            ref = p.get("analyticOptimum")
            kind = "analytic"
        ok, diff = agree(ref, f_cvx)
        if not ok:
            failures.append("%s: CVXOPT f %.12g vs %s f* %.12g (diff %.3g)"
                            % (name, f_cvx, kind, ref, diff))
        xr = refine(p, x, z)
        if xr is None:
            failures.append("%s: KKT refinement rejected" % name)
            xr = x
        f_ref = objective(p, xr)
        okr, diff_r = agree(ref, f_ref)
        if not okr:
            failures.append("%s: refined f %.12g vs %s f* %.12g"
                            % (name, f_ref, kind, ref))
        if f_ref > f_cvx + 1e-9 * max(1.0, abs(f_cvx)):
            failures.append("%s: refined f worse than CVXOPT's" % name)
        if np.max(np.abs(xr - x)) > 1e-5 * max(1.0, float(np.max(np.abs(x)))):
            print("  note: %s: refined x moved by %.2g from CVXOPT's x"
                  % (name, float(np.max(np.abs(xr - x)))))
        x_best = xr

        for key in ("publishedX", "analyticX"):
            xs = p.get(key)
            if xs is None:
                continue
            v = violation(p, xs)
            if v > FEAS_TOL:
                failures.append("%s: %s infeasible by %g" % (name, key, v))
            ok2, d2 = agree(ref, objective(p, xs))
            if not ok2:
                failures.append("%s: f(%s) = %.12g differs from f* %.12g"
                                % (name, key, objective(p, xs), ref))
            dx = float(np.max(np.abs(np.asarray(xs) - x_best)))
            if dx > 1e-7 * max(1.0, float(np.max(np.abs(xs)))):
                failures.append("%s: refined x differs from %s by %.2g"
                                % (name, key, dx))

        em, er = p["eq"]
        fm, fr = p["ineq"]
        print("%-15s %3d %4d %5d %17s %19.12g %9.2g %19.12g %9.2g %11.4g"
              % (name, n, len(em), len(fm),
                 ("%.10g" % ref) + ("" if kind == "published" else " (a)"),
                 f_cvx, diff, f_ref, diff_r, min_eig))

        case = {
            "name": name,
            "source": p["source"],
            "fromMemory": True,
            "g": p["g"],
            "a": [float(v) for v in p["a"]],
            "constant": float(p["constant"]),
            "eq": {"matrix": em, "rhs": [float(v) for v in er]},
            "ineq": {"matrix": fm, "rhs": [float(v) for v in fr]},
            "publishedOptimum": p["publishedOptimum"],
            "publishedX": p["publishedX"],
        }
        if "analyticOptimum" in p:
            case["analyticOptimum"] = p["analyticOptimum"]
            case["analyticX"] = p["analyticX"]
        case.update({
            "cvxoptOptimum": f_cvx,
            "cvxoptX": x.tolist(),
            "refinedOptimum": f_ref,
            "refinedX": xr.tolist(),
            "minEigenvalue": min_eig,
            "strictlyConvex": strict,
            "note": p["note"] + " Problem data and published values are "
                    "from memory (printed source not consulted); the "
                    "agreement of CVXOPT's optimum with f* is the independent "
                    "check." + ("" if strict else
                                " G is only positive semidefinite: skip "
                                "checks that need strict convexity."),
        })
        cases.append(case)

    print("(a) = no published f*; compared with the hand-derived optimum.")
    print("diff = relative difference, absolute when f* = 0.")

    doc = {
        "source": "Hock & Schittkowski (1981), Springer; Schittkowski (1987), "
                  "Springer (problem 268); Maros & Mészáros (1999), Optim. "
                  "Methods Softw. 11–12; cross-checked with CVXOPT %s "
                  "solvers.qp" % cvxopt.__version__,
        "form": "minimise 1/2 x'Gx + a'x + constant subject to eq.matrix x = "
                "eq.rhs and ineq.matrix x >= ineq.rhs (bounds are rows of "
                "ineq)",
        "cases": cases,
    }
    if failures:
        print("\nFAILED CHECKS:")
        for f in failures:
            print("  " + f)
        sys.exit(1)
    with open(OUT, "w", encoding="utf-8") as fh:
        fh.write(to_json(doc) + "\n")
    print("\nall checks passed; wrote " + os.path.normpath(OUT))


if __name__ == "__main__":
    main()
