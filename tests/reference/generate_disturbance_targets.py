#!/usr/bin/python3
"""Limited steady-state targets with a measured disturbance, for Lookahead.Core.Tests.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 tests/reference/generate_disturbance_targets.py

It writes tests/Lookahead.Core.Tests/Fixtures/limited_disturbance_targets.json.  Random data comes from
numpy.random.default_rng with a fixed seed per case, so the output is byte-for-byte reproducible with the
same library versions.

The rule is the one of generate_targets.py over the steady states of x = A x + B u + E v (v the last
disturbance row, held): least (C x - r)'Q(C x - r), then least ||u|| on that set, then least ||x||, with
umin <= u <= umax.  Each stage is one cvxopt.solvers.qp call over z = [x; u] with the steady-state rows
[A - I, B] z = -E v as equalities (the three-stage function of generate_targets.py with that right-hand
side).  Cross-check, an independent formulation: for these plants A - I is invertible, so x = (I - A)^-1
(B u + E v) and the same three stages are solved over u alone (stage 3 is then empty); the two must agree
to 1e-7 (relative).  Cases are kept only when the unconstrained target (no limits) breaks a limit by more
than 1e-6, so every case exercises the limited target.
"""

import os
import sys

import numpy as np
import cvxopt

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from generate_fixtures import FIXTURES, VERSIONS, psd_sqrt, random_stable, to_list, write_json  # noqa: E402
from generate_targets import cvxopt_qp, limit_rows  # noqa: E402

AGREE_TOL = 1e-7
CASES = []
WORST = {}


def record(check, value):
    WORST[check] = max(WORST.get(check, 0.0), float(value))


def three_stages(a, b, c, q, r, ev, umin, umax):
    n, m = b.shape
    w = psd_sqrt(q)
    eq = np.hstack([a - np.eye(n), b])
    e1 = -ev
    cz = np.hstack([c, np.zeros((c.shape[0], m))])
    G, h = limit_rows(n, m, umin, umax)
    z1 = cvxopt_qp(2.0 * cz.T @ q @ cz, -2.0 * cz.T @ q @ r, G, h, eq, e1)
    y1 = w @ c @ z1[:n]
    sel_u = np.hstack([np.zeros((m, n)), np.eye(m)])
    M2 = np.vstack([eq, w @ cz])
    e2 = np.concatenate([e1, y1])
    z2 = cvxopt_qp(2.0 * sel_u.T @ sel_u, np.zeros(n + m), G, h, M2, e2)
    M3 = np.vstack([M2, sel_u])
    e3 = np.concatenate([e2, z2[n:]])
    z3 = cvxopt_qp(2.0 * np.eye(n + m), np.zeros(n + m), G, h, M3, e3)
    return z3[:n], z3[n:]


def reduced_stages(a, b, c, q, r, ev, umin, umax):
    """The same rule over u alone: x = (I - A)^-1 (B u + E v)."""
    n, m = b.shape
    w = psd_sqrt(q)
    gu = np.linalg.solve(np.eye(n) - a, b)
    gv = np.linalg.solve(np.eye(n) - a, ev)
    G = np.vstack([-np.eye(m), np.eye(m)])
    h = np.concatenate([-np.array(umin), np.array(umax)])
    cg = c @ gu
    rr = r - c @ gv
    empty = np.zeros((0, m))
    u1 = cvxopt_qp(2.0 * cg.T @ q @ cg, -2.0 * cg.T @ q @ rr, G, h, empty, np.zeros(0))
    y1 = w @ cg @ u1
    if np.linalg.matrix_rank(w @ cg, tol=1e-10 * max(1.0, np.abs(w @ cg).max())) == m:
        u2 = u1   # stage 1 is strictly convex in u: its minimiser is the only one, stage 2 has nothing to choose
    else:
        u2 = cvxopt_qp(2.0 * np.eye(m), np.zeros(m), G, h, w @ cg, y1)
    return gu @ u2 + gv, u2


def unconstrained(a, b, c, q, r, ev):
    n, m = b.shape
    gu = np.linalg.solve(np.eye(n) - a, b)
    gv = np.linalg.solve(np.eye(n) - a, ev)
    w = psd_sqrt(q)
    u = np.linalg.lstsq(w @ c @ gu, w @ (r - c @ gv), rcond=None)[0]   # min-norm: the rule's stage 2 without limits
    return u


def main():
    shapes = [(3, 2, 2, 1, 901), (4, 3, 2, 1, 902), (4, 3, 3, 2, 903), (5, 3, 2, 2, 904), (3, 3, 2, 1, 905),
              (4, 2, 2, 1, 906), (5, 4, 3, 2, 907), (3, 2, 1, 1, 908),
              # more inputs than outputs and one binding limit: stage 2 (least ||u||) still has room to choose
              (4, 4, 1, 1, 909), (5, 5, 2, 1, 910), (4, 4, 2, 2, 911)]
    for n, m, p, nq, seed in shapes:
        rng = np.random.default_rng(seed)
        a, b = random_stable(rng, n, m, 0.8)
        c = rng.standard_normal((p, n))
        e = rng.standard_normal((n, nq))
        lq = rng.standard_normal((p, p))
        q = lq @ lq.T / p + 0.1 * np.eye(p)
        r = rng.standard_normal(p)
        v = 2.0 * rng.standard_normal(nq)
        ev = e @ v
        u_free = unconstrained(a, b, c, q, r, ev)
        # Limits that the unconstrained target breaks: narrower than its inputs on one side.
        width = 0.6 * np.abs(u_free) + 0.05
        umin = [float(x) for x in -width]
        umax = [float(x) for x in width * rng.uniform(0.3, 0.9, m)]
        if m - p >= 2:
            # Wide limits on every input but the one the unconstrained target uses most.
            big = int(np.argmax(np.abs(u_free)))
            umin = [float(-3.0 * abs(u_free).max() - 1.0)] * m
            umax = [float(3.0 * abs(u_free).max() + 1.0)] * m
            if u_free[big] > 0:
                umax[big] = float(0.5 * u_free[big])
            else:
                umin[big] = float(0.5 * u_free[big])
        breaks = max(max(umin[i] - u_free[i], u_free[i] - umax[i]) for i in range(m))
        assert breaks > 1e-6, ("case does not exercise the limits", seed, breaks)
        xs, us = three_stages(a, b, c, q, r, ev, umin, umax)
        xr, ur = reduced_stages(a, b, c, q, r, ev, umin, umax)
        agree = max(abs(xs - xr).max(), abs(us - ur).max()) / max(1.0, abs(xs).max(), abs(us).max())
        record("sparse against reduced formulation (relative)", agree)
        assert agree <= AGREE_TOL, (seed, agree)
        record("steady-state residual", abs(a @ xs + b @ us + ev - xs).max())
        record("limit excess", max(0.0, max(umin[i] - us[i] for i in range(m)), max(us[i] - umax[i] for i in range(m))))
        CASES.append({"name": "random-%dx%d-p%d-q%d-seed%d" % (n, m, p, nq, seed), "a": to_list(a), "b": to_list(b),
                      "c": to_list(c), "e": to_list(e), "q": to_list(q), "inputMin": umin, "inputMax": umax,
                      "reference": to_list(r), "disturbance": to_list(v),
                      "targetState": to_list(xs), "targetInput": to_list(us)})
        print("  %-36s breaks=%.2e |sparse-reduced|=%.1e" % (CASES[-1]["name"], breaks, agree))
    write_json(os.path.join(FIXTURES, "limited_disturbance_targets.json"), {
        "source": "cvxopt.solvers.qp, three stages (CVXOPT %s), cross-checked by the reduced formulation over u; %s"
                  % (cvxopt.__version__, VERSIONS),
        "notes": ["Lexicographic steady-state target under hard input limits with a held measured disturbance v: "
                  "least (C x - r)'Q(C x - r), then least ||u||, then least ||x||, over x = A x + B u + E v, umin <= u <= umax."],
        "cases": CASES})
    for k, val in WORST.items():
        print("  %-50s %.3e" % (k, val))


if __name__ == "__main__":
    sys.exit(main())
