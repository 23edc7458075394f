#!/usr/bin/python3
"""Time cvxopt.solvers.qp on the condensed six-masses problem with input limits.

Run from the repository root:

    /usr/bin/python3 tests/reference/time_cvxopt.py [--lookahead-us X] [--reps R] [--tight]

It loads tests/reference/benchmark_models.json, takes "six-masses-input-limits"
(continuous model, discretised by zero-order hold at its sample time),
condenses it into the dense QP

    min 1/2 U'HU + f'U   s.t.   G U <= h      (U = [u_0; ...; u_{N-1}])

with x_k = A^k x_0 + sum_j A^{k-1-j} B u_j, stage cost x'Qx + u'Ru and terminal
x_N'P x_N (P = the file's terminalMatrix), and solves it for 20 fixed initial
states: the file's state plus 19 pseudo-random states of the same norm (fixed
seed).  Only the cvxopt.solvers.qp call is timed; each state is solved R times
(default 5) and the median is taken per state; the printed figure is the median
over the 20 states, in microseconds.

Timing uses CVXOPT's default tolerances (abstol 1e-7, reltol 1e-6, feastol 1e-7)
unless --tight is given (1e-12, as in the fixtures).  The active fraction (share
of the N*m input values within 1e-7 of a bound) is always measured with the tight
tolerances.  With --lookahead-us X the ratio CVXOPT / Lookahead is printed.
"""

import argparse
import json
import os
import statistics
import time

import numpy as np
import scipy.signal as ssig
import cvxopt
import cvxopt.solvers

HERE = os.path.dirname(os.path.abspath(__file__))
TIGHT = {"abstol": 1e-12, "reltol": 1e-12, "feastol": 1e-12, "maxiters": 200}
DEFAULT = {"abstol": 1e-7, "reltol": 1e-6, "feastol": 1e-7, "maxiters": 100}


def weight(w, dim):
    w = np.asarray(w, dtype=float)
    return np.diag(w) if w.ndim == 1 else w.reshape(dim, dim)


def load_case(name):
    with open(os.path.join(HERE, "benchmark_models.json"), encoding="utf-8") as fh:
        data = json.load(fh)
    return next(c for c in data["cases"] if c["name"] == name)


def condense(case):
    plant, cost = case["model"]["plant"], case["model"]["cost"]
    a, b = np.array(plant["a"]), np.array(plant["b"])
    n, m = b.shape
    if plant["timeDomain"] == "continuous":
        a, b, _, _, _ = ssig.cont2discrete((a, b, np.eye(n), np.zeros((n, m))),
                                           plant["sampleTime"], method="zoh")
    N = cost["horizon"]
    Q, R = weight(cost["outputWeight"], n), weight(cost["inputWeight"], m)
    P = np.array(case["terminalMatrix"])
    # x_{k} for k = 1..N stacked:  X = Phi x0 + Gamma U
    phi = np.zeros((N * n, n))
    gamma = np.zeros((N * n, N * m))
    ak = np.eye(n)
    for k in range(1, N + 1):
        ak = a @ ak
        phi[(k - 1) * n:k * n] = ak
        for j in range(k):
            gamma[(k - 1) * n:k * n, j * m:(j + 1) * m] = np.linalg.matrix_power(a, k - 1 - j) @ b
    qbar = np.kron(np.eye(N), Q)
    qbar[(N - 1) * n:, (N - 1) * n:] = P
    H = 2.0 * (gamma.T @ qbar @ gamma + np.kron(np.eye(N), R))
    F = 2.0 * gamma.T @ qbar @ phi        # f = F x0
    lim = case["limits"]
    umax = np.tile(np.array(lim["inputMax"], dtype=float), N)
    umin = np.tile(np.array(lim["inputMin"], dtype=float), N)
    G = np.vstack([np.eye(N * m), -np.eye(N * m)])
    h = np.concatenate([umax, -umin])
    return H, F, G, h, umin, umax


def initial_states(x0, count=20, seed=20240501):
    rng = np.random.default_rng(seed)
    x0 = np.asarray(x0, dtype=float)
    states = [x0]
    while len(states) < count:
        v = rng.standard_normal(x0.size)
        states.append(v * np.linalg.norm(x0) / np.linalg.norm(v))
    return states


def solve(H, f, G, h, options):
    cvxopt.solvers.options.clear()
    cvxopt.solvers.options.update(dict(options, show_progress=False))
    t0 = time.perf_counter()
    sol = cvxopt.solvers.qp(H, f, G, h)
    t1 = time.perf_counter()
    return sol, t1 - t0


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--lookahead-us", type=float, default=None,
                    help="Lookahead's median microseconds per solve, for the ratio")
    ap.add_argument("--reps", type=int, default=5, help="repetitions per state (default 5)")
    ap.add_argument("--tight", action="store_true", help="time with tolerances 1e-12")
    args = ap.parse_args()

    case = load_case("six-masses-input-limits")
    H, F, G, h, umin, umax = condense(case)
    Hc, Gc, hc = cvxopt.matrix(H), cvxopt.matrix(G), cvxopt.matrix(h[:, None])
    states = initial_states(case["state"])
    options = TIGHT if args.tight else DEFAULT

    per_state, fractions, check = [], [], None
    for x0 in states:
        fc = cvxopt.matrix(F @ x0[:, None])
        sol, _ = solve(Hc, fc, Gc, hc, TIGHT)
        assert sol["status"] == "optimal", sol["status"]
        u = np.array(sol["x"]).ravel()
        active = np.sum((abs(u - umax) <= 1e-7) | (abs(u - umin) <= 1e-7))
        fractions.append(active / u.size)
        if check is None:   # the file's state: compare with the sparse reference plan
            check = abs(u - np.array(case["inputs"]).ravel()).max()
        times = []
        for _ in range(args.reps):
            sol, dt = solve(Hc, fc, Gc, hc, options)
            assert sol["status"] == "optimal", sol["status"]
            times.append(dt)
        per_state.append(statistics.median(times))

    median_us = statistics.median(per_state) * 1e6
    print("problem: six-masses-input-limits, %d variables, %d inequalities, %d states x %d reps"
          % (H.shape[0], G.shape[0], len(states), args.reps))
    print("tolerances: %s" % ("tight (1e-12)" if args.tight else "CVXOPT defaults"))
    print("cvxopt.solvers.qp median per solve: %.1f us (fastest state %.1f us, slowest %.1f us)"
          % (median_us, min(per_state) * 1e6, max(per_state) * 1e6))
    print("active input-bound fraction: %.3f for the file's state, %.3f mean over %d states"
          % (fractions[0], float(np.mean(fractions)), len(states)))
    print("condensed vs sparse reference plan (file's state): max |du| = %.1e" % check)
    if args.lookahead_us is not None:
        print("ratio CVXOPT / Lookahead: %.2f" % (median_us / args.lookahead_us))


if __name__ == "__main__":
    main()
