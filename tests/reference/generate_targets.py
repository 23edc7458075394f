#!/usr/bin/python3
"""Reference steady-state targets under hard input limits.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 tests/reference/generate_targets.py

It writes tests/Lookahead.Core.Tests/Fixtures/limited_targets.json.

The target is the lexicographic minimiser over the equilibria z = [x; u],
(A - I) x + B u = 0, whose inputs respect umin <= u <= umax:

    stage 1  least (C x - r)'Q(C x - r)
    stage 2  then least ||u||   (over the stage-1 minimisers)
    stage 3  then least ||x||   (over the stage-2 minimisers)

How it is computed here (CVXOPT, stage by stage)
------------------------------------------------
Each stage is one cvxopt.solvers.qp call over z with the equilibrium rows as
equalities and the finite limits as inequalities.  A stage is restricted to
the minimisers of the previous one by equalities:

    stage 2 adds  W C x = W C x1   (W = Q^(1/2), x1 from stage 1),
    stage 3 adds  u = u2           (u2 from stage 2).

Why these equalities describe the minimiser sets: stage 1 minimises
||W C x - W r||^2, a strictly convex function of the weighted output
y = W C x, over a convex set, so every minimiser has the same y (two
different optimal y would make their midpoint strictly better).  Stage 2
is strictly convex in u, so its minimisers share u.  Equality rows are
reduced to an orthonormal basis of their row space (CVXOPT needs full
row rank).  Tolerances abstol = reltol = feastol = 1e-12, maxiters 200,
kktsolver 'ldl'; every status must be 'optimal'.

An input pinned by umin = umax is an equality row u_i = umin_i instead of two
inequalities (an interior-point method needs limits with an interior).

Independent cross-check (numpy, no optimiser)
---------------------------------------------
The lexicographic minimiser lies in the relative interior of one face of
the limits (a choice, per input, of: free, at its lower limit, at its upper
limit).  On that face's affine set the lexicographic minimiser of the three
stages is the same point (each stage is convex, and near the point the
limits not on the face are inactive).  So the script enumerates every face
(3^m of them), solves the three stages on its affine set with SVD null
spaces (numpy.linalg.svd), keeps the candidates that respect every limit and
picks the lexicographically least one.  CVXOPT must agree with it to 1e-7
relative; the fixture stores CVXOPT's x_s and u_s.

Fields per case: a, b, c, q (full p x p), inputMin/inputMax (null = none),
reference, targetState, targetInput, targetReached (||C x_s - r||_inf <=
1e-9 max(1, ||r||_inf), decided on the enumerated solution, which must be
clearly on one side: below 1e-12 or above 1e-7), limited (the unconstrained
lexicographic target breaks a limit by more than 1e-7), plus what kind of
case it is (activeLimits, tieDimension: the freedom left after stage 1).

Every input in a CVXOPT case has at least the limits that keep each stage's
KKT matrix nonsingular: CVXOPT requires rank([P; A; G]) = number of
variables, which fails for a direction of equilibria with unlimited inputs
that no weighted output sees.
"""

import itertools
import os
import sys

import numpy as np
import scipy
import scipy.linalg as sla
import cvxopt
import cvxopt.solvers

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from generate_fixtures import (FIXTURES, VERSIONS, psd_sqrt, random_stable,  # noqa: E402
                               steady_target, to_list, write_json)

RANK_TOL = 1e-10           # relative singular-value cut-off for null spaces
FEAS_TOL = 1e-9            # a limit counts as respected within 1e-9 (1 + |limit|)
AGREE_TOL = 1e-7           # CVXOPT against the face enumeration, relative to max(1, |z|)
WORST = {}


def record(check, value):
    WORST[check] = max(WORST.get(check, 0.0), float(value))


def cvx(a):
    return cvxopt.matrix(np.ascontiguousarray(a, dtype=float))


def independent_rows(M, e):
    """Rows spanning the same affine set {z : M z = e} with orthonormal rows."""
    u, s, vt = np.linalg.svd(M, full_matrices=False)
    rank = int(np.sum(s > RANK_TOL * max(1.0, s.max() if s.size else 0.0)))
    return vt[:rank], (u[:, :rank].T @ e) / s[:rank]


def limit_rows(n, m, umin, umax):
    """Inequality rows G z <= h for the limits; an input pinned by umin = umax is left to pinned_rows."""
    G, h = [], []
    for i in range(m):
        if umin[i] is not None and umin[i] == umax[i]:
            continue
        if umin[i] is not None:
            row = np.zeros(n + m)
            row[n + i] = -1.0
            G.append(row)
            h.append(-umin[i])
        if umax[i] is not None:
            row = np.zeros(n + m)
            row[n + i] = 1.0
            G.append(row)
            h.append(umax[i])
    return np.array(G), np.array(h)


def pinned_rows(n, m, umin, umax):
    """Equalities u_i = umin_i for inputs with umin = umax (an interior-point method needs an interior)."""
    rows = [np.eye(n + m)[n + i] for i in range(m) if umin[i] is not None and umin[i] == umax[i]]
    values = [umin[i] for i in range(m) if umin[i] is not None and umin[i] == umax[i]]
    return np.array(rows).reshape(len(rows), n + m), np.array(values)


def cvxopt_qp(P, q, G, h, M, e):
    cvxopt.solvers.options.update({"abstol": 1e-12, "reltol": 1e-12, "feastol": 1e-12,
                                   "show_progress": False, "maxiters": 200})
    Meq, eeq = independent_rows(M, e)
    sol = cvxopt.solvers.qp(cvx(P), cvx(q[:, None]), cvx(G), cvx(h[:, None]),
                            cvx(Meq), cvx(eeq[:, None]), kktsolver="ldl")
    assert sol["status"] == "optimal", sol["status"]
    return np.array(sol["x"]).ravel()


def cvxopt_target(a, b, c, q, r, umin, umax):
    n, m = b.shape
    w = psd_sqrt(q)
    pinned, pinned_values = pinned_rows(n, m, umin, umax)
    eq = np.vstack([np.hstack([a - np.eye(n), b]), pinned])
    e1 = np.concatenate([np.zeros(n), pinned_values])
    cz = np.hstack([c, np.zeros((c.shape[0], m))])
    G, h = limit_rows(n, m, umin, umax)
    # stage 1: (C x - r)'Q(C x - r) = z'(Cz'Q Cz)z - 2 r'Q Cz z + const; CVXOPT minimises 1/2 z'Pz + q'z.
    z1 = cvxopt_qp(2.0 * cz.T @ q @ cz, -2.0 * cz.T @ q @ r, G, h, eq, e1)
    y1 = w @ c @ z1[:n]
    # stage 2: least ||u|| with the weighted output held at its optimum.
    sel_u = np.hstack([np.zeros((m, n)), np.eye(m)])
    M2 = np.vstack([eq, w @ cz])
    e2 = np.concatenate([e1, y1])
    z2 = cvxopt_qp(2.0 * sel_u.T @ sel_u, np.zeros(n + m), G, h, M2, e2)
    # stage 3: least ||x|| (equivalently ||z||) with u held at its stage-2 value.
    M3 = np.vstack([M2, sel_u])
    e3 = np.concatenate([e2, z2[n:]])
    z3 = cvxopt_qp(2.0 * np.eye(n + m), np.zeros(n + m), G, h, M3, e3)
    return z3[:n], z3[n:]


def null_and_particular(M, e):
    """z0 with M z0 = e (least norm) and an orthonormal null-space basis; None if inconsistent."""
    k = M.shape[1]
    if M.shape[0] == 0:
        return np.zeros(k), np.eye(k)
    u, s, vt = np.linalg.svd(M, full_matrices=True)
    rank = int(np.sum(s > RANK_TOL * max(1.0, abs(M).max())))
    z0 = vt[:rank].T @ ((u[:, :rank].T @ e) / s[:rank])
    if abs(M @ z0 - e).max() > 1e-9 * max(1.0, abs(e).max()):
        return None, None
    return z0, vt[rank:].T


def least_squares_on(z0, basis, L, target):
    """Restrict z = z0 + basis t to the minimisers of ||L z - target||: new z0 and basis."""
    if basis.shape[1] == 0:
        return z0, basis
    K = L @ basis
    t, new_null = null_and_particular_lstsq(K, target - L @ z0)
    return z0 + basis @ t, basis @ new_null


def null_and_particular_lstsq(K, rhs):
    u, s, vt = np.linalg.svd(K, full_matrices=True)
    rank = int(np.sum(s > RANK_TOL * max(1.0, abs(K).max() if K.size else 0.0)))
    t = vt[:rank].T @ ((u[:, :rank].T @ rhs) / s[:rank])
    return t, vt[rank:].T


def enumerated_target(a, b, c, q, r, umin, umax):
    """Lexicographic target by enumerating the faces of the limits (see the module notes)."""
    n, m = b.shape
    w = psd_sqrt(q)
    eq = np.hstack([a - np.eye(n), b])
    wc = np.hstack([w @ c, np.zeros((c.shape[0], m))])
    sel_u = np.hstack([np.zeros((m, n)), np.eye(m)])
    sel_x = np.hstack([np.eye(n), np.zeros((n, m))])
    choices = [[None] + [v for v in (umin[i], umax[i]) if v is not None] for i in range(m)]
    best = None
    for face in itertools.product(*choices):
        rows = [eq] + [sel_u[i:i + 1] for i in range(m) if face[i] is not None]
        rhs = [np.zeros(n)] + [np.array([face[i]]) for i in range(m) if face[i] is not None]
        z0, basis = null_and_particular(np.vstack(rows), np.concatenate(rhs))
        if z0 is None:
            continue
        z0, basis = least_squares_on(z0, basis, wc, w @ r)
        z0, basis = least_squares_on(z0, basis, sel_u, np.zeros(m))
        z0, basis = least_squares_on(z0, basis, sel_x, np.zeros(n))
        u = z0[n:]
        ok = all((umin[i] is None or u[i] >= umin[i] - FEAS_TOL * (1 + abs(umin[i])))
                 and (umax[i] is None or u[i] <= umax[i] + FEAS_TOL * (1 + abs(umax[i])))
                 for i in range(m))
        if not ok:
            continue
        err = w @ (c @ z0[:n] - r)
        key = (float(err @ err), float(u @ u), float(z0[:n] @ z0[:n]))
        if best is None or lex_less(key, best[0]):
            best = (key, z0, face)
    assert best is not None, "no equilibrium inside the limits"
    key, z, face = best
    return z[:n], z[n:], sum(v is not None for v in face)


def lex_less(k1, k2):
    for v1, v2 in zip(k1, k2):
        tol = 1e-10 * max(1.0, abs(v1), abs(v2))
        if v1 < v2 - tol:
            return True
        if v1 > v2 + tol:
            return False
    return False


def tie_dimension(a, b, c, q, umin, umax, us):
    """Freedom left after stage 1: dimension of {equilibria with active limits fixed, W C x fixed}."""
    n, m = b.shape
    w = psd_sqrt(q)
    rows = [np.hstack([a - np.eye(n), b]), np.hstack([w @ c, np.zeros((c.shape[0], m))])]
    for i in range(m):
        at_limit = any(v is not None and abs(us[i] - v) <= 1e-7 * (1 + abs(v)) for v in (umin[i], umax[i]))
        if at_limit:
            row = np.zeros((1, n + m))
            row[0, n + i] = 1.0
            rows.append(row)
    M = np.vstack(rows)
    s = np.linalg.svd(M, compute_uv=False)
    return int(n + m - np.sum(s > RANK_TOL * max(1.0, abs(M).max())))


CASES = []


def add(name, a, b, c, q, umin, umax, r):
    a, b, c, q, r = (np.atleast_2d(np.asarray(v, dtype=float)) for v in (a, b, c, q, r))
    r = r.ravel()
    n, m = b.shape
    xs_free, us_free, _, _ = steady_target(a, b, c, q, r)
    breaks = max([0.0] + [umin[i] - us_free[i] for i in range(m) if umin[i] is not None]
                 + [us_free[i] - umax[i] for i in range(m) if umax[i] is not None])
    assert breaks == 0.0 or breaks > 1e-7, (name, "unconstrained target too close to a limit", breaks)
    xs, us = cvxopt_target(a, b, c, q, r, umin, umax)
    xe, ue, active = enumerated_target(a, b, c, q, r, umin, umax)
    z, ze = np.concatenate([xs, us]), np.concatenate([xe, ue])
    agree = abs(z - ze).max() / max(1.0, abs(ze).max())
    record("CVXOPT against face enumeration (relative)", agree)
    assert agree <= AGREE_TOL, (name, agree, z, ze)
    record("equilibrium residual of the enumerated target", abs(a @ xe + b @ ue - xe).max())
    miss = abs(c @ xe - r).max() / max(1.0, abs(r).max())
    assert miss <= 1e-12 or miss >= 1e-7, (name, "reached flag ambiguous", miss)
    reached = bool(miss <= 1e-9)
    ties = tie_dimension(a, b, c, q, umin, umax, ue)
    CASES.append({"name": name, "a": to_list(a), "b": to_list(b), "c": to_list(c), "q": to_list(q),
                  "inputMin": list(umin), "inputMax": list(umax), "reference": to_list(r),
                  "targetState": to_list(xs), "targetInput": to_list(us), "targetReached": reached,
                  "limited": bool(breaks > 0), "activeLimits": active, "tieDimension": ties})
    print("  %-44s n=%d m=%d p=%d limited=%-5s reached=%-5s active=%d ties=%d |cvxopt-enum|=%.1e"
          % (name, n, m, c.shape[0], breaks > 0, reached, active, ties, agree))


def hand_made():
    # Two lags seen as one output: y = u1 + u2 at steady state (x1 = 2 u1, x2 = u2).
    a2 = np.diag([0.5, 0.9])
    b2 = np.array([[1.0, 0.0], [0.0, 0.1]])
    c2 = np.array([[0.5, 1.0]])
    add("two-lags-one-output-reachable-past-a-limit", a2, b2, c2, [[0.01]],
        [-1.0, -10.0], [1.0, 10.0], [3.0])
    add("two-lags-one-output-beyond-every-limit", a2, b2, c2, [[1.0]],
        [-1.0, -10.0], [1.0, 10.0], [20.0])
    add("two-lags-one-output-one-sided-limit", a2, b2, c2, [[2.0]],
        [None, -10.0], [0.5, 10.0], [-4.0])
    # Three lags, two outputs: a limit on u3 binds, u1 + u2 stays free for stage 2.
    a3 = np.diag([0.5, 0.9, 0.8])
    b3 = np.diag([1.0, 0.1, 0.2])
    c3 = np.array([[0.5, 1.0, 0.0], [0.0, 0.0, 1.0]])
    add("three-lags-freedom-after-a-limit-binds", a3, b3, c3, np.eye(2),
        [-100.0, -100.0, -1.0], [100.0, 100.0, 1.0], [4.0, 3.0])
    # Coupled outputs: y1 = u1 + u2, y2 = u2 + u3 (x_i = u_i); u2's limit binds and the
    # setpoint cannot be held, with the weighted error shared through a full Q.
    a4 = np.diag([0.0, 0.0, 0.0])
    b4 = np.eye(3)
    c4 = np.array([[1.0, 1.0, 0.0], [0.0, 1.0, 1.0]])
    add("coupled-outputs-full-weight-unreachable", a4, b4, c4, [[2.0, 0.5], [0.5, 1.0]],
        [-1.0, -0.5, -1.0], [1.0, 0.5, 1.0], [3.0, -2.5])
    add("coupled-outputs-reachable-past-a-limit", a4, b4, c4, [[2.0, 0.5], [0.5, 1.0]],
        [-3.0, -0.5, -3.0], [3.0, 0.5, 3.0], [2.0, 2.0])
    # A tank level that integrates inflow minus outflow (any level is an equilibrium when the
    # flows balance) and an outlet temperature that follows the inflow.
    at = np.array([[1.0, 0.0], [0.0, 0.8]])
    bt = np.array([[0.1, -0.1], [0.2, 0.0]])
    add("integrating-level-and-temperature", at, bt, np.eye(2), np.eye(2),
        [0.0, 0.0], [2.0, 3.0], [5.0, 3.0])
    # The output sees only a state no input drives: every limited input gives the same output
    # error, so stage 2 alone decides (least ||u|| inside the limits).
    add("output-blind-to-the-inputs", np.diag([0.5, 0.9]), [[1.0, 1.0], [0.0, 0.0]], [[0.0, 1.0]],
        [[1.0]], [0.5, -2.0], [2.0, 2.0], [1.0])
    # u2 only feeds an integrator, so it must be zero at any equilibrium while the integrated
    # state may rest anywhere; u1's limit binds.
    add("input-that-must-rest-at-zero", [[0.5, 0.0], [0.0, 1.0]], [[1.0, 0.0], [0.0, 0.2]],
        np.eye(2), np.eye(2), [-1.0, -1.0], [1.0, 1.0], [4.0, 1.0])
    # Semidefinite output weight: the second output is not weighted at all.
    add("semidefinite-output-weight", a3, b3, c3, np.diag([1.0, 0.0]),
        [-1.0, -1.0, -1.0], [1.0, 1.0, 1.0], [3.0, 7.0])


def random_cases():
    # (n, m, p, seed, how much of the unconstrained input the limits allow at most)
    shapes = [(3, 2, 1, 711, 1.6), (4, 3, 1, 712, 1.6), (4, 3, 2, 713, 1.6), (5, 4, 2, 714, 1.6),
              (4, 2, 2, 715, 1.6), (3, 3, 3, 716, 1.6), (5, 4, 1, 717, 1.6), (4, 4, 2, 718, 1.6),
              (4, 1, 2, 719, 1.6), (5, 2, 3, 720, 1.6),
              # tight limits with more inputs than outputs: the setpoint is out of reach
              (4, 3, 1, 721, 0.5), (5, 4, 2, 722, 0.5), (6, 4, 1, 723, 0.5), (5, 4, 3, 724, 0.5)]
    for n, m, p, seed, most in shapes:
        rng = np.random.default_rng(seed)
        a, b = random_stable(rng, n, m, 0.8)
        c = rng.standard_normal((p, n))
        lq = rng.standard_normal((p, p))
        q = lq @ lq.T / p + 0.1 * np.eye(p)
        r = 2.0 * rng.standard_normal(p)
        _, us_free, _, _ = steady_target(a, b, c, q, r)
        # Limits around the unconstrained target's inputs, some of them tighter than it needs.
        width = np.abs(us_free) * rng.uniform(0.25 * most, most, m) + 0.05
        centre = 0.2 * rng.standard_normal(m) * width
        umin = [float(v) for v in centre - width]
        umax = [float(v) for v in centre + width]
        add("random-%dx%d-p%d-seed%d" % (n, m, p, seed), a, b, c, q, umin, umax, r)


def awkward_cases():
    """Random plants with structure that makes targets degenerate or badly scaled."""
    def limits_around(rng, us_free, most):
        width = np.abs(us_free) * rng.uniform(0.25 * most, most, len(us_free)) + 1e-3 * max(1.0, abs(us_free).max())
        centre = 0.3 * rng.standard_normal(len(us_free)) * width
        return [float(v) for v in centre - width], [float(v) for v in centre + width]

    for seed, kind in ((731, "parallel-inputs"), (732, "parallel-inputs"), (733, "inputs-scaled-1e-2-to-1e2"),
                       (734, "outputs-scaled-1e-2-to-1e2"), (735, "rank-one-output-weight"),
                       (736, "pinned-input"), (737, "inputs-scaled-1e-2-to-1e2")):
        rng = np.random.default_rng(seed)
        n, m, p = 5, 4, 2
        a, b = random_stable(rng, n, m, 0.9)
        c = rng.standard_normal((p, n))
        lq = rng.standard_normal((p, p))
        q = lq @ lq.T / p + 0.1 * np.eye(p)
        if kind == "parallel-inputs":
            b[:, 1] = 1.7 * b[:, 0]
        elif kind == "inputs-scaled-1e-2-to-1e2":
            b = b * np.array([1e-2, 1.0, 1e2, 1e1])[None, :]
        elif kind == "outputs-scaled-1e-2-to-1e2":
            c = c * np.array([1e-2, 1e2])[:, None]
        elif kind == "rank-one-output-weight":
            v = rng.standard_normal(p)
            q = np.outer(v, v)
        r = 3.0 * rng.standard_normal(p)
        _, us_free, _, _ = steady_target(a, b, c, q, r)
        umin, umax = limits_around(rng, us_free, 0.6)
        if kind == "pinned-input":
            umin[0] = umax[0]
        add("%s-seed%d" % (kind, seed), a, b, c, q, umin, umax, r)


def main():
    print("limited targets:")
    hand_made()
    random_cases()
    awkward_cases()
    write_json(os.path.join(FIXTURES, "limited_targets.json"), {
        "source": "cvxopt.solvers.qp, three stages (CVXOPT %s), cross-checked by face enumeration with "
                  "numpy.linalg.svd; %s" % (cvxopt.__version__, VERSIONS),
        "notes": ["Lexicographic steady-state target under hard input limits: least (C x - r)'Q(C x - r), "
                  "then least ||u||, then least ||x||, over equilibria x = A x + B u with umin <= u <= umax.",
                  "targetState/targetInput are CVXOPT's; they agree with the face enumeration to 1e-7."],
        "cases": CASES})
    print()
    for k, v in WORST.items():
        print("  %-60s %.3e" % (k, v))


if __name__ == "__main__":
    sys.exit(main())
