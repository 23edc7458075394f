#!/usr/bin/python3
"""Reference fixtures for the steady-state estimator tests of Lookahead.Core.Tests.

Run from the repository root with Debian's interpreter:

    /usr/bin/python3 tests/reference/generate_estimators.py

It writes tests/Lookahead.Core.Tests/Fixtures/estimators.json.  Random data
comes from numpy.random.default_rng with a fixed seed per case, and the
helpers that format numbers are those of generate_fixtures.py, so the output
is byte-for-byte reproducible with the same library versions.

Model
-----
Plant x(k+1) = A x + B u, y = C x (n states, m inputs, p outputs), augmented
with n_d integrating disturbances d(k+1) = d(k):

    "output": B_d = 0 (n x p), C_d = I_p, n_d = p
    "input":  B_d = B,         C_d = 0,   n_d = m
    "none":   n_d = 0

    A_a = [[A, B_d], [0, I]],  B_a = [B; 0],  C_a = [C, C_d].

What each case holds and how it was computed
--------------------------------------------
cases: {name, disturbanceModel, a, b, c, processNoise, measurementNoise,
        p, gain, predictorGain, eigenvalues, spectralRadius,
        initialise, trajectory}
    processNoise (W, over [x; d]) and measurementNoise (V) are either a
    vector (a diagonal matrix) or a full matrix, as the service accepts them.
    p     = scipy.linalg.solve_discrete_are(A_a.T, C_a.T, W, V), the prior
            (one-step-ahead) error covariance.  Checked here: the filter
            Riccati residual P - (A P A' - A P C' (C P C' + V)^-1 C P A' + W)
            relative to ||P||, symmetry, and that it is stabilising.
    gain  = L = P C_a' (C_a P C_a' + V)^-1 (numpy.linalg.solve), the filter
            gain: x+ = x- + L (y - C_a x-).
    predictorGain = A_a L.
    eigenvalues of A_a - A_a L C_a from numpy.linalg.eigvals, as [re, im]
            pairs in numpy's order (compare as multisets), and their largest
            magnitude spectralRadius (< 1 is asserted).
    initialise: {input, measurement, state, disturbance}: the least-squares
            (minimum-norm) solution of the steady-state equations
                [[I - A, -B_d], [C, C_d]] [x; d] = [B u; y]
            from numpy.linalg.lstsq(rcond=None), with its residual norm
            "residual" (0 up to rounding when the equations are consistent).
    trajectory: {prior: {state, disturbance}, inputs, measurements,
            corrected, nextPriors}: a short run of the filter recursion in
            numpy with the gain above.  At each sample k the prior is
            corrected with y(k) (a null measurement is skipped: no
            correction), then predicted with u(k):
                x+(k)   = x-(k) + L (y(k) - C_a x-(k))
                x-(k+1) = A_a x+(k) + B_a u(k)
            corrected[k] and nextPriors[k] are the full augmented vectors.

refused: {name, disturbanceModel, a, b, c, processNoise, measurementNoise,
          path, reason, ...numbers}
    Designs that must be refused, each with the reason established here
    independently with numpy.linalg.matrix_rank (default tolerance):
    "rank-deficient"  rank [[A - I, B_d], [C, C_d]] < n + n_d ("rank" and
                      "required" given); also "rankAMinusI" = rank(A - I).
    "more-disturbances-than-outputs"  n_d > p, so the same matrix (n + p
                      rows, n + n_d columns) cannot have full column rank.
    "fewer-disturbances-than-outputs" n_d < p: the disturbances cannot
                      account for a steady offset in every output.
    "undetectable"    Hautus: rank [A_a - lam I; C_a] < n + n_d for an
                      eigenvalue lam of A_a with |lam| >= 1 ("witness").
    "noise-misses-unit-circle-mode"  rank [A_a - lam I, W] < n + n_d for an
                      eigenvalue on the unit circle ("witness"): no
                      stabilising solution of the filter Riccati equation.
"""

import os
import platform
import sys

import numpy as np
import scipy
import scipy.linalg as sla

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from generate_fixtures import (FIXTURES, cold_storage_continuous, record,  # noqa: E402
                               CHECKS, spectral_radius, to_list, weight_matrix,
                               write_json, zoh)

OUTPUT_FILE = os.path.join(FIXTURES, "estimators.json")
VERSIONS = "SciPy %s, NumPy %s, Python %s" % (
    scipy.__version__, np.__version__, platform.python_version())


def augment(a, b, c, model):
    n, m = b.shape
    p = c.shape[0]
    if model == "output":
        bd, cd = np.zeros((n, p)), np.eye(p)
    elif model == "input":
        bd, cd = b.copy(), np.zeros((p, m))
    else:
        bd, cd = np.zeros((n, 0)), np.zeros((p, 0))
    nd = bd.shape[1]
    aa = np.block([[a, bd], [np.zeros((nd, n)), np.eye(nd)]])
    ba = np.vstack([b, np.zeros((nd, m))])
    ca = np.hstack([c, cd])
    return aa, ba, ca, bd, cd


def random_plant(rng, n, m, p, radius):
    a = rng.standard_normal((n, n))
    a *= radius / spectral_radius(a)
    return a, rng.standard_normal((n, m)), rng.standard_normal((p, n))


def random_psd(rng, size, rank):
    g = rng.standard_normal((size, rank))
    w = g @ g.T
    return 0.5 * (w + w.T)


def design(a, b, c, model, w_spec, v_spec):
    aa, ba, ca, _, _ = augment(a, b, c, model)
    na = aa.shape[0]
    w = weight_matrix(w_spec, na)
    v = weight_matrix(v_spec, c.shape[0])
    p = sla.solve_discrete_are(aa.T, ca.T, w, v)
    s = ca @ p @ ca.T + v
    gain = np.linalg.solve(s, ca @ p).T          # P C' S^-1 (S symmetric)
    residual = p - (aa @ p @ aa.T - aa @ p @ ca.T @ np.linalg.solve(s, ca @ p @ aa.T) + w)
    record("filter Riccati residual / ||P||", np.linalg.norm(residual) / np.linalg.norm(p))
    record("asymmetry of P / ||P||", np.linalg.norm(p - p.T) / np.linalg.norm(p))
    closed = aa - aa @ gain @ ca
    eig = np.linalg.eigvals(closed)
    radius = float(max(abs(eig)))
    assert radius < 1 - 1e-6, radius
    assert np.linalg.norm(residual) <= 1e-9 * np.linalg.norm(p)
    return aa, ba, ca, p, gain, eig, radius


def initialise(a, b, c, model, u, y):
    n = a.shape[0]
    _, _, _, bd, cd = augment(a, b, c, model)
    m_ss = np.block([[np.eye(n) - a, -bd], [c, cd]])
    rhs = np.concatenate([b @ u, y])
    z, _, _, _ = np.linalg.lstsq(m_ss, rhs, rcond=None)
    return {"input": to_list(u), "measurement": to_list(y),
            "state": to_list(z[:n]), "disturbance": to_list(z[n:]),
            "residual": float(np.linalg.norm(m_ss @ z - rhs))}


def trajectory(rng, aa, ba, ca, gain, n, steps=6):
    na, m = ba.shape
    p = ca.shape[0]
    prior = rng.standard_normal(na)
    first = prior.copy()
    inputs, measurements, corrected, priors = [], [], [], []
    for k in range(steps):
        u = rng.standard_normal(m)
        y = None if k == 3 else rng.standard_normal(p)
        post = prior if y is None else prior + gain @ (y - ca @ prior)
        prior = aa @ post + ba @ u
        inputs.append(to_list(u))
        measurements.append(None if y is None else to_list(y))
        corrected.append(to_list(post))
        priors.append(to_list(prior))
    return {"prior": {"state": to_list(first[:n]), "disturbance": to_list(first[n:])},
            "inputs": inputs, "measurements": measurements,
            "corrected": corrected, "nextPriors": priors}


def case(name, seed, a, b, c, model, w_spec, v_spec):
    rng = np.random.default_rng(seed)
    aa, ba, ca, p, gain, eig, radius = design(a, b, c, model, np.asarray(w_spec), np.asarray(v_spec))
    n, m = b.shape
    u = rng.standard_normal(m)
    y = rng.standard_normal(c.shape[0])
    init = initialise(a, b, c, model, u, y)
    if model != "none":
        # Output and input models that pass the offset-free test have a square, nonsingular system.
        assert init["residual"] <= 1e-10 * (1 + np.linalg.norm(y) + np.linalg.norm(b @ u)), init["residual"]
    print("%-34s n=%d m=%d p=%d %-6s radius %.4f  init residual %.1e"
          % (name, n, m, c.shape[0], model, radius, init["residual"]))
    return {"name": name, "disturbanceModel": model,
            "a": to_list(a), "b": to_list(b), "c": to_list(c),
            "processNoise": to_list(w_spec), "measurementNoise": to_list(v_spec),
            "p": to_list(p), "gain": to_list(gain), "predictorGain": to_list(aa @ gain),
            "eigenvalues": [[float(z.real), float(z.imag)] for z in eig],
            "spectralRadius": radius,
            "initialise": init,
            "trajectory": trajectory(rng, aa, ba, ca, gain, n)}


def gen_cases():
    cases = []

    rng = np.random.default_rng(901)
    a, b, c = random_plant(rng, 2, 1, 1, 0.8)
    cases.append(case("random-n2-output-diagonal", 9011, a, b, c, "output", [0.1, 0.1, 1.0], [0.01]))

    rng = np.random.default_rng(902)
    a, b, c = random_plant(rng, 3, 2, 2, 0.9)
    cases.append(case("random-n3-input-full", 9021, a, b, c, "input",
                      random_psd(rng, 5, 5) + 0.0, random_psd(rng, 2, 2) + 0.1 * np.eye(2)))

    rng = np.random.default_rng(903)
    a, b, c = random_plant(rng, 4, 2, 3, 0.95)
    # Rank-deficient (semidefinite) process noise that still drives every mode.
    cases.append(case("random-n4-output-semidefinite", 9031, a, b, c, "output",
                      random_psd(rng, 7, 5), [0.2, 0.5, 1.0]))

    rng = np.random.default_rng(904)
    a, b, c = random_plant(rng, 5, 2, 2, 0.7)
    cases.append(case("random-n5-none-full", 9041, a, b, c, "none",
                      random_psd(rng, 5, 5), [[1.0, 0.3], [0.3, 0.5]]))

    rng = np.random.default_rng(905)
    a, b, c = random_plant(rng, 6, 3, 2, 0.85)
    cases.append(case("random-n6-fewer-outputs-than-inputs-output", 9051, a, b, c, "output",
                      [0.05] * 6 + [1.0, 2.0], [0.1, 0.3]))

    rng = np.random.default_rng(906)
    a, b, c = random_plant(rng, 3, 1, 1, 1.15)
    cases.append(case("unstable-n3-none-diagonal", 9061, a, b, c, "none", [1.0, 1.0, 1.0], [0.5]))

    # An integrating store: x1 is the ice-bank charge (integrates the net
    # charging input), x2 a first-order room temperature lag.
    a = np.array([[1.0, 0.0], [0.05, 0.9]])
    b = np.array([[0.5, 0.0], [0.0, 0.2]])
    c = np.array([[1.0, 0.0], [0.0, 1.0]])
    cases.append(case("integrating-n2-input-diagonal", 9071, a, b, c, "input", [0.01, 0.01, 0.5, 0.5], [0.05, 0.05]))

    # The three-zone cold-storage plant, zero-order hold at 60 s, all zones measured.
    ac, bc = cold_storage_continuous()
    a, b = zoh(ac, bc, 60.0)
    c = np.eye(3)
    cases.append(case("cold-storage-n3-output-diagonal", 9081, a, b, c, "output",
                      [1e-4, 1e-4, 1e-4, 1e-2, 1e-2, 1e-2], [0.04, 0.04, 0.04]))
    return cases


def refused_case(name, a, b, c, model, w_spec, v_spec, path, reason, **numbers):
    return dict({"name": name, "disturbanceModel": model,
                 "a": to_list(a), "b": to_list(b), "c": to_list(c),
                 "processNoise": to_list(w_spec), "measurementNoise": to_list(v_spec),
                 "path": path, "reason": reason}, **numbers)


def offset_free_matrix(a, b, c, model):
    n = a.shape[0]
    _, _, _, bd, cd = augment(a, b, c, model)
    return np.block([[a - np.eye(n), bd], [c, cd]])


def gen_refused():
    refused = []

    # Output model on a plant with an integrator (eigenvalue 1 of A).
    a = np.array([[1.0, 0.1], [0.0, 0.7]])
    b = np.array([[0.0], [1.0]])
    c = np.array([[1.0, 0.0]])
    mat = offset_free_matrix(a, b, c, "output")
    rank, required = np.linalg.matrix_rank(mat), 2 + 1
    assert rank < required
    refused.append(refused_case("integrator-output-model", a, b, c, "output", [0.1, 0.1, 1.0], [0.01],
                                "estimator.disturbanceModel", "rank-deficient", rank=int(rank), required=required,
                                rankAMinusI=int(np.linalg.matrix_rank(a - np.eye(2)))))

    # Input model with fewer inputs than outputs (m = 1 < p = 2).
    rng = np.random.default_rng(911)
    a, b, c = random_plant(rng, 3, 1, 2, 0.8)
    mat = offset_free_matrix(a, b, c, "input")
    assert np.linalg.matrix_rank(mat) == 3 + 1      # the rank test alone would pass
    refused.append(refused_case("input-model-fewer-inputs-than-outputs", a, b, c, "input", [0.1] * 4, [0.01, 0.01],
                                "estimator.disturbanceModel", "fewer-disturbances-than-outputs",
                                disturbances=1, outputs=2))

    # Input model with more inputs than outputs (m = 3 > p = 1).
    rng = np.random.default_rng(912)
    a, b, c = random_plant(rng, 3, 3, 1, 0.8)
    mat = offset_free_matrix(a, b, c, "input")
    rank, required = np.linalg.matrix_rank(mat), 3 + 3
    assert rank < required and mat.shape[0] < required
    refused.append(refused_case("input-model-more-inputs-than-outputs", a, b, c, "input", [0.1] * 6, [0.01],
                                "estimator.disturbanceModel", "more-disturbances-than-outputs",
                                disturbances=3, outputs=1, rank=int(rank), required=required))

    # Input model on a plant whose steady-state gain is singular (zero at z = 1):
    # input 2 has no steady effect on the output it shares with input 1.
    a = np.diag([0.5, 0.8])
    b = np.array([[0.5, 0.5], [0.2, 0.2]])
    c = np.eye(2)
    mat = offset_free_matrix(a, b, c, "input")
    rank, required = np.linalg.matrix_rank(mat), 2 + 2
    assert rank < required
    refused.append(refused_case("input-model-singular-steady-gain", a, b, c, "input", [0.1] * 4, [0.01, 0.01],
                                "estimator.disturbanceModel", "rank-deficient", rank=int(rank), required=required,
                                rankAMinusI=int(np.linalg.matrix_rank(a - np.eye(2)))))

    # An unstable mode no output sees: (A_a, C_a) is not detectable.
    a = np.diag([1.2, 0.5])
    b = np.array([[1.0], [1.0]])
    c = np.array([[0.0, 1.0]])
    aa, _, ca, _, _ = augment(a, b, c, "output")
    assert np.linalg.matrix_rank(offset_free_matrix(a, b, c, "output")) == 3
    witness = 1.2
    assert np.linalg.matrix_rank(np.vstack([aa - witness * np.eye(3), ca])) < 3
    refused.append(refused_case("unstable-mode-unseen", a, b, c, "output", [0.1, 0.1, 1.0], [0.01],
                                "estimator.disturbanceModel", "undetectable", witness=witness))

    # Process noise that leaves the disturbance integrators (eigenvalue 1) undriven.
    rng = np.random.default_rng(913)
    a, b, c = random_plant(rng, 2, 1, 1, 0.6)
    aa, _, _, _, _ = augment(a, b, c, "output")
    w = np.diag([0.1, 0.1, 0.0])
    assert np.linalg.matrix_rank(np.hstack([aa - np.eye(3), w])) < 3
    refused.append(refused_case("noise-misses-disturbance", a, b, c, "output", [0.1, 0.1, 0.0], [0.01],
                                "estimator.processNoise", "noise-misses-unit-circle-mode", witness=1.0))
    return refused


def main():
    os.makedirs(FIXTURES, exist_ok=True)
    cases = gen_cases()
    refused = gen_refused()
    write_json(OUTPUT_FILE, {
        "source": "scipy.linalg.solve_discrete_are, numpy.linalg.eigvals/lstsq/matrix_rank, " + VERSIONS,
        "cases": cases, "refused": refused})
    print()
    print("refused: " + ", ".join("%s (%s)" % (r["name"], r["reason"]) for r in refused))
    print("checks (worst value over all cases):")
    for k, v in CHECKS.items():
        print("  %-72s %.3e" % (k, v))


if __name__ == "__main__":
    sys.exit(main())
