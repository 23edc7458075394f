#!/usr/bin/env bash
# Replays one noisy closed-loop historian export of a small cold-store model with an estimator
# (tests/load/cold-store-estimated.json) through POST /v1/models/{id}/plans three ways, printing seconds and rows/s:
#   * estimation replay: measurements (y_<output>, about 0.5 % of readings missing) and the input applied over the
#     interval ending at each reading (applied_<input>), as CSV and as NDJSON; the estimator runs through each batch
#     in order on one thread, then the batch is planned in parallel;
#   * plain replay of the same trajectory: the true states, references and previous inputs, planned in parallel.
# The loop: the model's plant plus an unmeasured load step every 3 hours and process noise, measured with noise,
# under a saturated proportional feedback on the measurement with setpoint changes every 12 hours (one-minute
# samples). ROWS (default 200,000) sets the length. Needs /usr/bin/python3 with numpy (Debian).
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
trap stop_service EXIT
rows="${ROWS:-200000}"

build_service
start_service
id="$(register "$repo/tests/load/cold-store-estimated.json")"
curl -fsS "$base/v1/models/$id" >"$work_dir/model.json"
curl -fsS "$base/v1/models/$id/gain" >"$work_dir/gain.json"

/usr/bin/python3 - "$rows" "$work_dir" <<'PY'
import json, sys
import numpy as np
rows, folder = int(sys.argv[1]), sys.argv[2]
model = json.load(open(f"{folder}/model.json"))
# The model is discrete, so its own matrices are the discrete ones (discreteA/B are reported for continuous plants).
a, b = np.array(model["document"]["plant"]["a"]), np.array(model["document"]["plant"]["b"])
k = np.array(json.load(open(f"{folder}/gain.json"))["k"])
lim = model["document"]["limits"]
umin, umax = np.array(lim["inputMin"]), np.array(lim["inputMax"])
rng = np.random.default_rng(13)
n, m = b.shape
x, u, r, load = np.zeros(n), np.full(m, 0.5), np.zeros(n), np.zeros(n)
def fmt(v): return ",".join(f"{z:.5f}" for z in v)
def arr(v): return "[" + fmt(v) + "]"
with open(f"{folder}/measured.csv", "w") as mcsv, open(f"{folder}/measured.ndjson", "w") as mnd, \
     open(f"{folder}/states.csv", "w") as scsv, open(f"{folder}/states.ndjson", "w") as snd:
    mcsv.write("timestamp,y_zone_a,y_zone_b,y_zone_c,applied_chiller_1,applied_chiller_2,applied_door_fan,r_zone_a,r_zone_b,r_zone_c\n")
    scsv.write("timestamp,zone_a_temp,zone_b_temp,zone_c_temp,r_zone_a,r_zone_b,r_zone_c,prev_chiller_1,prev_chiller_2,prev_door_fan\n")
    for step in range(rows):
        if step % 720 == 0:
            r = rng.choice([-1.0, 0.0, 0.5], size=n)
        if step % 180 == 0:
            load = rng.uniform(-0.01, 0.01, size=n)
        y = x + rng.normal(0.0, 0.01, size=n)
        missing = rng.random() < 0.005
        # Row `step`: the reading now and the input held over the interval that ended at it (u before the update).
        mcsv.write(f"{step * 60},{',,' if missing else fmt(y)},{fmt(u)},{fmt(r)}\n")
        mnd.write('{"measurement":' + ("null" if missing else arr(y)) + ',"appliedInput":' + arr(u) + ',"reference":' + arr(r) + '}\n')
        scsv.write(f"{step * 60},{fmt(x)},{fmt(r)},{fmt(u)}\n")
        snd.write('{"state":' + arr(x) + ',"reference":' + arr(r) + ',"previousInput":' + arr(u) + '}\n')
        u = np.clip(u - 0.5 * (k @ (y - r)), umin, umax)
        x = a @ x + b @ u + load + rng.normal(0.0, 0.002, size=n)
PY
head -n 5001 "$work_dir/states.ndjson" >"$work_dir/warm.ndjson"

post() { # file content-type -> prints "seconds lines errors"
  local start end
  start=$(date +%s.%N)
  curl -fsS -X POST "$base/v1/models/$id/plans" -H "Content-Type: $2" -T "$1" -o "$work_dir/out"
  end=$(date +%s.%N)
  echo "$(python3 -c "print(f'{$end - $start:.2f}')") $(wc -l <"$work_dir/out") $(grep -c -E '"status":"error"|,error,' "$work_dir/out" || true)"
}

post "$work_dir/warm.ndjson" application/x-ndjson >/dev/null
echo "model $id, $rows rows, $(nproc) processors"
printf "%-11s %-7s %10s %12s %10s %8s\n" replay format seconds rows/s lines-out errors
for kind in measured states; do
  for format in csv ndjson; do
    if [ "$format" = ndjson ]; then type=application/x-ndjson; else type=text/csv; fi
    read -r seconds lines errors < <(post "$work_dir/$kind.$format" "$type")
    label="estimation"; if [ "$kind" = states ]; then label="plain"; fi
    printf "%-11s %-7s %10s %12s %10s %8s\n" "$label" "$format" "$seconds" "$(python3 -c "print(int($rows / $seconds))")" "$lines" "$errors"
  done
done
