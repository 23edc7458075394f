#!/usr/bin/python3
"""Reference fixtures for Lookahead.Core.Tests.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 tests/reference/generate_fixtures.py

It writes JSON files into tests/Lookahead.Core.Tests/Fixtures/ and
tests/reference/benchmark_models.json.  All random data comes from
numpy.random.default_rng with a fixed seed per case, so the output is
byte-for-byte reproducible with the same library versions.

What each fixture checks and how it was computed
------------------------------------------------
expm.json
    Matrix exponential.  Computed with scipy.linalg.expm (Pade approximation
    with scaling and squaring).  Cases cover the zero matrix, diagonal,
    nilpotent, a rotation generator, random matrices with norms from 1e-2 to
    1e2 (different numbers of squarings), a non-normal matrix and a 12x12.

zoh.json
    Zero-order-hold discretisation (ad = e^{aT}, bd = int_0^T e^{a s} ds b).
    Computed with scipy.signal.cont2discrete(method='zoh').

dare.json
    Stabilising solution p of the discrete algebraic Riccati equation
        p = a'pa - a'pb (r + b'pb)^{-1} b'pa + q
    computed with scipy.linalg.solve_discrete_are(a, b, q, r).  Every case is
    verified here: equation residual, symmetry and spectral radius of
    a - b k < 1.  The "refused" list holds systems for which no stabilising
    solution exists (checked here with the Hautus test); no "p" is given.
    Note: for the unobservable unit-circle mode case SciPy does return a
    matrix, but it is not stabilising - a correct implementation must refuse.
    "published" holds SciPy's own discrete-time Riccati test cases, read (not
    copied) from scipy/linalg/tests/test_solvers.py as shipped by Debian's
    python3-scipy (function test_solve_discrete_are: its "cases" list, mostly
    the darex examples of Benner, Laub & Mehrmann 1995, and its "min_decimal"
    residual tolerances).  The file is parsed with the ast module; the case
    expressions are evaluated with numpy only.  For every case SciPy's test
    expects to pass, p comes from solve_discrete_are and is checked here
    against SciPy's own residual tolerance, symmetry and spectral radius.
    Cases SciPy marks as known failures keep their data and tolerance but get
    no p.  Complex cases and cases with a singular r (outside the solver's
    r > 0 domain, though a stabilising solution exists) are listed under
    "omitted" with the reason.  None of the included cases lacks a
    stabilising solution (Hautus test), so none is added to "refused".

unconstrained_plans.json
    Finite-horizon plans without limits.  For horizon N, output y_k = C x_k:
        J = sum_{k=0}^{N-1} [ (y_k-r)'Q(y_k-r) + (u_k-u_s)'R(u_k-u_s)
                              + du_k' S du_k ] + (x_N-x_s)' P (x_N-x_s)
    du_k = u_k - u_{k-1}; the du_0 term is present only when the case gives
    "previousInput".  The k = 0 output term is a constant but it is part of
    "cost".  The problem is solved in its sparse form: unknowns
    z = [x_1..x_N, u_0..u_{N-1}], dynamics as equality constraints, the KKT
    system [[H, E'], [E, 0]] [z; lambda] = [-f; e] solved with
    numpy.linalg.solve (no condensing).  "cost" is J evaluated from the
    formula on the resulting trajectory.  Checks done here: KKT residual,
    central-difference gradient of J (evaluated from the formula, not from H)
    at the plan, zero plan from x0 = 0, and u_0 = -K x_0 (u_0 - u_s =
    -K (x_0 - x_s) for reachable targets) when the terminal weight is the
    Riccati solution and S = 0.
    Steady-state target for tracking cases: x_s = A x_s + B u_s minimising
    (C x_s - r)'Q(C x_s - r); ties broken by minimum ||u_s||, then minimum
    ||x_s||.  Computed lexicographically: orthonormal null space of
    [A - I, B] (scipy.linalg.null_space, rcond 1e-10), then three nested
    minimum-norm least-squares problems (numpy.linalg.svd with an absolute
    cut-off of 1e-10), each restricted to the null space of the previous one.

constrained_plans.json
    The same problem plus hard input and input-rate limits and soft output
    limits on y_1..y_N with one nonnegative slack e_j per output shared over
    the horizon, penalty sum_j (rho_j e_j + w_j e_j^2).  Solved in the sparse
    form (states, inputs and slacks as unknowns) with cvxopt.solvers.qp
    (abstol = reltol = feastol = 1e-12, maxiters 200, status must be
    'optimal'; kktsolver='ldl', because the default Cholesky-based KKT solver
    stops on a numerically singular matrix in one case at these tolerances).  Checks done here: equality/inequality residuals,
    stationarity with the returned multipliers, and an active-set polish
    (equality-constrained KKT with the active rows, numpy.linalg.lstsq) that
    must agree with the CVXOPT solution.
    Steady-state targets in constrained tracking cases: the references were
    chosen so that the unconstrained target (same definition as above)
    respects the hard input limits; the generator asserts this.  No
    constrained target QP is needed.

benchmark_models.json (in tests/reference/)
    Three models for timing: six masses in a chain (continuous, ZOH at 0.5 s),
    a random stable 4-state 2-input system with N = 100, and a random
    50-state 10-input system with N = 50.  Each entry carries the reference
    plan (inputs, cost) computed as above.
"""

import ast
import json
import os
import platform
import re
import sys

import numpy as np
import scipy
import scipy.linalg as sla
import scipy.signal as ssig
import cvxopt
import cvxopt.solvers

HERE = os.path.dirname(os.path.abspath(__file__))
REPO = os.path.abspath(os.path.join(HERE, "..", ".."))
FIXTURES = os.path.join(REPO, "tests", "Lookahead.Core.Tests", "Fixtures")
BENCHMARK_FILE = os.path.join(HERE, "benchmark_models.json")

VERSIONS = "SciPy %s, NumPy %s, Python %s" % (
    scipy.__version__, np.__version__, platform.python_version())
LINEAR_VIOLATION_WEIGHT = 1e5
NULL_RCOND = 1e-10

CHECKS = {}          # name -> worst value seen, printed at the end


def record(check, value):
    CHECKS[check] = max(CHECKS.get(check, 0.0), float(value))


# ----------------------------------------------------------------- helpers

def to_list(x):
    """numpy array / scalar -> nested lists of Python floats (None kept)."""
    if x is None:
        return None
    if isinstance(x, (list, tuple)):
        return [to_list(v) for v in x]
    a = np.asarray(x, dtype=float)
    if a.ndim == 0:
        return float(a)
    return [to_list(v) for v in a]


def dumps(obj, indent=0):
    """JSON text with numeric lists kept on one line (full repr precision)."""
    pad = " " * indent
    inner = " " * (indent + 1)
    if isinstance(obj, dict):
        if not obj:
            return "{}"
        items = [inner + json.dumps(k) + ": " + dumps(v, indent + 1)
                 for k, v in obj.items()]
        return "{\n" + ",\n".join(items) + "\n" + pad + "}"
    if isinstance(obj, list):
        if all(not isinstance(v, (list, dict)) for v in obj):
            return "[" + ", ".join(json.dumps(v, allow_nan=False) for v in obj) + "]"
        if all(isinstance(v, list) and all(not isinstance(w, (list, dict)) for w in v)
               for v in obj):
            rows = [inner + dumps(v, indent + 1) for v in obj]
            return "[\n" + ",\n".join(rows) + "\n" + pad + "]"
        items = [inner + dumps(v, indent + 1) for v in obj]
        return "[\n" + ",\n".join(items) + "\n" + pad + "]"
    return json.dumps(obj, allow_nan=False)


def write_json(path, obj):
    text = dumps(obj) + "\n"
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(text)
    size = len(text.encode("utf-8"))
    assert size < 2_000_000, (path, size)
    print("wrote %-70s %9d bytes" % (os.path.relpath(path, REPO), size))


def weight_matrix(w, dim):
    w = np.asarray(w, dtype=float)
    if w.ndim == 1:
        assert w.shape == (dim,)
        return np.diag(w)
    assert w.shape == (dim, dim)
    return w


def spectral_radius(a):
    return float(max(abs(np.linalg.eigvals(a))))


def zoh(a, b, t):
    n, m = b.shape
    ad, bd, _, _, _ = ssig.cont2discrete((a, b, np.eye(n), np.zeros((n, m))), t, method="zoh")
    return ad, bd


# ----------------------------------------------------------------- models

def double_integrator():
    return np.array([[0.0, 1.0], [0.0, 0.0]]), np.array([[0.0], [1.0]])


def cold_storage_continuous():
    """Three-zone cold-storage warehouse, temperatures as deviations (K).

    States: air temperature of zone 1 (chiller bay), zone 2 (loading dock,
    next to the door), zone 3 (deep store).  Time unit: seconds.
    Inputs: chiller 1 cooling power (kW, acts on zone 1), chiller 2 cooling
    power (kW, acts on zone 3), door fan (fraction, moves cold air from zone 1
    into zone 2).  Capacities in kJ/K, conductances in kW/K; the time
    constants are 10-30 minutes.
    """
    cap = np.array([800.0, 600.0, 900.0])
    g12, g23 = 0.5, 0.4
    g_amb = np.array([0.3, 0.6, 0.25])
    g = np.array([[0.0, g12, 0.0], [g12, 0.0, g23], [0.0, g23, 0.0]])
    a = (g - np.diag(g.sum(axis=1) + g_amb)) / cap[:, None]
    fan = 0.6   # kW-equivalent heat moved per unit fan command
    b = np.array([[-1.0, 0.0, fan],
                  [0.0, 0.0, -fan],
                  [0.0, -1.0, 0.0]]) / cap[:, None]
    return a, b


def six_masses_continuous(damping=0.01):
    """Six unit masses in a chain, seven unit springs (walls at both ends).

    A damper of coefficient `damping` sits in parallel with every spring.
    State x = [q1..q6, v1..v6]; inputs are forces on masses 1, 3 and 5.
    """
    k = 2.0 * np.eye(6) - np.eye(6, k=1) - np.eye(6, k=-1)
    a = np.block([[np.zeros((6, 6)), np.eye(6)], [-k, -damping * k]])
    b = np.zeros((12, 3))
    b[6 + 0, 0] = 1.0
    b[6 + 2, 1] = 1.0
    b[6 + 4, 2] = 1.0
    return a, b


def random_stable(rng, n, m, radius):
    a = rng.standard_normal((n, n))
    a *= radius / spectral_radius(a)
    b = rng.standard_normal((n, m))
    return a, b


def unstable_3x1():
    a = np.array([[1.1, 0.2, 0.0],
                  [0.0, 0.9, 0.3],
                  [0.1, 0.0, 0.7]])
    b = np.array([[0.0], [0.5], [1.0]])
    return a, b


def four_state_two_input():
    a = np.array([[0.95, 0.10, 0.00, 0.02],
                  [-0.05, 0.90, 0.05, 0.00],
                  [0.00, 0.10, 1.02, 0.10],
                  [0.02, 0.00, -0.10, 0.85]])
    b = np.array([[0.1, 0.0], [1.0, 0.0], [0.0, 0.1], [0.0, 1.0]])
    c = np.array([[1.0, 0.0, 0.5, 0.0], [0.0, 0.0, 1.0, 0.0]])
    return a, b, c


# ----------------------------------------------------------------- expm

def gen_expm():
    cases = []

    def add(name, a):
        a = np.asarray(a, dtype=float)
        e = sla.expm(a)
        cases.append({"name": name, "a": to_list(a), "expm": to_list(e)})

    add("zero-3x3", np.zeros((3, 3)))
    add("diagonal-4x4", np.diag([-2.0, 0.0, 0.5, 3.0]))
    add("nilpotent-3x3", [[0.0, 1.0, 2.0], [0.0, 0.0, 3.0], [0.0, 0.0, 0.0]])
    add("rotation-generator-2x2", 2.0 * np.array([[0.0, 1.0], [-1.0, 0.0]]))
    for norm, seed in ((0.01, 101), (1.0, 102), (10.0, 103), (100.0, 104)):
        rng = np.random.default_rng(seed)
        a = rng.standard_normal((5, 5))
        a *= norm / np.linalg.norm(a, 1)
        add("random-5x5-norm-%g" % norm, a)
    add("non-normal-4x4", [[-1.0, 10.0, 0.0, 0.0],
                           [0.0, -1.0, 10.0, 0.0],
                           [0.0, 0.0, -2.0, 50.0],
                           [0.0, 0.0, 0.0, -3.0]])
    rng = np.random.default_rng(105)
    add("random-12x12", rng.standard_normal((12, 12)) / np.sqrt(12.0))
    a, _ = cold_storage_continuous()
    add("cold-storage-thermal-times-60s", 60.0 * a)
    write_json(os.path.join(FIXTURES, "expm.json"), {
        "source": "scipy.linalg.expm, " + VERSIONS, "cases": cases})
    return [c["name"] for c in cases]


# ----------------------------------------------------------------- zoh

def gen_zoh():
    cases = []

    def add(name, a, b, t):
        a = np.asarray(a, dtype=float)
        b = np.asarray(b, dtype=float)
        ad, bd = zoh(a, b, t)
        # independent check with the augmented exponential
        n, m = b.shape
        big = np.zeros((n + m, n + m))
        big[:n, :n] = a * t
        big[:n, n:] = b * t
        e = sla.expm(big)
        record("zoh: |cont2discrete - augmented expm|", max(
            abs(e[:n, :n] - ad).max(), abs(e[:n, n:] - bd).max()))
        cases.append({"name": name, "a": to_list(a), "b": to_list(b), "sampleTime": float(t),
                      "ad": to_list(ad), "bd": to_list(bd)})

    a, b = double_integrator()
    add("double-integrator-T0.1", a, b, 0.1)
    add("double-integrator-T2", a, b, 2.0)
    add("first-order-lag-T0.5", [[-1.0]], [[1.0]], 0.5)
    mass, stiff, damp = 2.0, 8.0, 0.8
    add("mass-spring-damper-T0.05", [[0.0, 1.0], [-stiff / mass, -damp / mass]],
        [[0.0], [1.0 / mass]], 0.05)
    add("integrator-chain-3-T0.2", np.eye(3, k=1), [[0.0], [0.0], [1.0]], 0.2)
    a, b = cold_storage_continuous()
    add("cold-storage-3-zone-T60", a, b, 60.0)
    rng = np.random.default_rng(201)
    a = rng.standard_normal((6, 6))
    a = a - (max(np.linalg.eigvals(a).real) + 0.5) * np.eye(6)
    add("random-stable-6x2-T0.3", a, rng.standard_normal((6, 2)), 0.3)
    write_json(os.path.join(FIXTURES, "zoh.json"), {
        "source": "scipy.signal.cont2discrete(method='zoh'), " + VERSIONS, "cases": cases})
    return [c["name"] for c in cases]


# ----------------------------------------------------------------- dare

def lqr_gain(a, b, r, p):
    return np.linalg.solve(r + b.T @ p @ b, b.T @ p @ a)


def dare(a, b, q, r):
    p = sla.solve_discrete_are(a, b, q, r)
    k = lqr_gain(a, b, r, p)
    res = a.T @ p @ a - p - a.T @ p @ b @ k + q
    record("dare: relative equation residual", abs(res).max() / max(1.0, abs(p).max()))
    record("dare: relative asymmetry of p", abs(p - p.T).max() / max(1.0, abs(p).max()))
    rho = spectral_radius(a - b @ k)
    assert rho < 1.0, rho
    record("dare: closed-loop spectral radius (must be < 1)", rho)
    return p


def hautus_fails(a, b, q):
    """True if (a, b) is not stabilisable or (q, a) has an unobservable
    mode on the unit circle - then no stabilising solution exists."""
    n = a.shape[0]
    for lam in np.linalg.eigvals(a):
        m_ctrb = np.hstack([lam * np.eye(n) - a, b])
        if abs(lam) >= 1 - 1e-12 and np.linalg.matrix_rank(m_ctrb, 1e-9) < n:
            return True
        m_obs = np.vstack([lam * np.eye(n) - a, q])
        if abs(abs(lam) - 1) < 1e-12 and np.linalg.matrix_rank(m_obs, 1e-9) < n:
            return True
    return False


def gen_dare():
    cases = []

    def add(name, a, b, q, r):
        a, b, q, r = (np.asarray(v, dtype=float) for v in (a, b, q, r))
        assert not hautus_fails(a, b, q)
        p = dare(a, b, q, r)
        cases.append({"name": name, "a": to_list(a), "b": to_list(b), "q": to_list(q),
                      "r": to_list(r), "p": to_list(p)})

    add("stable-2x1", [[0.9, 0.2], [0.0, 0.7]], [[0.0], [1.0]], np.eye(2), [[0.5]])
    a, b = unstable_3x1()
    assert spectral_radius(a) > 1.0
    add("unstable-3x1", a, b, np.diag([1.0, 2.0, 0.5]), [[1.0]])
    a, b, c = four_state_two_input()
    qy = np.diag([3.0, 1.0])
    add("four-state-two-input-output-weight", a, b, c.T @ qy @ c, [[0.5, 0.1], [0.1, 1.0]])
    add("double-integrator-T0.1-marginal", [[1.0, 0.1], [0.0, 1.0]], [[0.005], [0.1]],
        np.diag([1.0, 0.0]), [[0.01]])
    ac, bc = cold_storage_continuous()
    ad, bd = zoh(ac, bc, 60.0)
    add("cold-storage-3-zone-T60", ad, bd, np.eye(3), np.diag([0.01, 0.01, 1.0]))
    rng = np.random.default_rng(301)
    a, b = random_stable(rng, 8, 3, 1.05)
    m = rng.standard_normal((8, 8))
    add("random-8x3", a, b, m @ m.T / 8.0 + 0.1 * np.eye(8), np.diag([1.0, 2.0, 0.5]))
    t = np.diag([0.03, 1.0, 30.0])
    a0 = np.array([[0.9, 0.5, 0.2], [-0.3, 1.01, 0.4], [0.1, -0.6, 0.8]])
    a = t @ a0 @ np.linalg.inv(t)
    b = t @ np.array([[1.0, 0.0], [0.0, 0.0], [0.0, 1.0]])
    tinv = np.linalg.inv(t)
    add("badly-scaled-3x2", a, b, tinv @ np.diag([1.0, 5.0, 2.0]) @ tinv,
        np.diag([1e-3, 1e3]))

    refused = []

    def refuse(name, a, b, q, r, reason):
        a, b, q, r = (np.asarray(v, dtype=float) for v in (a, b, q, r))
        assert hautus_fails(a, b, q), name
        refused.append({"name": name, "a": to_list(a), "b": to_list(b), "q": to_list(q),
                        "r": to_list(r), "reason": reason})

    refuse("not-stabilisable-unstable-mode-unreachable", np.diag([1.2, 0.5]), [[0.0], [1.0]],
           np.eye(2), [[1.0]],
           "eigenvalue 1.2 (first state) is not reachable from b: (a, b) is not stabilisable")
    refuse("not-stabilisable-unit-mode-unreachable", np.diag([1.0, 0.5]), [[0.0], [1.0]],
           np.eye(2), [[1.0]],
           "eigenvalue 1 (integrating first state) is not reachable from b: "
           "(a, b) is not stabilisable")
    refuse("not-stabilisable-two-input-coupled", [[1.1, 0.0, 0.0], [0.0, 0.8, 0.1], [0.0, 0.0, 0.5]],
           [[0.0, 0.0], [1.0, 0.0], [0.0, 1.0]], np.eye(3), np.eye(2),
           "eigenvalue 1.1 (first state, decoupled) is not reachable from either input")
    refuse("no-stabilising-solution-unit-mode-unobserved", np.diag([1.0, 0.5]), [[1.0], [1.0]],
           np.diag([0.0, 1.0]), [[1.0]],
           "eigenvalue 1 is not seen by q (unobservable mode on the unit circle): "
           "the minimal-cost solution leaves it at 1, no stabilising solution exists")
    published = gen_published_dare()
    write_json(os.path.join(FIXTURES, "dare.json"), {
        "source": "scipy.linalg.solve_discrete_are, " + VERSIONS,
        "cases": cases, "refused": refused, "published": published})
    return ([c["name"] for c in cases], [c["name"] for c in refused],
            [c["name"] for c in published["cases"]])


SCIPY_SOLVER_TESTS = os.path.join(os.path.dirname(scipy.__file__), "linalg", "tests",
                                  "test_solvers.py")
SCIPY_DARE_TEST = "test_solve_discrete_are"


def scipy_dare_test_cases():
    """The (a, b, q, r, knownfailure) cases, min_decimal tolerances, comment
    labels and skip marks of SciPy's test_solve_discrete_are, read from the
    installed test file: the list literals are found with the ast module and
    evaluated with numpy as their only name."""
    with open(SCIPY_SOLVER_TESTS, encoding="utf-8") as fh:
        text = fh.read()
    tree = ast.parse(text)
    test = next(node for node in tree.body
                if isinstance(node, ast.FunctionDef) and node.name == SCIPY_DARE_TEST)
    values = {}
    for statement in test.body:
        if isinstance(statement, ast.Assign):
            for target in statement.targets:
                if isinstance(target, ast.Name):
                    values[target.id] = statement.value

    def evaluate(node):
        return eval(compile(ast.Expression(node), SCIPY_SOLVER_TESTS, "eval"),
                    {"__builtins__": {}, "np": np})

    raw_cases = evaluate(values["cases"])
    min_decimal = evaluate(values["min_decimal"])
    assert len(raw_cases) == len(min_decimal), (len(raw_cases), len(min_decimal))
    # Each case is introduced by a comment "# TEST CASE k : label".
    block = text.splitlines()[values["cases"].lineno - 1:values["cases"].end_lineno]
    labels = {}
    for line in block:
        found = re.match(r"\s*#\s*TEST CASE (\d+)\s*:\s*(.*?)\s*$", line)
        if found:
            labels[int(found.group(1))] = found.group(2)
    assert sorted(labels) == list(range(len(raw_cases))), sorted(labels)
    skipped = any("skip" in ast.unparse(d) for d in test.decorator_list)
    return raw_cases, min_decimal, labels, skipped


def scipy_residual(a, b, q, r, x):
    """The residual SciPy's test computes: a'xa - x + q - a'xb (r + b'xb)^{-1} b'xa."""
    res = a.T @ x @ a - x + q
    return res - a.T @ x @ b @ sla.solve(r + b.T @ x @ b, b.T) @ x @ a


def gen_published_dare():
    raw_cases, min_decimal, labels, skipped = scipy_dare_test_cases()
    cases = []
    omitted = []
    for index, (a, b, q, r, knownfailure) in enumerate(raw_cases):
        darex = re.match(r"darex #(\d+)", labels[index])
        name = "scipy-darex-%s" % darex.group(1) if darex else "scipy-case-%d" % index
        if any(np.iscomplexobj(np.asarray(v)) for v in (a, b, q, r)):
            omitted.append({"name": name, "scipyCase": index,
                            "reason": "complex data; plants and weights are real"})
            continue
        a, b, q, r = (np.atleast_2d(np.asarray(v, dtype=float)) for v in (a, b, q, r))
        rank = np.linalg.matrix_rank(r)
        if rank < r.shape[0]:
            # Not a refusal: SciPy's stabilising answer is checked here, so a solution exists.
            p = sla.solve_discrete_are(a, b, q, r)
            decimal = int(min_decimal[index])
            assert abs(scipy_residual(a, b, q, r, p)).max() < 1.5 * 10.0 ** (-decimal), name
            assert spectral_radius(a - b @ lqr_gain(a, b, r, p)) < 1.0, name
            q_note = ("" if np.linalg.eigvalsh(q).min() >= 0
                      else "; q is indefinite as well")
            omitted.append({"name": name, "scipyCase": index,
                            "reason": "r is singular (rank %d of %d): outside the solver's "
                            "domain r > 0, although a stabilising solution exists (SciPy's "
                            "meets its residual tolerance and stabilises)%s"
                            % (rank, r.shape[0], q_note)})
            continue
        # Every included case has a stabilising solution, so none belongs in "refused".
        assert np.linalg.eigvalsh(q).min() >= -1e-12 * max(1.0, abs(q).max()), name
        assert not hautus_fails(a, b, q), name
        decimal = int(min_decimal[index])
        case = {"name": name, "scipyCase": index, "a": to_list(a), "b": to_list(b),
                "q": to_list(q), "r": to_list(r), "residualDecimal": decimal,
                "scipyExpectsFailure": knownfailure is not None}
        if knownfailure is None:
            p = sla.solve_discrete_are(a, b, q, r)
            worst = abs(scipy_residual(a, b, q, r, p)).max()
            assert worst < 1.5 * 10.0 ** (-decimal), (name, worst, decimal)
            record("dare published: SciPy residual / its own tolerance",
                   worst / (1.5 * 10.0 ** (-decimal)))
            assert abs(p - p.T).max() <= 1e-14 * max(1.0, abs(p).max()), name
            rho = spectral_radius(a - b @ lqr_gain(a, b, r, p))
            assert rho < 1.0, (name, rho)
            case["p"] = to_list(p)
        cases.append(case)
    notes = [
        "Read from scipy/linalg/tests/test_solvers.py (SciPy %s, Debian python3-scipy), "
        "function %s: its cases list and its min_decimal tolerances."
        % (scipy.__version__, SCIPY_DARE_TEST),
        "scipyCase is the case's index in that list; darex #k names example k of the "
        "discrete-time collection of Benner, Laub & Mehrmann (1995) as the file labels it.",
        "residualDecimal is SciPy's min_decimal: its test requires every entry of "
        "a'xa - x + q - a'xb (r + b'xb)^{-1} b'xa to be below 1.5 * 10^-residualDecimal "
        "in absolute value (numpy.testing.assert_array_almost_equal).",
        "scipyExpectsFailure: SciPy's test marks the case as a known failure (xfail); such "
        "cases carry no p.  p, where given, is scipy.linalg.solve_discrete_are's answer, "
        "checked here against the residual tolerance, symmetry and closed-loop "
        "spectral radius < 1.",
    ]
    if skipped:
        notes.append("SciPy %s marks the whole test as skipped; this script runs SciPy's "
                     "checks itself on every case it solves." % scipy.__version__)
    return {"source": "scipy/linalg/tests/test_solvers.py, SciPy %s (%s); p from "
                      "scipy.linalg.solve_discrete_are, %s"
                      % (scipy.__version__, SCIPY_DARE_TEST, VERSIONS),
            "notes": notes, "cases": cases, "omitted": omitted}


# ----------------------------------------------------------------- targets

def psd_sqrt(q):
    w, v = np.linalg.eigh((q + q.T) / 2.0)
    return (v * np.sqrt(np.clip(w, 0.0, None))) @ v.T


def min_norm_lstsq(w, rhs, tol):
    """Minimum-norm least-squares solution of w v = rhs and an orthonormal
    basis of the null space of w, with an ABSOLUTE singular-value cut-off
    (a relative one would treat a numerically zero matrix as full rank)."""
    k = w.shape[1]
    if w.shape[0] == 0 or k == 0:
        return np.zeros(k), np.eye(k)
    u, sv, vt = np.linalg.svd(w, full_matrices=True)
    rank = int(np.sum(sv > tol))
    v = (vt[:rank].T / sv[:rank]) @ (u[:, :rank].T @ rhs)
    return v, vt[rank:].T


def steady_target(a, b, c, q, r):
    """Lexicographic target: min (C x - r)'Q(C x - r), then ||u||, then ||x||,
    subject to x = A x + B u."""
    n, m = b.shape
    z = sla.null_space(np.hstack([a - np.eye(n), b]), rcond=NULL_RCOND)
    zx, zu = z[:n], z[n:]          # z has orthonormal columns
    qh = psd_sqrt(q)
    # level 1: weighted output error
    w1 = qh @ c @ zx
    tol1 = NULL_RCOND * max(1.0, np.linalg.norm(qh @ c, 2))
    alpha, n1 = min_norm_lstsq(w1, qh @ r, tol1)
    ties = n1.shape[1]
    # level 2: input norm within the ties of level 1
    beta, n2 = min_norm_lstsq(zu @ n1, -zu @ alpha, NULL_RCOND)
    alpha = alpha + n1 @ beta
    n12 = n1 @ n2
    # level 3: state norm within the remaining ties
    gamma, _ = min_norm_lstsq(zx @ n12, -zx @ alpha, NULL_RCOND)
    alpha = alpha + n12 @ gamma
    xs, us = zx @ alpha, zu @ alpha
    record("target: equilibrium residual |A xs + B us - xs|",
           abs(a @ xs + b @ us - xs).max() / max(1.0, abs(xs).max()))
    reached = bool(abs(c @ xs - r).max() <= 1e-9 * max(1.0, abs(r).max()))
    return xs, us, reached, int(ties)


# ----------------------------------------------------------------- plans

class Problem:
    """One planning problem in arrays (all weights as full matrices)."""

    def __init__(self, name, a, b, c, sample_time, horizon, q, r, s, terminal, x0,
                 reference=None, previous_input=None, limits=None, q_repr=None,
                 r_repr=None, s_repr=None, model_c=True, time_domain="discrete",
                 continuous=None):
        self.name = name
        self.a, self.b = np.asarray(a, float), np.asarray(b, float)
        self.n, self.m = self.b.shape
        self.c = np.eye(self.n) if c is None else np.asarray(c, float)
        self.has_c = c is not None and model_c
        self.p = self.c.shape[0]
        self.sample_time = float(sample_time)
        self.N = int(horizon)
        self.q_repr, self.r_repr, self.s_repr = q_repr, r_repr, s_repr
        self.Q = weight_matrix(q, self.p)
        self.R = weight_matrix(r, self.m)
        self.S = np.zeros((self.m, self.m)) if s is None else weight_matrix(s, self.m)
        self.s_given = s is not None
        self.terminal_kind = terminal
        if isinstance(terminal, str) and terminal == "riccati":
            self.P = dare(self.a, self.b, self.c.T @ self.Q @ self.c, self.R)
        elif isinstance(terminal, str) and terminal == "stage":
            self.P = self.c.T @ self.Q @ self.c
        else:
            self.P = np.asarray(terminal, float)
            assert min(np.linalg.eigvalsh(self.P)) >= -1e-12
        self.x0 = np.asarray(x0, float)
        self.r = None if reference is None else np.asarray(reference, float)
        self.uprev = None if previous_input is None else np.asarray(previous_input, float)
        self.limits = limits
        self.time_domain = time_domain
        self.continuous = continuous
        if self.r is None:
            self.xs, self.us, self.reached, self.ties = np.zeros(self.n), np.zeros(self.m), None, 0
        else:
            self.xs, self.us, self.reached, self.ties = steady_target(
                self.a, self.b, self.c, self.Q, self.r)
        self.ref = np.zeros(self.p) if self.r is None else self.r

    # variable layout: x_1..x_N, u_0..u_{N-1}, then slacks (constrained only)
    def xi(self, k):
        return slice((k - 1) * self.n, k * self.n)

    def ui(self, k):
        o = self.N * self.n
        return slice(o + k * self.m, o + (k + 1) * self.m)

    def nz(self):
        return self.N * (self.n + self.m)

    def quadratic(self, extra=0):
        """J = 1/2 z'Hz + f'z + const for z of length nz()+extra."""
        nz = self.nz() + extra
        H = np.zeros((nz, nz))
        f = np.zeros(nz)
        const = 0.0

        def term(blocks, d, w):
            nonlocal const
            for si, li in blocks:
                f[si] += -2.0 * li.T @ w @ d
                for sj, lj in blocks:
                    H[si, sj] += 2.0 * li.T @ w @ lj
            const += float(d @ w @ d)

        e0 = self.c @ self.x0 - self.ref
        const += float(e0 @ self.Q @ e0)
        I_n, I_m = np.eye(self.n), np.eye(self.m)
        for k in range(1, self.N):
            term([(self.xi(k), self.c)], self.ref, self.Q)
        term([(self.xi(self.N), I_n)], self.xs, self.P)
        for k in range(self.N):
            term([(self.ui(k), I_m)], self.us, self.R)
        if self.s_given:
            if self.uprev is not None:
                term([(self.ui(0), I_m)], self.uprev, self.S)
            for k in range(1, self.N):
                term([(self.ui(k), I_m), (self.ui(k - 1), -I_m)], np.zeros(self.m), self.S)
        return H, f, const

    def dynamics(self, extra=0):
        n, N = self.n, self.N
        E = np.zeros((N * n, self.nz() + extra))
        e = np.zeros(N * n)
        for k in range(N):
            rows = slice(k * n, (k + 1) * n)
            E[rows, self.xi(k + 1)] = np.eye(n)
            E[rows, self.ui(k)] = -self.b
            if k == 0:
                e[rows] = self.a @ self.x0
            else:
                E[rows, self.xi(k)] = -self.a
        return E, e

    def unpack(self, z):
        X = np.vstack([self.x0] + [z[self.xi(k)] for k in range(1, self.N + 1)])
        U = np.vstack([z[self.ui(k)] for k in range(self.N)])
        return X, U

    def cost(self, X, U):
        """J evaluated directly from its definition on a trajectory."""
        J = 0.0
        for k in range(self.N):
            ey = self.c @ X[k] - self.ref
            eu = U[k] - self.us
            J += ey @ self.Q @ ey + eu @ self.R @ eu
            if self.s_given and (k > 0 or self.uprev is not None):
                du = U[k] - (U[k - 1] if k > 0 else self.uprev)
                J += du @ self.S @ du
        ex = X[self.N] - self.xs
        return float(J + ex @ self.P @ ex)

    def rollout(self, U):
        X = [self.x0]
        for k in range(self.N):
            X.append(self.a @ X[-1] + self.b @ U[k])
        return np.vstack(X)

    def model_json(self):
        plant = {}
        if self.time_domain == "continuous":
            ac, bc = self.continuous
            plant["a"], plant["b"] = to_list(ac), to_list(bc)
        else:
            plant["a"], plant["b"] = to_list(self.a), to_list(self.b)
        if self.has_c:
            plant["c"] = to_list(self.c)
        plant["sampleTime"] = self.sample_time
        plant["timeDomain"] = self.time_domain
        cost = {"horizon": self.N, "outputWeight": to_list(self.q_repr),
                "inputWeight": to_list(self.r_repr)}
        if self.s_given:
            cost["inputRateWeight"] = to_list(self.s_repr)
        cost["terminalWeight"] = (self.terminal_kind if isinstance(self.terminal_kind, str)
                                  else to_list(self.terminal_kind))
        return {"plant": plant, "cost": cost}

    def case_json(self, X, U, J):
        d = {"name": self.name, "model": self.model_json()}
        if self.limits is not None:
            d["limits"] = {k: list(v) for k, v in self.limits.items()}
            if any(k in self.limits for k in ("outputMin", "outputMax")):
                d["linearViolationWeight"] = [LINEAR_VIOLATION_WEIGHT] * self.p
        d["terminalMatrix"] = to_list(self.P)
        d["state"] = to_list(self.x0)
        if self.r is not None:
            d["reference"] = to_list(self.r)
        if self.uprev is not None:
            d["previousInput"] = to_list(self.uprev)
        if self.r is not None:
            d["targetState"] = to_list(self.xs)
            d["targetInput"] = to_list(self.us)
            d["targetReached"] = self.reached
        d["inputs"] = to_list(U)
        d["states"] = to_list(X)
        d["outputs"] = to_list(X @ self.c.T)
        d["cost"] = J
        return d


def make_problem(name, a, b, c, ts, N, q, r, s, terminal, x0, **kw):
    return Problem(name, a, b, c, ts, N, q, r, s, terminal, x0,
                   q_repr=q, r_repr=r, s_repr=s, **kw)


def solve_unconstrained(pb):
    H, f, const = pb.quadratic()
    E, e = pb.dynamics()
    nz, ne = H.shape[0], E.shape[0]
    K = np.block([[H, E.T], [E, np.zeros((ne, ne))]])
    rhs = np.concatenate([-f, e])
    sol = np.linalg.solve(K, rhs)
    res = abs(K @ sol - rhs).max() / max(1.0, abs(rhs).max(), abs(K).max() * abs(sol).max())
    record("unconstrained: relative KKT residual", res)
    z = sol[:nz]
    X, U = pb.unpack(z)
    J = pb.cost(X, U)
    Jq = 0.5 * z @ H @ z + f @ z + const
    record("unconstrained: |J(formula) - J(quadratic)| / max(1,J)", abs(J - Jq) / max(1.0, abs(J)))
    record("unconstrained: |rollout - KKT states|", abs(pb.rollout(U) - X).max() / max(1.0, abs(X).max()))
    return X, U, J


def gradient_check(pb, U, J):
    """Central differences of J (formula) w.r.t. the inputs: exact for a
    quadratic up to rounding, so this is an assembly-independent check."""
    h = 1e-3 * max(1.0, abs(U).max())
    g = np.zeros_like(U)
    for k in range(pb.N):
        for i in range(pb.m):
            Up, Um = U.copy(), U.copy()
            Up[k, i] += h
            Um[k, i] -= h
            g[k, i] = (pb.cost(pb.rollout(Up), Up) - pb.cost(pb.rollout(Um), Um)) / (2 * h)
    return abs(g).max() / max(1.0, abs(J))


def lqr_first_input_check(pb, U):
    if not (isinstance(pb.terminal_kind, str) and pb.terminal_kind == "riccati"):
        return None
    if pb.s_given and abs(pb.S).max() > 0:
        return None
    if pb.r is not None and not pb.reached:
        return None
    K = lqr_gain(pb.a, pb.b, pb.R, pb.P)
    expect = pb.us - K @ (pb.x0 - pb.xs)
    return abs(U[0] - expect).max() / max(1.0, abs(expect).max())


# ----------------------------------------------------------------- unconstrained cases

def unconstrained_problems():
    P = []
    add = P.append
    a, b = double_integrator()
    di_a, di_b = zoh(a, b, 0.1)
    add(make_problem("double-integrator-regulation-N20", di_a, di_b, None, 0.1, 20,
                     [1.0, 0.1], [0.01], None, "riccati", [1.0, 0.0]))
    add(make_problem("stable-2x1-horizon-1-stage", [[0.9, 0.2], [0.0, 0.7]], [[0.0], [1.0]],
                     [[1.0, 0.0]], 1.0, 1, [2.0], [0.5], None, "stage", [1.0, -1.0]))
    ua, ub = unstable_3x1()
    qfull = [[2.0, 0.3, 0.0], [0.3, 1.0, -0.2], [0.0, -0.2, 0.5]]
    add(make_problem("unstable-3x1-horizon-2-riccati", ua, ub, None, 1.0, 2,
                     qfull, [[1.0]], None, "riccati", [0.5, -0.2, 1.0]))
    add(make_problem("unstable-2x1-explicit-terminal-N5", [[1.2, 0.1], [0.0, 0.8]], [[1.0], [0.5]],
                     None, 1.0, 5, [1.0, 1.0], [0.2], None, [[10.0, 1.0], [1.0, 5.0]],
                     [1.0, 2.0]))
    fa, fb, fc = four_state_two_input()
    add(make_problem("four-state-two-output-N20", fa, fb, fc, 1.0, 20, [3.0, 1.0],
                     [[0.5, 0.1], [0.1, 1.0]], None, "riccati", [1.0, -0.5, 0.3, 0.2]))
    add(make_problem("unstable-3x1-position-output-N60", ua, ub, [[1.0, 0.0, 0.0]], 1.0, 60,
                     [1.0], [0.1], None, "riccati", [1.0, 0.0, -1.0]))
    ca, cb = cold_storage_continuous()
    csa, csb = zoh(ca, cb, 60.0)
    add(make_problem("cold-storage-setpoint-N60", csa, csb, None, 60.0, 60,
                     [1.0, 1.0, 1.0], [0.01, 0.01, 1.0], [0.05, 0.05, 0.5], "riccati",
                     [0.5, 1.0, 0.2], reference=[-2.0, -1.5, -2.0],
                     previous_input=[0.0, 0.0, 0.0]))
    add(make_problem("cold-storage-regulation-N20", csa, csb, [[0.0, 1.0, 0.0], [0.0, 0.0, 1.0]],
                     60.0, 20, [1.0, 2.0], [0.02, 0.02, 0.5], None, "riccati",
                     [1.0, 2.0, -0.5]))
    pa = [[0.8, 0.2, 0.0], [0.0, 0.9, 0.1], [0.1, 0.0, 0.7]]
    add(make_problem("tracking-unreachable-p2-m1-N20", pa, [[0.0], [1.0], [0.5]],
                     [[1.0, 0.0, 0.0], [0.0, 0.0, 1.0]], 1.0, 20, [1.0, 4.0], [0.1], None,
                     "stage", [0.0, 0.0, 0.0], reference=[1.0, -1.0]))
    add(make_problem("tracking-input-ties-p1-m2-N20", pa, [[1.0, 0.0], [0.0, 1.0], [0.0, 0.0]],
                     [[1.0, 0.0, 0.0]], 1.0, 20, [1.0], [0.5, 0.5], None, "riccati",
                     [0.2, -0.1, 0.0], reference=[2.0]))
    # eigenvalue 1 with eigenvector (0, 0, 1, -1), which C does not see: the
    # target state is fixed only by the minimum-norm rule
    ia = [[0.8, 0.1, 0.0, 0.0], [0.0, 0.7, 0.0, 0.0], [0.0, 0.2, 0.9, -0.1], [0.0, 0.0, 0.0, 1.0]]
    ib = [[1.0, 0.0], [0.0, 1.0], [0.5, 0.0], [0.1, -0.1]]
    add(make_problem("tracking-state-ties-unobserved-integrator-N10", ia, ib,
                     [[1.0, 0.0, 1.0, 1.0]], 1.0, 10, [1.0], [1.0, 1.0], None, "stage",
                     [0.0, 0.0, 0.0, 3.0], reference=[1.0]))
    ra = [[0.9, 0.1], [-0.2, 0.8]]
    add(make_problem("rate-weight-without-previous-input-N5", ra, [[0.0], [1.0]], None, 1.0, 5,
                     [1.0, 1.0], [0.1], [2.0], "riccati", [1.0, 1.0]))
    add(make_problem("rate-weight-with-previous-input-N5", ra, [[0.0], [1.0]], None, 1.0, 5,
                     [1.0, 1.0], [0.1], [2.0], "riccati", [1.0, 1.0], previous_input=[-0.5]))
    rng = np.random.default_rng(401)
    r6a, r6b = random_stable(rng, 6, 2, 1.02)
    mq = rng.standard_normal((6, 6))
    q6 = mq @ mq.T / 6.0 + 0.1 * np.eye(6)
    r6 = [[1.0, 0.2], [0.2, 0.5]]
    x6 = rng.standard_normal(6)
    add(make_problem("random-6x2-N20", r6a, r6b, None, 0.5, 20, q6, r6, None, "riccati", x6))
    add(make_problem("random-6x2-zero-state-N20", r6a, r6b, None, 0.5, 20, q6, r6, None,
                     "riccati", np.zeros(6)))
    add(make_problem("double-integrator-position-tracking-N20", di_a, di_b, [[1.0, 0.0]], 0.1, 20,
                     [1.0], [0.01], None, "riccati", [0.0, 0.0], reference=[1.0]))
    add(make_problem("random-6x2-explicit-terminal-rate-weight-N5", r6a, r6b, None, 0.5, 5, q6, r6,
                     [[0.5, 0.0], [0.0, 0.5]], 10.0 * np.eye(6), x6, previous_input=[0.1, -0.1]))
    return P


def gen_unconstrained():
    cases = []
    for pb in unconstrained_problems():
        X, U, J = solve_unconstrained(pb)
        gc = gradient_check(pb, U, J)
        record("unconstrained: relative gradient of J at plan", gc)
        lq = lqr_first_input_check(pb, U)
        if lq is not None:
            record("unconstrained: |u0 - (us - K (x0 - xs))| (riccati, S=0)", lq)
            print("  LQR first-input check %-52s %.2e" % (pb.name, lq))
        if not abs(pb.x0).any() and pb.r is None and (pb.uprev is None or not abs(pb.uprev).any()):
            z = max(abs(U).max(), abs(X).max())
            record("unconstrained: max |plan| for x0 = 0 regulation", z)
            print("  zero-state check       %-52s max|u|,|x| = %.1e" % (pb.name, z))
        if pb.r is not None:
            print("  target %-60s reached=%s ties=%d" % (pb.name, pb.reached, pb.ties))
        cases.append(pb.case_json(X, U, J))
    source = ("numpy.linalg.solve on the sparse KKT system, NumPy %s; terminal weights "
              "scipy.linalg.solve_discrete_are, targets scipy.linalg.null_space + "
              "numpy.linalg.svd least squares, plant discretisation scipy.signal.cont2discrete (zoh); %s"
              % (np.__version__, VERSIONS))
    write_json(os.path.join(FIXTURES, "unconstrained_plans.json"),
               {"source": source, "cases": cases})
    return [c["name"] for c in cases]


# ----------------------------------------------------------------- constrained

def opt(v, i):
    if v is None:
        return None
    return v[i]


def constrained_qp(pb):
    """Sparse QP with slacks; returns H, f, const, G, h, E, e, slack_index."""
    lim = pb.limits
    n, m, p, N = pb.n, pb.m, pb.p, pb.N
    omin, omax = lim.get("outputMin"), lim.get("outputMax")
    soft = [j for j in range(p) if opt(omin, j) is not None or opt(omax, j) is not None]
    sl = {j: pb.nz() + t for t, j in enumerate(soft)}
    H, f, const = pb.quadratic(extra=len(soft))
    wv = lim.get("outputViolationWeight")
    for j in soft:
        f[sl[j]] += LINEAR_VIOLATION_WEIGHT
        H[sl[j], sl[j]] += 2.0 * wv[j]
    E, e = pb.dynamics(extra=len(soft))
    nz = H.shape[0]
    G, h = [], []

    def row(entries, bound):
        g = np.zeros(nz)
        for idx, val in entries:
            g[idx] += val
        G.append(g)
        h.append(bound)

    umin, umax = lim.get("inputMin"), lim.get("inputMax")
    dmin, dmax = lim.get("inputRateMin"), lim.get("inputRateMax")
    for k in range(N):
        o = pb.ui(k).start
        for i in range(m):
            if opt(umax, i) is not None:
                row([(o + i, 1.0)], umax[i])
            if opt(umin, i) is not None:
                row([(o + i, -1.0)], -umin[i])
    for k in range(N):
        o = pb.ui(k).start
        for i in range(m):
            if k == 0:
                if pb.uprev is None:
                    continue
                if opt(dmax, i) is not None:
                    row([(o + i, 1.0)], dmax[i] + pb.uprev[i])
                if opt(dmin, i) is not None:
                    row([(o + i, -1.0)], -dmin[i] - pb.uprev[i])
            else:
                op = pb.ui(k - 1).start
                if opt(dmax, i) is not None:
                    row([(o + i, 1.0), (op + i, -1.0)], dmax[i])
                if opt(dmin, i) is not None:
                    row([(o + i, -1.0), (op + i, 1.0)], -dmin[i])
    for k in range(1, N + 1):
        o = pb.xi(k).start
        for j in soft:
            cj = [(o + t, pb.c[j, t]) for t in range(n) if pb.c[j, t] != 0.0]
            if opt(omax, j) is not None:
                row(cj + [(sl[j], -1.0)], omax[j])
            if opt(omin, j) is not None:
                row([(i, -v) for i, v in cj] + [(sl[j], -1.0)], -omin[j])
    for j in soft:
        row([(sl[j], -1.0)], 0.0)
    return H, f, const, np.array(G), np.array(h, float), E, e, sl


def cvx(a):
    return cvxopt.matrix(np.ascontiguousarray(a, dtype=float))


def cvxopt_qp(H, f, G, h, E, e):
    cvxopt.solvers.options.update({"abstol": 1e-12, "reltol": 1e-12, "feastol": 1e-12,
                                   "show_progress": False, "maxiters": 200})
    # kktsolver 'ldl' (LDL' factorisation of the full KKT matrix): the default
    # Cholesky-based solver stops on a numerically singular KKT matrix in
    # some cases at these tight tolerances.
    sol = cvxopt.solvers.qp(cvx(H), cvx(f[:, None]), cvx(G), cvx(h[:, None]),
                            cvx(E), cvx(e[:, None]), kktsolver="ldl")
    assert sol["status"] == "optimal", sol["status"]
    z = np.array(sol["x"]).ravel()
    zl = np.array(sol["z"]).ravel()
    y = np.array(sol["y"]).ravel()
    return z, zl, y, sol


def polish(H, f, G, h, E, e, z, zl, max_iter=100):
    """Independent check of the CVXOPT answer: an active-set refinement in
    numpy.  Start from the rows CVXOPT leaves active (slack < multiplier),
    solve the equality-constrained KKT system, then drop the row with the most
    negative multiplier or add the most violated row until the KKT
    conditions hold."""
    nz = H.shape[0]
    tol = 1e-9 * max(1.0, abs(z).max())
    act = sorted(np.where(h - G @ z < zl)[0].tolist())
    for _ in range(max_iter):
        A = np.vstack([E, G[act]]) if act else E
        b = np.concatenate([e, h[act]]) if act else e
        na = A.shape[0]
        K = np.block([[H, A.T], [A, np.zeros((na, na))]])
        sol, *_ = np.linalg.lstsq(K, np.concatenate([-f, b]), rcond=None)
        zp = sol[:nz]
        mult = sol[nz + E.shape[0]:]
        viol = G @ zp - h
        viol[act] = -np.inf
        if mult.size and mult.min() < -tol:
            act.pop(int(np.argmin(mult)))
        elif viol.max() > tol:
            act = sorted(act + [int(np.argmax(viol))])
        else:
            return zp, act, mult
    raise RuntimeError("active-set refinement did not converge")


def solve_constrained(pb):
    lim = pb.limits
    if pb.r is not None:
        umin, umax = lim.get("inputMin"), lim.get("inputMax")
        for i in range(pb.m):
            if opt(umin, i) is not None:
                assert pb.us[i] >= umin[i] - 1e-12, (pb.name, "target below inputMin")
            if opt(umax, i) is not None:
                assert pb.us[i] <= umax[i] + 1e-12, (pb.name, "target above inputMax")
    H, f, const, G, h, E, e, sl = constrained_qp(pb)
    z, zl, y, sol = cvxopt_qp(H, f, G, h, E, e)
    scale = max(1.0, abs(z).max())
    record("constrained: equality residual", abs(E @ z - e).max() / scale)
    record("constrained: inequality violation", max(0.0, (G @ z - h).max()) / scale)
    stat = H @ z + f + G.T @ zl + E.T @ y
    record("constrained: stationarity residual / max(1,|f|,|H z|)",
           abs(stat).max() / max(1.0, abs(f).max(), abs(H @ z).max()))
    record("constrained: complementarity max |zl_i (h-Gz)_i|", abs(zl * (h - G @ z)).max())
    zp, act, mult = polish(H, f, G, h, E, e, z, zl)
    dz = abs(zp - z).max() / scale
    record("constrained: |active-set refinement - CVXOPT| / max(1,|z|)", dz)
    assert dz < 1e-7, (pb.name, dz)
    X, U = pb.unpack(z)
    eps = np.zeros(pb.p)
    for j, idx in sl.items():
        record("constrained: slack below zero before clipping", max(0.0, -z[idx]))
        eps[j] = max(0.0, z[idx])   # CVXOPT may return -1e-16 for a zero slack
    J = pb.cost(X, U)
    wv = lim.get("outputViolationWeight")
    penalty = sum(LINEAR_VIOLATION_WEIGHT * eps[j] + wv[j] * eps[j] ** 2 for j in sl)
    total = J + penalty
    record("constrained: |objective(formula) - CVXOPT objective| / max(1,|J|)",
           abs(total - (0.5 * z @ H @ z + f @ z + const)) / max(1.0, abs(total)))
    # active input bounds
    count = 0
    umin, umax = lim.get("inputMin"), lim.get("inputMax")
    for k in range(pb.N):
        for i in range(pb.m):
            lo, hi = opt(umin, i), opt(umax, i)
            if (lo is not None and abs(U[k, i] - lo) <= 1e-7) or \
               (hi is not None and abs(U[k, i] - hi) <= 1e-7):
                count += 1
    rate_count = 0
    dmin, dmax = lim.get("inputRateMin"), lim.get("inputRateMax")
    for k in range(pb.N):
        if k == 0 and pb.uprev is None:
            continue
        du = U[k] - (U[k - 1] if k > 0 else pb.uprev)
        for i in range(pb.m):
            lo, hi = opt(dmin, i), opt(dmax, i)
            if (lo is not None and abs(du[i] - lo) <= 1e-7) or \
               (hi is not None and abs(du[i] - hi) <= 1e-7):
                rate_count += 1
    pb.rate_count = rate_count
    out_count = 0
    omin, omax = lim.get("outputMin"), lim.get("outputMax")
    Y = X @ pb.c.T
    for k in range(1, pb.N + 1):
        for j in range(pb.p):
            lo, hi = opt(omin, j), opt(omax, j)
            if (lo is not None and abs(Y[k, j] - (lo - eps[j])) <= 1e-7) or \
               (hi is not None and abs(Y[k, j] - (hi + eps[j])) <= 1e-7):
                out_count += 1
    pb.out_count = out_count
    return X, U, J, total, eps, sl, count


def constrained_problems():
    P = []
    add = P.append
    a, b = double_integrator()
    di_a, di_b = zoh(a, b, 0.1)
    add(make_problem("double-integrator-input-bounds-N20", di_a, di_b, None, 0.1, 20,
                     [1.0, 0.1], [0.01], None, "riccati", [5.0, 0.0],
                     limits={"inputMin": [-1.0], "inputMax": [1.0]}))
    add(make_problem("double-integrator-rate-limits-previous-input-N20", di_a, di_b, None, 0.1, 20,
                     [1.0, 0.1], [0.01], None, "riccati", [1.0, 0.0], previous_input=[0.5],
                     limits={"inputMin": [-2.0], "inputMax": [2.0],
                             "inputRateMin": [-0.3], "inputRateMax": [0.3]}))
    ra = [[0.9, 0.1], [-0.2, 0.8]]
    add(make_problem("rate-limits-without-previous-input-N10", ra, [[0.0], [1.0]], None, 1.0, 10,
                     [1.0, 1.0], [0.1], None, "riccati", [2.0, 3.0],
                     limits={"inputRateMin": [-0.4], "inputRateMax": [0.4]}))
    add(make_problem("soft-output-met-limited-overshoot-N30", di_a, di_b, [[1.0, 0.0]], 0.1, 30,
                     [1.0], [0.001], None, "riccati", [1.0, 0.0],
                     limits={"inputMin": [-5.0], "inputMax": [5.0], "outputMin": [-0.02],
                             "outputViolationWeight": [100.0]}))
    add(make_problem("soft-output-violated-N20", di_a, di_b, [[1.0, 0.0]], 0.1, 20,
                     [1.0], [0.01], None, "riccati", [1.0, -3.0],
                     limits={"inputMin": [-1.0], "inputMax": [1.0], "outputMin": [0.0],
                             "outputMax": [2.0], "outputViolationWeight": [10.0]}))
    add(make_problem("input-limits-every-step-N10", [[0.95, 0.1], [0.0, 0.9]], [[0.0], [0.2]],
                     None, 1.0, 10, [1.0, 1.0], [0.1], None, "riccati", [20.0, 10.0],
                     limits={"inputMin": [-2.0], "inputMax": [2.0]}))
    add(make_problem("rate-weight-bounds-previous-input-N15", ra, [[0.0], [1.0]], None, 1.0, 15,
                     [1.0, 1.0], [0.1], [1.0], "riccati", [3.0, -2.0], previous_input=[1.0],
                     limits={"inputMin": [-0.3], "inputMax": [1.2],
                             "inputRateMin": [-0.25], "inputRateMax": [0.25]}))
    rng = np.random.default_rng(501)
    r6a, r6b = random_stable(rng, 6, 2, 0.98)
    c6 = rng.standard_normal((3, 6))
    x6 = 2.0 * rng.standard_normal(6)
    add(make_problem("random-6x2-three-outputs-N30", r6a, r6b, c6, 0.5, 30, [1.0, 2.0, 0.5],
                     [0.1, 0.1], [0.05, 0.05], "riccati", x6,
                     limits={"inputMin": [-1.0, -1.0], "inputMax": [1.0, 1.0],
                             "inputRateMin": [-0.5, -0.5], "inputRateMax": [0.5, 0.5],
                             "outputMin": [-1.5, None, None], "outputMax": [1.5, 2.0, None],
                             "outputViolationWeight": [10.0, 1.0, 0.0]}))
    ca, cb = cold_storage_continuous()
    csa, csb = zoh(ca, cb, 60.0)
    add(make_problem("cold-storage-chiller-limits-N30", csa, csb, None, 60.0, 30,
                     [1.0, 1.0, 1.0], [0.01, 0.01, 1.0], [0.05, 0.05, 0.5], "riccati",
                     [0.5, 1.0, 0.2], reference=[-2.0, -1.3, -2.0],
                     previous_input=[0.0, 0.0, 0.0],
                     limits={"inputMin": [-4.0, -4.0, -0.5], "inputMax": [6.0, 6.0, 0.5],
                             "inputRateMin": [-2.0, -2.0, None],
                             "inputRateMax": [2.0, 2.0, None],
                             "outputMax": [None, 1.0, None],
                             "outputViolationWeight": [0.0, 10.0, 0.0]}))
    pa = [[0.8, 0.2, 0.0], [0.0, 0.9, 0.1], [0.1, 0.0, 0.7]]
    pb3 = [[1.0, 0.0], [0.0, 1.0], [0.0, 0.5]]
    add(make_problem("partially-unbounded-limits-N10", pa, pb3, [[1.0, 0.0, 0.0], [0.0, 1.0, 1.0]],
                     1.0, 10, [1.0, 1.0], [0.1, 0.2], None, "stage", [2.0, -3.0, 1.0],
                     limits={"inputMin": [-0.5, None], "inputMax": [None, 0.6],
                             "inputRateMin": [None, -0.5], "inputRateMax": [0.6, None],
                             "outputMin": [None, -0.5], "outputMax": [0.3, None],
                             "outputViolationWeight": [5.0, 5.0]}))
    ua, ub = unstable_3x1()
    add(make_problem("unstable-3x1-bounds-soft-output-N20", ua, ub, [[1.0, 0.0, 0.0], [0.0, 0.0, 1.0]],
                     1.0, 20, [1.0, 0.5], [0.1], None, "riccati", [2.0, -1.0, 1.0],
                     limits={"inputMin": [-1.5], "inputMax": [1.5], "outputMin": [-0.2, None],
                             "outputMax": [None, 1.2], "outputViolationWeight": [1.0, 1.0]}))
    add(make_problem("tracking-unreachable-p2-m1-bounds-N20", pa, [[0.0], [1.0], [0.5]],
                     [[1.0, 0.0, 0.0], [0.0, 0.0, 1.0]], 1.0, 20, [1.0, 4.0], [0.1], None,
                     "stage", [0.0, 0.0, 0.0], reference=[1.0, -1.0],
                     limits={"inputMin": [-1.0], "inputMax": [0.5]}))
    add(make_problem("zero-state-with-limits-N10", pa, pb3, None, 1.0, 10, [1.0, 1.0, 1.0],
                     [0.1, 0.1], [0.1, 0.1], "riccati", [0.0, 0.0, 0.0],
                     limits={"inputMin": [-1.0, -1.0], "inputMax": [1.0, 1.0],
                             "outputMin": [-1.0, -1.0, -1.0], "outputMax": [1.0, 1.0, 1.0],
                             "outputViolationWeight": [1.0, 1.0, 1.0]}))
    add(make_problem("double-integrator-tracking-bounds-horizon-1", di_a, di_b, [[1.0, 0.0]], 0.1, 1,
                     [1.0], [0.01], None, "riccati", [0.0, 0.0], reference=[1.0],
                     limits={"inputMin": [-1.0], "inputMax": [1.0]}))
    return P


def gen_constrained():
    cases = []
    for pb in constrained_problems():
        X, U, J, total, eps, sl, count = solve_constrained(pb)
        d = pb.case_json(X, U, total)
        d["slack"] = to_list(eps)
        d["costWithoutPenalty"] = J
        d["activeInputBoundCount"] = count
        # how far from the unconstrained plan, step by step
        Xu, Uu, Ju = solve_unconstrained(pb)
        diff = abs(U - Uu).max(axis=1)
        off = int((diff > 1e-6).sum())
        print("  %-50s bounds=%3d/%3d rate=%3d out=%3d slack=%s off-unc=%d/%d cost=%.6g"
              % (pb.name, count, pb.N * pb.m, pb.rate_count, pb.out_count,
                 np.round(eps, 6).tolist(), off, pb.N, total))
        if not abs(pb.x0).any() and pb.r is None:
            record("constrained: max |plan| for x0 = 0 regulation",
                   max(abs(U).max(), abs(X).max()))
        cases.append(d)
    source = ("cvxopt.solvers.qp on the sparse formulation, CVXOPT %s; terminal weights "
              "scipy.linalg.solve_discrete_are, targets scipy.linalg.null_space + "
              "numpy.linalg.svd least squares; %s" % (cvxopt.__version__, VERSIONS))
    notes = ["Solver options: abstol=reltol=feastol=1e-12, maxiters=200, kktsolver='ldl'; "
             "status 'optimal'.",
             "Targets in tracking cases are the unconstrained targets (lexicographic: output "
             "error, then |us|, then |xs|); the references were chosen so that they respect "
             "the hard input limits, which the generator asserts.",
             "Soft output limits act on y_1..y_N with one slack per output shared over the "
             "horizon; 'cost' includes the penalty, 'costWithoutPenalty' does not.",
             "outputViolationWeight entries are 0 for outputs without limits.",
             "Slacks are clipped at 0 (CVXOPT can return -1e-16 for a zero slack).",
             "Every solution agrees with an independent numpy active-set refinement to "
             "better than 1e-7 * max(1, |z|); inputs on a bound may sit ~1e-12 inside it."]
    write_json(os.path.join(FIXTURES, "constrained_plans.json"),
               {"source": source, "notes": notes, "cases": cases})
    return [c["name"] for c in cases]


# ----------------------------------------------------------------- benchmarks

SIX_MASSES_X0_SCALE = 1.0   # tuned so ~30 % of the input values sit at a bound


def six_masses_problem(limits=None, name="six-masses", scale=None):
    ac, bc = six_masses_continuous()
    ad, bd = zoh(ac, bc, 0.5)
    s = SIX_MASSES_X0_SCALE if scale is None else scale
    x0 = s * np.array([1.0, -0.5, 0.8, 0.0, -1.0, 0.6, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0])
    return make_problem(name, ad, bd, None, 0.5, 30, [1.0] * 12, [0.1, 0.1, 0.1], None,
                        "riccati", x0, limits=limits, time_domain="continuous",
                        continuous=(ac, bc))


def gen_benchmarks():
    out = []
    lim_u = {"inputMin": [-0.5] * 3, "inputMax": [0.5] * 3}
    lim_ur = dict(lim_u, inputRateMin=[-0.2] * 3, inputRateMax=[0.2] * 3)
    fraction = None
    for pb in (six_masses_problem(), six_masses_problem(lim_u, "six-masses-input-limits"),
               six_masses_problem(lim_ur, "six-masses-input-and-rate-limits")):
        entry = {"name": pb.name, "model": pb.model_json(), "state": to_list(pb.x0),
                 "terminalMatrix": to_list(pb.P)}
        if pb.limits is None:
            X, U, J = solve_unconstrained(pb)
        else:
            entry["limits"] = pb.limits
            X, U, J, total, eps, sl, count = solve_constrained(pb)
            entry["activeInputBoundCount"] = count
            entry["activeInputBoundFraction"] = count / float(pb.N * pb.m)
            if fraction is None:
                fraction = count / float(pb.N * pb.m)
            print("  %-40s active input bounds %d/%d = %.3f, active rate limits %d"
                  % (pb.name, count, pb.N * pb.m, count / float(pb.N * pb.m), pb.rate_count))
        entry["inputs"] = to_list(U)
        entry["cost"] = J
        out.append(entry)
    rng = np.random.default_rng(601)
    a, b = random_stable(rng, 4, 2, 0.9)
    x0 = rng.standard_normal(4)
    pb = make_problem("random-4x2-N100", a, b, None, 0.1, 100, [1.0] * 4, [0.1, 0.1], None,
                      "riccati", x0)
    rng = np.random.default_rng(602)
    a, b = random_stable(rng, 50, 10, 0.95)
    x0 = rng.standard_normal(50)
    pb50 = make_problem("random-50x10-N50", a, b, None, 0.1, 50, [1.0] * 50, [1.0] * 10, None,
                        "riccati", x0)
    for pb in (pb, pb50):
        X, U, J = solve_unconstrained(pb)
        out.append({"name": pb.name, "model": pb.model_json(), "state": to_list(pb.x0),
                    "terminalMatrix": to_list(pb.P), "inputs": to_list(U), "cost": J})
    notes = ["six-masses: unit masses, seven unit springs (walls at both ends), a 0.01 damper "
             "parallel to every spring; state [q1..q6, v1..v6]; inputs are forces on masses "
             "1, 3 and 5; continuous model, ZOH at 0.5 s.",
             "inputs/cost are reference plans (sparse KKT with numpy for unlimited entries, "
             "cvxopt.solvers.qp with tolerances 1e-12 for limited entries)."]
    write_json(BENCHMARK_FILE, {"source": "benchmark models; reference plans with "
                                "numpy.linalg.solve / cvxopt.solvers.qp, CVXOPT %s, %s"
                                % (cvxopt.__version__, VERSIONS),
                                "notes": notes, "cases": out})
    return [e["name"] for e in out], fraction


# ----------------------------------------------------------------- main

def main():
    os.makedirs(FIXTURES, exist_ok=True)
    names = {}
    names["expm.json"] = gen_expm()
    names["zoh.json"] = gen_zoh()
    d, refused, published = gen_dare()
    names["dare.json"] = d
    names["dare.json refused"] = refused
    names["dare.json published"] = published
    names["unconstrained_plans.json"] = gen_unconstrained()
    names["constrained_plans.json"] = gen_constrained()
    names["benchmark_models.json"], fraction = gen_benchmarks()
    print()
    for f, n in names.items():
        print("%s (%d): %s" % (f, len(n), ", ".join(n)))
    print()
    print("checks (worst value over all cases):")
    for k, v in CHECKS.items():
        print("  %-72s %.3e" % (k, v))
    print()
    print("six-masses-input-limits active input bound fraction: %.3f" % fraction)


if __name__ == "__main__":
    sys.exit(main())
