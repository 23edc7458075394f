#!/usr/bin/python3
"""Reference plans with measured disturbances, disturbance forecasts and
reference schedules, for Lookahead.Core.Tests.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 tests/reference/generate_previews.py

It writes tests/Lookahead.Core.Tests/Fixtures/preview_plans.json.  There is
no random data; every number is written in this file, so the output is
byte-for-byte reproducible with the same library versions.  If any check
below fails the script stops with an AssertionError and writes nothing.

The problem
-----------
The plan problem of generate_fixtures.py (imported from it, not copied: the
sparse formulation, the soft-limit rows and penalty, the CVXOPT call and the
active-set refinement are that file's functions), extended by a measured
disturbance v (q entries) and per-step references:

    x_{k+1} = A x_k + B u_k + E v_k,        y_k = C x_k
    J = sum_{k=0}^{N-1} [ (y_k - r_k)'Q(y_k - r_k) + (u_k - u_s)'R(u_k - u_s)
                          + du_k' S du_k ] + (x_N - x_s)' P (x_N - x_s)

du_k = u_k - u_{k-1}; the du_0 term only when "previousInput" is given.
The k = 0 output term is a constant but it is part of "cost".  "cost" is J
exactly as above; it never contains the soft-limit penalty, which is in
"softLimitPenalty" for cases with soft output limits.

Request fields
    "reference":   one p-vector (r_k = r for every k), or a list of 1..N rows
                   (row k is r_k; the last row is held to the end).
    "disturbance": one q-vector (v_k = v for every k), or a list of 1..N rows
                   (row k is v_k; the last row is held to the end).
    Assumption made here (the service may decide otherwise; the two cases
    that depend on it say so in their "description"): an absent "reference"
    means r_k = 0, an absent "disturbance" means v_k = 0.  The target is
    computed by the rule below in both cases.
    "referencePerStep" and "disturbancePerStep" hold the N rows actually used.

Target (x_s, u_s), for the LAST reference row rbar and the LAST disturbance
row vbar: among the steady states x_s = A x_s + B u_s + E vbar, least
(C x_s - rbar)'Q(C x_s - rbar), then least ||u_s||, then least ||x_s||.
Computed here: a minimum-norm particular solution of [A - I, B] z = -E vbar
(numpy.linalg.lstsq; the script asserts it is exact, i.e. a steady state
exists), the orthonormal null space of [A - I, B] (scipy.linalg.null_space,
rcond 1e-10) and three nested minimum-norm least-squares problems
(generate_fixtures.min_norm_lstsq, SVD with an absolute cut-off 1e-10).
Where a case has input limits the references were chosen so that this
unconstrained target respects them; the script asserts it, so no target QP
is needed.  "target" = {state, input, output (= C x_s), referenceReached
(||C x_s - rbar||_inf <= 1e-9 max(1, ||rbar||_inf))}.

Terminal weight "riccati" = scipy.linalg.solve_discrete_are(A, B, C'QC, R)
of the discrete plant (E plays no part in it).

Continuous plants ("timeDomain": "continuous") are discretised by zero-order
hold of B and E together: scipy.signal.cont2discrete((A, [B E], C, 0), T,
method='zoh'), columns split into B_d and E_d; "discretePlant" {a, b, e}
holds the result.  Checked here against scipy.linalg.expm of the block
matrix [[A, B, E], [0, 0, 0]] T (the construction cont2discrete uses itself,
so this guards the column split) and, where A is invertible, against the
closed form [B_d E_d] = A^{-1} (e^{AT} - I) [B E].

Solution
    Every case, limited or not, is solved in the sparse form with
    cvxopt.solvers.qp (abstol = reltol = feastol = 1e-12, maxiters 200,
    kktsolver 'ldl', status must be 'optimal') - the same call as
    constrained_plans.json.  Limits as there: hard on every u_k and du_k
    (du_0 only with "previousInput"), soft on y_1..y_N with one slack per
    limited output shared over the horizon and the penalty
    sum_j (rho_j e_j + w_j e_j^2), rho_j = "linearViolationWeight" = 1e5,
    w_j = limits.outputViolationWeight.

Checks done here for every case (worst values printed at the end)
    * KKT residual of the CVXOPT solution: dynamics rows, inequality
      violation, stationarity H z + f + G'l + E'y with the returned
      multipliers, sign of the multipliers, complementarity.
    * J from its definition on the trajectory = the QP objective - penalty;
      a rollout of the inputs through the dynamics = CVXOPT's states.
    * Cases without limits: the inputs and J agree with a direct dense solve
      built independently (states written as A^k x_0 + sum A^(k-1-j) (B u_j
      + E v_j) from explicit matrix powers, the cost as one stacked weighted
      least-squares residual, the condensed normal equations solved with
      numpy.linalg.solve), and with the sparse KKT system solved with
      numpy.linalg.solve.
    * Cases with limits: generate_fixtures.polish (numpy active-set
      refinement) agrees with CVXOPT to 1e-7 max(1, |z|), and its J agrees
      to 1e-9 max(1, J).
    * The schedule and the forecast matter: the plan with every reference and
      disturbance row replaced by the last one differs (inputs by > 1e-3),
      so a service that ignores r_k or v_k fails the case.
    * The limits matter: without them the inputs differ by > 1e-3; without
      its soft output limits a case's plan breaks them by > 1e-3.
    * Targets: steady-state equation residual, and the optimality conditions
      of each level, with tie directions found independently of the solver
      (scipy.linalg.null_space): the output error's gradient is orthogonal
      to the steady-state directions, u_s is orthogonal to the level-1 ties,
      x_s to the level-2 ties.
    * Soft-limit cases: "met" has every slack 0 and at least one output at
      its limit; "violated" has a slack > 1e-3.
    * Refused requests: this script's own reading of each request gives the
      expected field path, and every case's request gives none.

Cases
-----
reference-schedule-only-N15
    4 states, 2 inputs, 2 outputs, q = 1; a reference schedule of 6 rows, no
    "disturbance" field (v_k = 0 by the assumption above), no limits.
disturbance-forecast-only-N12
    Same plant; a forecast of 8 rows, no "reference" field (r_k = 0 by the
    assumption above; the target still follows vbar), no limits.
schedule-shorter-forecast-full-previous-input-N10
    Same plant with an input-rate weight and a previous input; a reference
    schedule of 3 rows (last row held 8 steps) and a forecast of exactly N
    rows; no limits.
held-disturbance-vector-one-row-schedule-N20
    Same plant with q = 2 and only its first output; "disturbance" one
    vector held over the horizon, "reference" a schedule of a single row; no
    limits.  With one output and two inputs the steady states that meet the
    reference form a line, so the least-||u_s|| rule (with the disturbance
    offset) picks the target.
continuous-mass-spring-zoh-with-e-N25
    Continuous mass-spring-damper (force input; disturbances: an external
    force and the displacement of the spring's base), ZOH at 0.1 s with E; a
    reference schedule of exactly N rows and a forecast of 10 rows; no limits.
input-limits-full-schedule-short-forecast-N12
    The 4x2 plant, q = 1, input limits that bind; a schedule of exactly N
    rows and a forecast of 4 rows.
input-and-rate-limits-previous-input-N20
    Discrete double integrator (T = 0.1) with a force disturbance, input and
    rate limits, a previous input that makes the first rate limit bind; a
    schedule of 5 rows and a forecast of 6 rows.
soft-output-limits-met-N20
    Two-state lag, one output with an upper soft limit; a forecast that
    pushes the output up; the inputs can hold it at the limit (slack 0, limit
    active).
soft-output-limits-violated-N20
    The same plant with a larger forecast pulse and tighter input limits:
    the limit cannot be met, the slack is positive.
cold-store-outdoor-forecast-N24
    Our own scenario with invented numbers: three zone temperatures of a
    cold store (deviations in K from their setpoints), chiller 1, chiller 2
    (kW, deviations from the nominal duty) and a door fan; q = 1 measured
    disturbance, the outdoor temperature (deviation in K), entering each zone
    through its wall conductance.  The thermal model of generate_fixtures.py
    (cold_storage_continuous) with E = wall conductance / capacity, ZOH at
    300 s, N = 24 (two hours); a 12-row warm-afternoon forecast (0 to +4 K
    over the first hour), a pre-cooling reference schedule of 4 rows, input
    and rate limits, a soft upper limit on the dock zone (+0.8 K, below the
    dock's last reference +0.9 K; met), a previous input.  Input bounds,
    rate limits and the output limit are all active somewhere.

"refused" (requests the service must reject, with the field path):
    forecast longer than N rows -> "disturbance"; a forecast row of wrong
    width -> "disturbance[1]"; a schedule longer than N rows -> "reference";
    a schedule row of wrong width -> "reference[2]".  Each names the case
    whose model it is sent to ("modelCase").
"""

import os
import platform
import sys

import numpy as np
import scipy
import scipy.linalg as sla
import scipy.signal as ssig
import cvxopt

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
import generate_fixtures as gf  # noqa: E402  (the shared formulation)

OUTPUT = os.path.join(gf.FIXTURES, "preview_plans.json")
VERSIONS = "SciPy %s, NumPy %s, CVXOPT %s, Python %s" % (
    scipy.__version__, np.__version__, cvxopt.__version__, platform.python_version())
SCHEDULE_MATTERS = 1e-3       # min change of the inputs when r_k, v_k are flattened
AGREEMENT = 1e-7              # CVXOPT vs. dense / sparse numpy / refinement

CHECKS = {}          # name -> worst (largest) value seen
MARGINS = {}         # name -> smallest value seen (must stay above a floor)


def record(check, value):
    CHECKS[check] = max(CHECKS.get(check, 0.0), float(value))


def record_margin(check, value):
    MARGINS[check] = min(MARGINS.get(check, np.inf), float(value))


# ----------------------------------------------------------------- request reading

def rows_of(value, width, horizon, field):
    """The request's vector-or-rows field as a list of rows, or (path, reason).

    Written for this script (it decides the expected paths of the refused
    cases): a list whose first entry is a list is a schedule, otherwise one
    vector held over the horizon."""
    if len(value) > 0 and isinstance(value[0], list):
        if len(value) > horizon:
            return None, (field, "has %d rows; at most the horizon, %d" % (len(value), horizon))
        for i, row in enumerate(value):
            if not isinstance(row, list) or len(row) != width:
                return None, ("%s[%d]" % (field, i), "row must have %d entries" % width)
        return [list(r) for r in value], None
    if len(value) != width:
        return None, (field, "has %d entries; expected %d" % (len(value), width))
    return [list(value)], None


def per_step(value, width, horizon, field):
    """N rows: the given rows, the last one held to the end (zeros if absent)."""
    if value is None:
        return np.zeros((horizon, width))
    rows, error = rows_of(value, width, horizon, field)
    assert error is None, error
    rows = np.asarray(rows, dtype=float)
    held = np.repeat(rows[-1:], horizon - rows.shape[0], axis=0)
    return np.vstack([rows, held])


# ----------------------------------------------------------------- discretisation

def zoh_with_disturbance(a, b, e, t):
    """ZOH of B and E together, checked against expm([[A, B, E], [0, 0, 0]] T)."""
    n, m = b.shape
    q = e.shape[1]
    bd_all = np.hstack([b, e])
    ad, bde, _, _, _ = ssig.cont2discrete((a, bd_all, np.eye(n), np.zeros((n, m + q))), t,
                                          method="zoh")
    big = np.zeros((n + m + q, n + m + q))
    big[:n, :n] = a * t
    big[:n, n:n + m] = b * t
    big[:n, n + m:] = e * t
    ex = sla.expm(big)
    dev = max(abs(ex[:n, :n] - ad).max(), abs(ex[:n, n:] - bde).max())
    record("zoh: |cont2discrete - expm of [[A, B, E], [0, 0, 0]] T|", dev)
    assert dev < 1e-12, dev
    # cont2discrete builds the same block exponential, so also compare with
    # the closed form A^{-1} (e^{AT} - I) [B E] where A is invertible
    if np.linalg.cond(a) < 1e8:
        closed = np.linalg.solve(a, (ad - np.eye(n)) @ bd_all)
        dev = abs(closed - bde).max() / max(1.0, abs(bde).max())
        record("zoh: |[B_d E_d] - A^-1 (A_d - I) [B E]| / max(1,|[B_d E_d]|)", dev)
        assert dev < 1e-10, dev
    return ad, bde[:, :m], bde[:, m:]


# ----------------------------------------------------------------- target

def steady_target(a, b, e, c, q, rbar, vbar):
    """Lexicographic target for the last reference and disturbance rows."""
    n, m = b.shape
    M = np.hstack([a - np.eye(n), b])
    rhs = -e @ vbar
    zp, *_ = np.linalg.lstsq(M, rhs, rcond=None)
    consistency = abs(M @ zp - rhs).max() / max(1.0, abs(rhs).max())
    assert consistency < 1e-12, ("no steady state for this disturbance", consistency)
    z = sla.null_space(M, rcond=gf.NULL_RCOND)
    zx, zu = z[:n], z[n:]
    px, pu = zp[:n], zp[n:]
    qh = gf.psd_sqrt(q)
    tol1 = gf.NULL_RCOND * max(1.0, np.linalg.norm(qh @ c, 2))
    alpha, n1 = gf.min_norm_lstsq(qh @ c @ zx, qh @ (rbar - c @ px), tol1)
    beta, n2 = gf.min_norm_lstsq(zu @ n1, -(pu + zu @ alpha), gf.NULL_RCOND)
    alpha = alpha + n1 @ beta
    n12 = n1 @ n2
    gamma, _ = gf.min_norm_lstsq(zx @ n12, -(px + zx @ alpha), gf.NULL_RCOND)
    alpha = alpha + n12 @ gamma
    xs, us = px + zx @ alpha, pu + zu @ alpha
    reached = bool(abs(c @ xs - rbar).max() <= 1e-9 * max(1.0, abs(rbar).max()))
    check_target(a, b, e, c, q, rbar, vbar, xs, us)
    return xs, us, reached


def check_target(a, b, e, c, q, rbar, vbar, xs, us):
    """Steady-state equation and the optimality conditions of each level, with
    tie directions from scipy.linalg.null_space (not from the solver above)."""
    n = a.shape[0]
    scale = max(1.0, abs(xs).max(), abs(us).max())
    record("target: |A xs + B us + E vbar - xs| / max(1,|xs|,|us|)",
           abs(a @ xs + b @ us + e @ vbar - xs).max() / scale)
    z = sla.null_space(np.hstack([a - np.eye(n), b]), rcond=1e-12)
    zx, zu = z[:n], z[n:]
    grad = zx.T @ c.T @ q @ (c @ xs - rbar)
    record("target: level-1 gradient along steady directions",
           abs(grad).max() / max(1.0, abs(q).max() * abs(rbar).max()))
    seen = gf.psd_sqrt(q) @ c @ zx
    t1 = z @ sla.null_space(seen, rcond=1e-12) if seen.size else z
    if t1.shape[1]:
        record("target: level-2 |u_s . level-1 ties|", abs(t1[n:].T @ us).max() / scale)
        t12 = t1 @ sla.null_space(t1[n:], rcond=1e-12) if t1[n:].size else t1
        if t12.shape[1]:
            record("target: level-3 |x_s . level-2 ties|", abs(t12[:n].T @ xs).max() / scale)


# ----------------------------------------------------------------- problem

class PreviewProblem(gf.Problem):
    """One plan problem in arrays.  Attribute names follow
    generate_fixtures.Problem, so generate_fixtures.constrained_qp builds its
    inequality rows and slacks unchanged."""

    def __init__(self, name, description, a, b, e, c, sample_time, horizon, q, r, s, terminal,
                 x0, reference=None, disturbance=None, previous_input=None, limits=None,
                 continuous=None):
        self.name, self.description = name, description
        self.continuous = continuous          # (A, B, E) in continuous time, or None
        if continuous is not None:
            a, b, e = zoh_with_disturbance(*(np.asarray(v, float) for v in continuous),
                                           sample_time)
        self.a, self.b, self.e = (np.asarray(v, float) for v in (a, b, e))
        self.n, self.m = self.b.shape
        self.qd = self.e.shape[1]
        self.has_c = c is not None
        self.c = np.eye(self.n) if c is None else np.asarray(c, float)
        self.p = self.c.shape[0]
        self.sample_time = float(sample_time)
        self.N = int(horizon)
        self.q_repr, self.r_repr, self.s_repr = q, r, s
        self.Q = gf.weight_matrix(q, self.p)
        self.R = gf.weight_matrix(r, self.m)
        self.s_given = s is not None
        self.S = gf.weight_matrix(s, self.m) if self.s_given else np.zeros((self.m, self.m))
        self.terminal_kind = terminal
        if terminal == "riccati":
            self.P = gf.dare(self.a, self.b, self.c.T @ self.Q @ self.c, self.R)
        else:
            assert terminal == "stage"
            self.P = self.c.T @ self.Q @ self.c
        self.x0 = np.asarray(x0, float)
        self.reference, self.disturbance = reference, disturbance
        self.refs = per_step(reference, self.p, self.N, "reference")
        self.dists = per_step(disturbance, self.qd, self.N, "disturbance")
        self.uprev = None if previous_input is None else np.asarray(previous_input, float)
        self.limits = limits
        self.xs, self.us, self.reached = steady_target(
            self.a, self.b, self.e, self.c, self.Q, self.refs[-1], self.dists[-1])

    def flattened(self):
        """The same problem with every r_k = r_bar and v_k = v_bar."""
        twin = PreviewProblem.__new__(PreviewProblem)
        twin.__dict__.update(self.__dict__)
        twin.refs = np.repeat(self.refs[-1:], self.N, axis=0)
        twin.dists = np.repeat(self.dists[-1:], self.N, axis=0)
        return twin

    def without_limits(self, limits):
        """The same problem with other limits (None: none)."""
        twin = PreviewProblem.__new__(PreviewProblem)
        twin.__dict__.update(self.__dict__)
        twin.limits = limits
        return twin

    # variable layout (xi, ui, nz): generate_fixtures.Problem's, inherited

    def quadratic(self, extra=0):
        """J = 1/2 z'Hz + f'z + const; generate_fixtures.Problem.quadratic with r_k."""
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

        e0 = self.c @ self.x0 - self.refs[0]
        const += float(e0 @ self.Q @ e0)
        I_n, I_m = np.eye(self.n), np.eye(self.m)
        for k in range(1, self.N):
            term([(self.xi(k), self.c)], self.refs[k], self.Q)
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
        """x_{k+1} - A x_k - B u_k = E v_k (+ A x_0 for k = 0) as equality rows."""
        n, N = self.n, self.N
        E = np.zeros((N * n, self.nz() + extra))
        e = np.zeros(N * n)
        for k in range(N):
            rows = slice(k * n, (k + 1) * n)
            E[rows, self.xi(k + 1)] = np.eye(n)
            E[rows, self.ui(k)] = -self.b
            e[rows] = self.e @ self.dists[k]
            if k == 0:
                e[rows] += self.a @ self.x0
            else:
                E[rows, self.xi(k)] = -self.a
        return E, e

    def unpack(self, z):
        X = np.vstack([self.x0] + [z[self.xi(k)] for k in range(1, self.N + 1)])
        U = np.vstack([z[self.ui(k)] for k in range(self.N)])
        return X, U

    def rollout(self, U):
        X = [self.x0]
        for k in range(self.N):
            X.append(self.a @ X[-1] + self.b @ U[k] + self.e @ self.dists[k])
        return np.vstack(X)

    def cost(self, X, U):
        """J from its definition on a trajectory (no penalty)."""
        J = 0.0
        for k in range(self.N):
            ey = self.c @ X[k] - self.refs[k]
            eu = U[k] - self.us
            J += ey @ self.Q @ ey + eu @ self.R @ eu
            if self.s_given and (k > 0 or self.uprev is not None):
                du = U[k] - (U[k - 1] if k > 0 else self.uprev)
                J += du @ self.S @ du
        ex = X[self.N] - self.xs
        return float(J + ex @ self.P @ ex)

    def soft_outputs(self):
        if self.limits is None:
            return []
        lo, hi = self.limits.get("outputMin"), self.limits.get("outputMax")
        return [j for j in range(self.p)
                if gf.opt(lo, j) is not None or gf.opt(hi, j) is not None]

    def model_json(self):
        if self.continuous is not None:
            a, b, e = self.continuous
            domain = "continuous"
        else:
            a, b, e = self.a, self.b, self.e
            domain = "discrete"
        plant = {"a": gf.to_list(a), "b": gf.to_list(b)}
        if self.has_c:
            plant["c"] = gf.to_list(self.c)
        plant["e"] = gf.to_list(e)
        plant["sampleTime"] = self.sample_time
        plant["timeDomain"] = domain
        cost = {"horizon": self.N, "outputWeight": gf.to_list(self.q_repr),
                "inputWeight": gf.to_list(self.r_repr)}
        if self.s_given:
            cost["inputRateWeight"] = gf.to_list(self.s_repr)
        cost["terminalWeight"] = self.terminal_kind
        return {"plant": plant, "cost": cost}

    def request_json(self):
        req = {"state": gf.to_list(self.x0)}
        if self.reference is not None:
            req["reference"] = gf.to_list(self.reference)
        if self.disturbance is not None:
            req["disturbance"] = gf.to_list(self.disturbance)
        if self.uprev is not None:
            req["previousInput"] = gf.to_list(self.uprev)
        return req


# ----------------------------------------------------------------- solving

def solve(pb, label="plan"):
    """CVXOPT on the sparse form.  Returns X, U, J, slack (length p), penalty
    and the QP data.  For the fixture's own plan (label "plan") the KKT
    residuals are recorded and the active-set refinement must agree; the
    comparison plans (flattened schedule, limits removed) are only used to
    show a difference far above the solver's accuracy."""
    own = label == "plan"

    def record(check, value):
        if own:
            globals()["record"](check, value)

    soft = pb.soft_outputs()
    if pb.limits is not None:
        H, f, const, G, h, E, e, sl = gf.constrained_qp(pb)
    else:
        H, f, const = pb.quadratic()
        E, e = pb.dynamics()
        G, h, sl = np.zeros((0, H.shape[0])), np.zeros(0), {}
    z, zl, y, _ = gf.cvxopt_qp(H, f, G, h, E, e)
    scale = max(1.0, abs(z).max())
    record("cvxopt KKT: dynamics residual / max(1,|z|)", abs(E @ z - e).max() / scale)
    if G.shape[0]:
        record("cvxopt KKT: inequality violation / max(1,|z|)",
               max(0.0, (G @ z - h).max()) / scale)
        record("cvxopt KKT: most negative multiplier", max(0.0, -zl.min()))
        record("cvxopt KKT: complementarity max |l_i (h - G z)_i|", abs(zl * (h - G @ z)).max())
    stat = H @ z + f + (G.T @ zl if G.shape[0] else 0.0) + E.T @ y
    record("cvxopt KKT: stationarity / max(1,|f|,|Hz|)",
           abs(stat).max() / max(1.0, abs(f).max(), abs(H @ z).max()))
    X, U = pb.unpack(z)
    record("rollout: |A x + B u + E v - x_next| / max(1,|X|)",
           abs(pb.rollout(U) - X).max() / max(1.0, abs(X).max()))
    slack = np.zeros(pb.p)
    for j, idx in sl.items():
        record("soft limits: slack below zero before clipping", max(0.0, -z[idx]))
        slack[j] = max(0.0, z[idx])       # CVXOPT may return -1e-16 for a zero slack
    J = pb.cost(X, U)
    penalty = 0.0
    if soft:
        w = pb.limits["outputViolationWeight"]
        penalty = sum(gf.LINEAR_VIOLATION_WEIGHT * slack[j] + w[j] * slack[j] ** 2 for j in soft)
    objective = 0.5 * z @ H @ z + f @ z + const
    record("cost: |J(formula) + penalty - QP objective| / max(1,J)",
           abs(J + penalty - objective) / max(1.0, abs(J)))
    if G.shape[0] and own:
        zp, _, _ = gf.polish(H, f, G, h, E, e, z, zl)
        dz = abs(zp - z).max() / scale
        record("limited: |active-set refinement - CVXOPT| / max(1,|z|)", dz)
        assert dz < AGREEMENT, (pb.name, label, dz)
        Xp, Up = pb.unpack(zp)
        dj = abs(pb.cost(Xp, Up) - J) / max(1.0, abs(J))
        record("limited: |J(refinement) - J(CVXOPT)| / max(1,J)", dj)
        assert dj < 1e-9, (pb.name, dj)
    return X, U, J, slack, penalty, (H, f, E, e)


def dense_condensed(pb):
    """Direct dense solve, built without the sparse matrices: states from
    explicit matrix powers, J as one stacked weighted residual ||M U + d||^2,
    normal equations M'M U = -M'd by numpy.linalg.solve."""
    n, m, N = pb.n, pb.m, pb.N
    powers = [np.eye(n)]
    for _ in range(N):
        powers.append(pb.a @ powers[-1])
    free = np.zeros((N + 1, n))               # x_k with U = 0
    gain = np.zeros((N + 1, n, N * m))        # d x_k / d U
    for k in range(N + 1):
        free[k] = powers[k] @ pb.x0
        for j in range(k):
            free[k] += powers[k - 1 - j] @ pb.e @ pb.dists[j]
            gain[k][:, j * m:(j + 1) * m] = powers[k - 1 - j] @ pb.b
    qh, rh, sh, ph = (gf.psd_sqrt(w) for w in (pb.Q, pb.R, pb.S, pb.P))
    blocks, offsets = [], []
    for k in range(N):
        blocks.append(qh @ pb.c @ gain[k])
        offsets.append(qh @ (pb.c @ free[k] - pb.refs[k]))
    blocks.append(ph @ gain[N])
    offsets.append(ph @ (free[N] - pb.xs))
    for k in range(N):
        sel = np.zeros((m, N * m))
        sel[:, k * m:(k + 1) * m] = np.eye(m)
        blocks.append(rh @ sel)
        offsets.append(-rh @ pb.us)
        if pb.s_given and (k > 0 or pb.uprev is not None):
            dsel = sel.copy()
            off = np.zeros(m)
            if k > 0:
                dsel[:, (k - 1) * m:k * m] = -np.eye(m)
            else:
                off = -pb.uprev
            blocks.append(sh @ dsel)
            offsets.append(sh @ off)
    M, d = np.vstack(blocks), np.concatenate(offsets)
    u = np.linalg.solve(M.T @ M, -M.T @ d)
    r = M @ u + d
    return u.reshape(N, m), float(r @ r)


def sparse_numpy(pb):
    """The sparse KKT system solved with numpy.linalg.solve (as
    generate_fixtures.solve_unconstrained does for unlimited plans)."""
    H, f, _ = pb.quadratic()
    E, e = pb.dynamics()
    nz, ne = H.shape[0], E.shape[0]
    K = np.block([[H, E.T], [E, np.zeros((ne, ne))]])
    sol = np.linalg.solve(K, np.concatenate([-f, e]))
    return pb.unpack(sol[:nz])[1]


def active_counts(pb, X, U, slack):
    lim = pb.limits or {}
    near = lambda a, b: b is not None and abs(a - b) <= 1e-7   # noqa: E731
    inputs = sum(1 for k in range(pb.N) for i in range(pb.m)
                 if near(U[k, i], gf.opt(lim.get("inputMin"), i))
                 or near(U[k, i], gf.opt(lim.get("inputMax"), i)))
    rates = 0
    for k in range(pb.N):
        if k == 0 and pb.uprev is None:
            continue
        du = U[k] - (U[k - 1] if k > 0 else pb.uprev)
        rates += sum(1 for i in range(pb.m)
                     if near(du[i], gf.opt(lim.get("inputRateMin"), i))
                     or near(du[i], gf.opt(lim.get("inputRateMax"), i)))
    Y = X @ pb.c.T
    outputs = 0
    for k in range(1, pb.N + 1):
        for j in pb.soft_outputs():
            lo, hi = gf.opt(lim.get("outputMin"), j), gf.opt(lim.get("outputMax"), j)
            if (lo is not None and near(Y[k, j], lo - slack[j])) or \
               (hi is not None and near(Y[k, j], hi + slack[j])):
                outputs += 1
    return inputs, rates, outputs


def target_within_input_limits(pb):
    lim = pb.limits or {}
    for i in range(pb.m):
        lo, hi = gf.opt(lim.get("inputMin"), i), gf.opt(lim.get("inputMax"), i)
        assert lo is None or pb.us[i] >= lo + 1e-9, (pb.name, "target input below inputMin", i)
        assert hi is None or pb.us[i] <= hi - 1e-9, (pb.name, "target input above inputMax", i)


# ----------------------------------------------------------------- plants

def four_state(q_dist):
    a, b, c = gf.four_state_two_input()
    if q_dist == 1:
        e = np.array([[0.0], [0.3], [0.0], [-0.2]])
    else:
        e = np.array([[0.1, 0.0], [0.3, 0.0], [0.0, 0.1], [0.0, -0.4]])
    return a, b, e, c


def mass_spring_continuous():
    """Mass 2, spring 8, damper 0.8; input: force; disturbances: an external
    force and the displacement of the spring's base (force 8 w)."""
    mass, stiff, damp = 2.0, 8.0, 0.8
    a = np.array([[0.0, 1.0], [-stiff / mass, -damp / mass]])
    b = np.array([[0.0], [1.0 / mass]])
    e = np.array([[0.0, 0.0], [1.0 / mass, stiff / mass]])
    return a, b, e


def double_integrator_with_force():
    ac, bc = gf.double_integrator()
    ad, bd, ed = zoh_with_disturbance(ac, bc, 0.5 * bc, 0.1)   # disturbance force, half gain
    return ad, bd, ed


def two_state_lag():
    a = np.array([[0.9, 0.1], [0.0, 0.8]])
    b = np.array([[0.0], [0.2]])
    e = np.array([[0.1], [0.05]])
    return a, b, e, np.array([[1.0, 0.0]])


def cold_store_continuous():
    """generate_fixtures.cold_storage_continuous plus the outdoor temperature
    (deviation, K) entering each zone through its wall conductance.  Invented
    numbers for our own demo scenario."""
    a, b = gf.cold_storage_continuous()
    cap = np.array([800.0, 600.0, 900.0])
    g_amb = np.array([0.3, 0.6, 0.25])
    e = (g_amb / cap)[:, None]
    # the ambient conductances are the ones inside a: row sums of a*cap are -g_amb
    assert abs((a * cap[:, None]).sum(axis=1) + g_amb).max() < 1e-12
    return a, b, e


# ----------------------------------------------------------------- cases

def problems():
    P = []
    add = P.append
    a, b, e, c = four_state(1)
    add(PreviewProblem(
        "reference-schedule-only-N15",
        "Reference schedule of 6 rows (last row held 9 steps), no 'disturbance' field "
        "(v_k = 0 assumed), no limits.",
        a, b, e, c, 1.0, 15, [3.0, 1.0], [0.5, 1.0], None, "riccati", [0.5, -0.2, 0.1, 0.0],
        reference=[[0.0, 0.0], [0.0, 0.0], [0.5, 0.0], [1.0, 0.2], [1.0, 0.4], [1.0, 0.5]]))
    add(PreviewProblem(
        "disturbance-forecast-only-N12",
        "Disturbance forecast of 8 rows (last row held 4 steps), no 'reference' field "
        "(r_k = 0 assumed; the target still follows the last disturbance row), no limits.",
        a, b, e, c, 1.0, 12, [3.0, 1.0], [0.5, 1.0], None, "riccati", [0.2, 0.0, -0.1, 0.3],
        disturbance=[[0.0], [0.0], [0.5], [1.0], [1.5], [2.0], [2.0], [1.5]]))
    add(PreviewProblem(
        "schedule-shorter-forecast-full-previous-input-N10",
        "Reference schedule of 3 rows (last row held 7 steps), forecast of exactly N rows, "
        "rate weight with a previous input, no limits.",
        a, b, e, c, 1.0, 10, [3.0, 1.0], [0.5, 1.0], [1.0, 0.5], "riccati", [0.0, 0.3, 0.2, 0.0],
        reference=[[0.2, 0.0], [0.6, -0.1], [0.8, -0.3]],
        disturbance=[[v] for v in (0.0, 0.2, 0.4, 0.8, 1.0, 0.6, 0.2, -0.2, -0.5, -0.5)],
        previous_input=[0.1, -0.2]))
    a2, b2, e2, c2 = four_state(2)
    add(PreviewProblem(
        "held-disturbance-vector-one-row-schedule-N20",
        "'disturbance' one q = 2 vector held over the horizon, 'reference' a schedule of a "
        "single row; one output and two inputs, so the target's input is chosen by the "
        "least-norm rule among a line of steady states; no limits.",
        a2, b2, e2, c2[:1], 1.0, 20, [3.0], [[0.5, 0.1], [0.1, 1.0]], None, "riccati",
        [1.0, -0.5, 0.3, 0.2], reference=[[0.4]], disturbance=[0.8, -0.6]))
    ma, mb, me = mass_spring_continuous()
    ref25 = [[0.0]] * 5 + [[0.5]] * 10 + [[0.2]] * 10
    add(PreviewProblem(
        "continuous-mass-spring-zoh-with-e-N25",
        "Continuous plant, ZOH of [B E] at 0.1 s; reference schedule of exactly N rows, "
        "forecast of 10 rows (external force and base displacement), no limits.",
        None, None, None, [[1.0, 0.0]], 0.1, 25, [10.0], [0.1], None, "riccati", [0.1, 0.0],
        reference=ref25,
        disturbance=[[0.0, 0.0], [0.0, 0.0], [1.0, 0.0], [1.0, 0.0], [1.0, 0.05], [0.5, 0.1],
                     [0.0, 0.1], [0.0, 0.1], [-0.5, 0.1], [-0.5, 0.1]],
        continuous=(ma, mb, me)))
    add(PreviewProblem(
        "input-limits-full-schedule-short-forecast-N12",
        "Input limits that bind; reference schedule of exactly N rows, forecast of 4 rows "
        "(last row held 8 steps).",
        a, b, e, c, 1.0, 12, [3.0, 1.0], [0.5, 1.0], None, "riccati", [1.5, -1.0, 0.8, 0.5],
        reference=[[0.0, 0.0]] * 3 + [[0.6, 0.2]] * 5 + [[0.3, 0.1]] * 4,
        disturbance=[[0.0], [1.0], [2.0], [1.0]],
        limits={"inputMin": [-0.6, -0.5], "inputMax": [0.6, 0.5]}))
    da, db, de = double_integrator_with_force()
    add(PreviewProblem(
        "input-and-rate-limits-previous-input-N20",
        "Double integrator (T = 0.1) with a force disturbance; input and rate limits, a "
        "previous input; reference schedule of 5 rows, forecast of 6 rows.",
        da, db, de, [[1.0, 0.0]], 0.1, 20, [1.0], [0.01], None, "riccati", [0.0, 0.0],
        reference=[[0.0], [0.0], [0.2], [0.5], [1.0]],
        disturbance=[[0.0], [0.0], [0.0], [-1.0], [-1.0], [-0.5]],
        previous_input=[0.8],
        limits={"inputMin": [-2.0], "inputMax": [2.0],
                "inputRateMin": [-0.4], "inputRateMax": [0.4]}))
    la, lb, le, lc = two_state_lag()
    pulse = [[0.0], [0.0], [1.0], [2.0], [3.0], [3.0], [2.0], [1.0], [0.0]]
    add(PreviewProblem(
        "soft-output-limits-met-N20",
        "Upper soft output limit; a forecast pulse pushes the output up, the inputs hold it "
        "at the limit: every slack 0, the limit active.",
        la, lb, le, lc, 1.0, 20, [1.0], [0.1], None, "riccati", [0.0, 0.0],
        reference=[0.3], disturbance=pulse,
        limits={"inputMin": [-3.0], "inputMax": [3.0], "outputMax": [0.5],
                "outputViolationWeight": [10.0]}))
    add(PreviewProblem(
        "soft-output-limits-violated-N20",
        "Upper soft output limit that the bounded input cannot keep under a larger forecast "
        "pulse: the slack is positive.",
        la, lb, le, lc, 1.0, 20, [1.0], [0.1], None, "riccati", [0.0, 0.0],
        reference=[0.3], disturbance=[[1.5 * v[0]] for v in pulse],
        limits={"inputMin": [-1.5], "inputMax": [1.0], "outputMax": [0.5],
                "outputViolationWeight": [10.0]}))
    ca, cb, ce = cold_store_continuous()
    outdoor = [[v] for v in (0.0, 0.5, 1.0, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 4.0, 4.0, 4.0)]
    add(PreviewProblem(
        "cold-store-outdoor-forecast-N24",
        "Our own cold-store scenario, invented numbers: 3 zone temperatures (deviations, K), "
        "chillers 1 and 2 (kW) and a door fan, all as deviations from the nominal operating "
        "point; outdoor temperature deviation (K) as q = 1 measured disturbance with a "
        "12-row forecast; ZOH at 300 s; reference schedule of 4 rows (pre-cool zones 1 and "
        "3; the dock may float up to +0.9 K, but its soft upper limit is +0.8 K and is "
        "met); input, rate and output limits all active; previous input.",
        None, None, None, None, 300.0, 24, [1.0, 1.0, 1.0], [0.01, 0.01, 1.0],
        [0.05, 0.05, 0.5], "riccati", [0.3, 0.6, 0.1],
        reference=[[0.0, 0.0, 0.0], [-0.3, 0.3, -0.3], [-0.7, 0.6, -0.7], [-1.0, 0.9, -1.0]],
        disturbance=outdoor, previous_input=[0.2, 0.2, 0.0],
        limits={"inputMin": [-4.0, -4.0, -0.5], "inputMax": [2.7, 2.7, 0.5],
                "inputRateMin": [-0.5, -0.5, None], "inputRateMax": [0.5, 0.5, None],
                "outputMax": [None, 0.8, None],
                "outputViolationWeight": [0.0, 10.0, 0.0]},
        continuous=(ca, cb, ce)))
    return P


def refused_requests(by_name):
    """Requests the service must reject, with the field path."""
    out = []

    def add(name, model_case, request, path, reason):
        pb = by_name[model_case]
        found = []
        for field, width in (("reference", pb.p), ("disturbance", pb.qd)):
            if field in request:
                _, err = rows_of(request[field], width, pb.N, field)
                if err is not None:
                    found.append(err[0])
        assert found == [path], (name, found, path)
        out.append({"name": name, "modelCase": model_case, "request": request,
                    "path": path, "reason": reason})

    base = by_name["disturbance-forecast-only-N12"]
    x0 = gf.to_list(base.x0)
    add("forecast-longer-than-horizon", base.name,
        {"state": x0, "disturbance": [[k / 10.0] for k in range(base.N + 1)]},
        "disturbance", "13 forecast rows for a horizon of 12")
    add("forecast-row-of-wrong-width", base.name,
        {"state": x0, "disturbance": [[0.0], [0.5, 0.5], [1.0]]},
        "disturbance[1]", "row 1 has 2 entries; the plant has q = 1 disturbance")
    sched = by_name["reference-schedule-only-N15"]
    add("schedule-longer-than-horizon", sched.name,
        {"state": gf.to_list(sched.x0), "reference": [[0.0, 0.0]] * (sched.N + 1)},
        "reference", "16 schedule rows for a horizon of 15")
    add("schedule-row-of-wrong-width", sched.name,
        {"state": gf.to_list(sched.x0), "reference": [[0.0, 0.0], [0.5, 0.0], [1.0], [1.0, 0.2]]},
        "reference[2]", "row 2 has 1 entry; the plant has p = 2 outputs")
    return out


# ----------------------------------------------------------------- main

def build_case(pb):
    target_within_input_limits(pb)
    X, U, J, slack, penalty, _ = solve(pb)
    counts = active_counts(pb, X, U, slack)
    # the schedule / forecast must matter
    if abs(pb.refs - pb.refs[-1]).max() > 0 or abs(pb.dists - pb.dists[-1]).max() > 0:
        _, Uf, _, _, _, _ = solve(pb.flattened(), "flattened")
        change = abs(Uf - U).max()
        record_margin("schedule matters: max |inputs with rows flattened - inputs|", change)
        assert change > SCHEDULE_MATTERS, (pb.name, "schedule and forecast make no difference",
                                           change)
    if pb.limits is not None:
        # the limits must matter: without them the plan is different, and a
        # soft output limit is broken by more than 1e-3 without it
        free = pb.without_limits(None)
        Xf, Uf, _, _, _, _ = solve(free, "without limits")
        change = abs(Uf - U).max()
        record_margin("limits matter: max |inputs without limits - inputs|", change)
        assert change > SCHEDULE_MATTERS, (pb.name, "limits make no difference", change)
        if pb.soft_outputs():
            lim = pb.limits
            hard = {k: v for k, v in lim.items()
                    if k not in ("outputMin", "outputMax", "outputViolationWeight")}
            Xh, _, _, _, _, _ = solve(pb.without_limits(hard or None), "without output limits")
            Yh = (Xh @ pb.c.T)[1:]
            excess = 0.0
            for j in pb.soft_outputs():
                lo, hi = gf.opt(lim.get("outputMin"), j), gf.opt(lim.get("outputMax"), j)
                if lo is not None:
                    excess = max(excess, (lo - Yh[:, j]).max())
                if hi is not None:
                    excess = max(excess, (Yh[:, j] - hi).max())
            record_margin("soft limits matter: excess without the output limits", excess)
            assert excess > SCHEDULE_MATTERS, (pb.name, "output limits never bind", excess)
    if pb.limits is None:
        Ud, Jd = dense_condensed(pb)
        du = abs(Ud - U).max() / max(1.0, abs(U).max())
        dj = abs(Jd - J) / max(1.0, abs(J))
        record("unlimited: |dense condensed - CVXOPT| inputs / max(1,|U|)", du)
        record("unlimited: |dense condensed - CVXOPT| cost / max(1,J)", dj)
        assert du < AGREEMENT and dj < 1e-9, (pb.name, du, dj)
        Us = sparse_numpy(pb)
        ds = abs(Us - U).max() / max(1.0, abs(U).max())
        record("unlimited: |sparse numpy KKT - CVXOPT| inputs / max(1,|U|)", ds)
        assert ds < AGREEMENT, (pb.name, ds)
    soft = pb.soft_outputs()
    if soft:
        if pb.name.startswith("soft-output-limits-met"):
            assert slack.max() < 1e-9 and counts[2] > 0, (pb.name, slack, counts)
        if pb.name.startswith("soft-output-limits-violated"):
            assert slack.max() > 1e-3, (pb.name, slack)

    d = {"name": pb.name, "description": pb.description, "model": pb.model_json()}
    if pb.continuous is not None:
        d["discretePlant"] = {"a": gf.to_list(pb.a), "b": gf.to_list(pb.b),
                              "e": gf.to_list(pb.e)}
    if pb.limits is not None:
        d["limits"] = {k: list(v) for k, v in pb.limits.items()}
        if soft:
            d["linearViolationWeight"] = [gf.LINEAR_VIOLATION_WEIGHT] * pb.p
    d["terminalMatrix"] = gf.to_list(pb.P)
    d.update(pb.request_json())
    d["referencePerStep"] = gf.to_list(pb.refs)
    d["disturbancePerStep"] = gf.to_list(pb.dists)
    d["target"] = {"state": gf.to_list(pb.xs), "input": gf.to_list(pb.us),
                   "output": gf.to_list(pb.c @ pb.xs), "referenceReached": pb.reached}
    d["inputs"] = gf.to_list(U)
    d["states"] = gf.to_list(X)
    d["outputs"] = gf.to_list(X @ pb.c.T)
    d["cost"] = J
    if pb.limits is not None:
        d["activeInputBoundCount"] = counts[0]
    if soft:
        d["slack"] = gf.to_list(slack)
        d["softLimitPenalty"] = penalty
    print("  %-52s n=%d m=%d p=%d q=%d N=%2d refRows=%s distRows=%s bounds=%d rate=%d out=%d "
          "slack=%s reached=%s J=%.6g"
          % (pb.name, pb.n, pb.m, pb.p, pb.qd, pb.N, rows_count(pb.reference),
             rows_count(pb.disturbance), counts[0], counts[1], counts[2],
             np.round(slack, 6).tolist() if soft else "-", pb.reached, J))
    return d


def rows_count(value):
    if value is None:
        return "absent"
    return str(len(value)) if isinstance(value[0], list) else "vector"


def main():
    cases, by_name = [], {}
    for pb in problems():
        cases.append(build_case(pb))
        by_name[pb.name] = pb
    refused = refused_requests(by_name)
    notes = [
        "x_{k+1} = A x_k + B u_k + E v_k; 'reference' and 'disturbance' are one vector "
        "(held over the horizon) or 1..N rows (row k is step k; the last row is held); "
        "referencePerStep / disturbancePerStep are the N rows used.",
        "Assumed here: an absent 'reference' means r_k = 0 and an absent 'disturbance' "
        "means v_k = 0; the two cases that rely on it say so in their description.",
        "target is the lexicographic steady state for the LAST reference and disturbance "
        "rows (output error weighted by Q, then |u_s|, then |x_s|); in limited cases it "
        "respects the input limits, which the generator asserts.",
        "cost is J without the soft-limit penalty; softLimitPenalty = sum_j (rho_j e_j + "
        "w_j e_j^2) over the limited outputs, slack = e (0 for outputs without limits, "
        "clipped at 0).",
        "Every case is solved with cvxopt.solvers.qp on the sparse form (abstol = reltol = "
        "feastol = 1e-12, maxiters 200, kktsolver 'ldl'); unlimited cases agree with a "
        "dense condensed numpy solve and limited ones with a numpy active-set refinement "
        "to 1e-7.",
        "Continuous plants: ZOH of [B E] together (scipy.signal.cont2discrete), checked "
        "against scipy.linalg.expm of [[A, B, E], [0, 0, 0]] T; discretePlant holds it.",
        "refused: requests the service must reject; path is the field path of the error.",
        "cold-store-outdoor-forecast-N24 is our own scenario with invented numbers.",
    ]
    source = ("cvxopt.solvers.qp on the sparse formulation of generate_fixtures.py extended "
              "with E v_k and r_k; terminal weights scipy.linalg.solve_discrete_are; targets "
              "numpy.linalg.lstsq + scipy.linalg.null_space + numpy.linalg.svd least squares; "
              "plant discretisation scipy.signal.cont2discrete (zoh); %s" % VERSIONS)
    gf.write_json(OUTPUT, {"source": source, "notes": notes, "cases": cases,
                           "refused": refused})
    print()
    print("cases (%d): %s" % (len(cases), ", ".join(c["name"] for c in cases)))
    print("refused (%d): %s" % (len(refused), ", ".join(
        "%s -> %s" % (r["name"], r["path"]) for r in refused)))
    print()
    print("checks (worst value over all cases):")
    for k, v in list(gf.CHECKS.items()) + list(CHECKS.items()):
        print("  %-72s %.3e" % (k, v))
    print("margins (smallest value over the cases; each must exceed %g):" % SCHEDULE_MATTERS)
    for k, v in MARGINS.items():
        print("  %-72s %.3e" % (k, v))


if __name__ == "__main__":
    sys.exit(main())
