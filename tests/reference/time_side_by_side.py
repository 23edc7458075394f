#!/usr/bin/python3
"""Time Lookahead, R's quadprog and CVXOPT side by side on the same condensed problems and states.

Run from the repository root (needs Debian's python3-scipy, python3-cvxopt, r-cran-quadprog and the .NET SDK):

    /usr/bin/python3 tests/reference/time_side_by_side.py [--case six-masses-input-limits] [--reps 7] [--rounds 3]

The case comes from tests/reference/benchmark_models.json (input limits only, as general QP libraries take them).
Each state is x0 of the file plus pseudo-random states of the same norm (fixed seed), the same for every solver.

* Lookahead: `dotnet run -c Release --project tests/Lookahead.Benchmarks -- --time-states FILE` times CompiledModel.Plan
  (the full plan from x0, including condensing the request) and the unconstrained plan of the same model, after a
  warm-up, median of the repetitions per state.
* quadprog (R, Goldfarb-Idnani from Fortran): solve.QP(Rinv, dvec, Amat, bvec, factorized = TRUE) given the inverse
  Cholesky factor of H computed once, its best case; only the solve.QP call is timed.
* CVXOPT: cvxopt.solvers.qp with its default tolerances; only the call is timed.

The three are run in rounds (Lookahead, quadprog, CVXOPT, then again) so a noisy machine affects them alike; the
figure per solver is the median over states of the per-state median over all rounds. Solutions are cross-checked:
quadprog's and CVXOPT's inputs against each other.
"""

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time

import numpy as np
import cvxopt
import cvxopt.solvers

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
sys.path.insert(0, HERE)
from time_cvxopt import DEFAULT, condense, initial_states, load_case  # noqa: E402

R_SCRIPT = r"""
suppressMessages(library(quadprog))
args <- commandArgs(trailingOnly = TRUE)
read_matrix <- function(path) as.matrix(read.table(path))
H <- read_matrix(args[1]); F <- read_matrix(args[2]); S <- read_matrix(args[3])
G <- read_matrix(args[4]); h <- as.vector(read_matrix(args[5])); reps <- as.integer(args[6])
Rinv <- solve(chol(H))            # H = R'R, so D^-1 = Rinv Rinv'
Amat <- t(-G); bvec <- -h          # G U <= h  as  Amat' U >= bvec
out <- numeric(ncol(S)); first <- NULL
for (s in seq_len(ncol(S))) {
  dvec <- -as.vector(F %*% S[, s])
  times <- numeric(reps)
  for (r in seq_len(reps)) {
    t0 <- Sys.time()
    sol <- solve.QP(Rinv, dvec, Amat, bvec, factorized = TRUE)
    times[r] <- as.numeric(difftime(Sys.time(), t0, units = "secs"))
  }
  out[s] <- median(times) * 1e6
  if (s == 1) first <- sol$solution
}
cat(out, sep = "\n"); cat("SOLUTION\n"); cat(first, sep = "\n")
"""


def time_lookahead(case_name, states, reps, folder):
    path = os.path.join(folder, "states.json")
    with open(path, "w", encoding="utf-8") as fh:
        json.dump({"case": case_name, "states": [list(map(float, s)) for s in states], "reps": reps}, fh)
    run = subprocess.run(["dotnet", "run", "-c", "Release", "--project", os.path.join(ROOT, "tests", "Lookahead.Benchmarks"),
                          "--", "--time-states", path], capture_output=True, text=True, check=True)
    answer = json.loads(run.stdout.strip().splitlines()[-1])
    return answer["limited"], answer["unconstrained"]


def time_quadprog(H, F, states, G, h, reps, folder):
    files = []
    for name, value in (("H", H), ("F", F), ("S", np.array(states).T), ("G", G), ("h", h[:, None])):
        p = os.path.join(folder, name + ".txt")
        np.savetxt(p, value, fmt="%.17g")
        files.append(p)
    script = os.path.join(folder, "qp.R")
    with open(script, "w", encoding="utf-8") as fh:
        fh.write(R_SCRIPT)
    run = subprocess.run(["Rscript", script, *files, str(reps)], capture_output=True, text=True, check=True)
    lines = run.stdout.split("SOLUTION")
    return [float(v) for v in lines[0].split()], np.array([float(v) for v in lines[1].split()])


def time_cvxopt(H, F, states, G, h, reps):
    Hc, Gc, hc = cvxopt.matrix(H), cvxopt.matrix(G), cvxopt.matrix(h[:, None])
    cvxopt.solvers.options.clear()
    cvxopt.solvers.options.update(dict(DEFAULT, show_progress=False))
    per_state, first = [], None
    for x0 in states:
        fc = cvxopt.matrix(F @ np.asarray(x0)[:, None])
        times = []
        for _ in range(reps):
            t0 = time.perf_counter()
            sol = cvxopt.solvers.qp(Hc, fc, Gc, hc)
            times.append(time.perf_counter() - t0)
            assert sol["status"] == "optimal", sol["status"]
        per_state.append(statistics.median(times) * 1e6)
        if first is None:
            first = np.array(sol["x"]).ravel()
    return per_state, first


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--case", default="six-masses-input-limits")
    ap.add_argument("--reps", type=int, default=7, help="repetitions per state and round")
    ap.add_argument("--rounds", type=int, default=3, help="interleaved rounds of the three solvers")
    ap.add_argument("--states", type=int, default=20)
    args = ap.parse_args()

    case = load_case(args.case)
    H, F, G, h, _, _ = condense(case)
    states = initial_states(case["state"], args.states)
    rounds = {"lookahead": [], "unconstrained": [], "quadprog": [], "cvxopt": []}
    with tempfile.TemporaryDirectory() as folder:
        for _ in range(args.rounds):
            limited, free = time_lookahead(args.case, states, args.reps, folder)
            rounds["lookahead"].append(limited)
            rounds["unconstrained"].append(free)
            qp, qp_first = time_quadprog(H, F, states, G, h, args.reps, folder)
            rounds["quadprog"].append(qp)
            cv, cv_first = time_cvxopt(H, F, states, G, h, args.reps)
            rounds["cvxopt"].append(cv)

    per_state = {k: [statistics.median(r[s] for r in v) for s in range(len(states))] for k, v in rounds.items()}
    med = {k: statistics.median(v) for k, v in per_state.items()}
    print("case %s: %d variables, %d inequalities; %d states x %d reps x %d interleaved rounds"
          % (args.case, H.shape[0], G.shape[0], len(states), args.reps, args.rounds))
    print("agreement quadprog vs CVXOPT on the file's state: max |du| = %.1e" % np.abs(qp_first - cv_first).max())
    for k in ("unconstrained", "lookahead", "quadprog", "cvxopt"):
        print("%-14s median %10.1f us   (p90 %10.1f us)" % (k, med[k], float(np.percentile(per_state[k], 90))))
    print("lookahead limited / its unconstrained plan: %.1fx" % (med["lookahead"] / med["unconstrained"]))
    print("quadprog (given its factor) / lookahead:    %.1fx" % (med["quadprog"] / med["lookahead"]))
    print("cvxopt / lookahead:                         %.1fx" % (med["cvxopt"] / med["lookahead"]))


if __name__ == "__main__":
    main()
