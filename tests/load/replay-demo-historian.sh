#!/usr/bin/env bash
# Replays the demo model (all its limits) from a historian-like trajectory through POST /v1/models/{id}/plans, as
# NDJSON and as CSV, and the same number of independent random rows, printing seconds and rows/s for each.
# The trajectory is consecutive states of a noisy closed loop (a saturated, rate-limited linear feedback on the
# demo's discretised plant with process noise, load steps and setpoint changes), so neighbouring rows are alike,
# as in a real export. ROWS (default 1,000,000) sets the length; RANDOM_ROWS (default 50,000) the independent rows,
# which cost a cold solve each. Needs /usr/bin/python3 with numpy (Debian).
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
trap stop_service EXIT
rows="${ROWS:-1000000}"
random_rows="${RANDOM_ROWS:-50000}"

build_service
start_service
id="$(curl -fsS "$base/v1/aliases/cold-store-demo" | python3 -c 'import json, sys; print(json.load(sys.stdin)["modelId"])')"
curl -fsS "$base/v1/models/$id" >"$work_dir/model.json"
curl -fsS "$base/v1/models/$id/gain" >"$work_dir/gain.json"

/usr/bin/python3 - "$rows" "$random_rows" "$work_dir" <<'PY'
import json, sys
import numpy as np
rows, random_rows, folder = int(sys.argv[1]), int(sys.argv[2]), sys.argv[3]
model = json.load(open(f"{folder}/model.json"))
a, b = np.array(model["discreteA"]), np.array(model["discreteB"])
k = np.array(json.load(open(f"{folder}/gain.json"))["k"])
lim = model["document"]["limits"]
umin, umax = np.array(lim["inputMin"]), np.array(lim["inputMax"])  # engineering units; the loop below subtracts u_op
dmin, dmax = np.array(lim["inputRateMin"]), np.array(lim["inputRateMax"])
rng = np.random.default_rng(11)
n, m = b.shape
# The demo is in engineering units: the loop runs in deviations and the rows are written around the operating point.
point = model["document"].get("operatingPoint", {})
xop = np.array(point.get("state", [0.0] * n)); yop = np.array(point.get("output", [0.0] * n)); uop = np.array(point.get("input", [0.0] * m))
x, u, r = np.zeros(n), np.zeros(m), np.zeros(n)
load = np.zeros(n)
header = ",".join(["timestamp", "zone_a_temp", "zone_b_temp", "zone_c_temp", "r_zone_a", "r_zone_b", "r_zone_c",
                   "prev_chiller_1", "prev_chiller_2", "prev_door_fan"])
def fmt(v): return ",".join(f"{z:.5f}" for z in v)
with open(f"{folder}/trajectory.csv", "w") as csv, open(f"{folder}/trajectory.ndjson", "w") as nd, \
     open(f"{folder}/random.csv", "w") as rcsv, open(f"{folder}/random.ndjson", "w") as rnd:
    csv.write(header + "\n"); rcsv.write(header + "\n")
    for step in range(rows):
        if step % 720 == 0:                     # a setpoint change every 12 hours of one-minute samples
            r = rng.choice([-1.0, 0.0, 0.5], size=n)
        if step % 180 == 0:                     # doors opened and closed: a load step every 3 hours
            load = rng.uniform(0.0, 0.004, size=n)
        csv.write(f"{step * 60},{fmt(x + xop)},{fmt(r + yop)},{fmt(u + uop)}\n")
        nd.write('{"state":[' + fmt(x + xop) + '],"reference":[' + fmt(r + yop) + '],"previousInput":[' + fmt(u + uop) + ']}\n')
        if step < random_rows:
            xr, ur = xop + rng.uniform(-1.0, 3.0, size=n), rng.uniform(umin, umax, size=m)
            rr = yop + rng.choice([-1.0, 0.0, 0.5], size=n)
            rcsv.write(f"{step * 60},{fmt(xr)},{fmt(rr)},{fmt(ur)}\n")
            rnd.write('{"state":[' + fmt(xr) + '],"reference":[' + fmt(rr) + '],"previousInput":[' + fmt(ur) + ']}\n')
        target = np.clip(u - k @ (x - r) * 0.5, umin - uop, umax - uop)
        u = np.clip(np.clip(target, u + dmin, u + dmax), umin - uop, umax - uop)
        x = a @ x + b @ u + load + rng.normal(0.0, 0.002, size=n)
PY
head -n 5001 "$work_dir/trajectory.ndjson" >"$work_dir/warm.ndjson"

post() { # file content-type -> prints "seconds lines"
  local start end
  start=$(date +%s.%N)
  curl -fsS -X POST "$base/v1/models/$id/plans" -H "Content-Type: $2" -T "$1" -o "$work_dir/out"
  end=$(date +%s.%N)
  echo "$(python3 -c "print(f'{$end - $start:.2f}')") $(wc -l <"$work_dir/out")"
}

post "$work_dir/warm.ndjson" application/x-ndjson >/dev/null
printf "%-11s %-7s %10s %12s %10s\n" rows format seconds rows/s lines-out
for kind in trajectory random; do
  count="$rows"; if [ "$kind" = random ]; then count="$random_rows"; fi
  for format in ndjson csv; do
    if [ "$format" = ndjson ]; then type=application/x-ndjson; else type=text/csv; fi
    read -r seconds lines < <(post "$work_dir/$kind.$format" "$type")
    printf "%-11s %-7s %10s %12s %10s\n" "$kind" "$format" "$seconds" "$(python3 -c "print(int($count / $seconds))")" "$lines"
  done
done
