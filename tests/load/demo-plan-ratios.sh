#!/usr/bin/env bash
# The demo's limited plans against its unconstrained plan as the service reports them: POST /v1/models/{id}/plan,
# the demo model as served (src/Lookahead.Api/Demo/cold-store.json) and the same document without its limits, over
# seeded states spread over its operating range (zones 2 °C below to 3 °C above −20 °C, half with a previous input in
# 0 … 100 %), each state planned on both models in turn, REPS times; the figure per state is the median of the
# service's own solveMicroseconds, then the median and 99th percentile over states.
#   STATES=200 REPS=9 WARMUP=30 bash tests/load/demo-plan-ratios.sh
# Loopback only; about 20 s. Prints the ratios.
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
trap stop_service EXIT

states="${STATES:-200}"
reps="${REPS:-9}"
warmup="${WARMUP:-30}"
build_service
start_service

demo="$repo/src/Lookahead.Api/Demo/cold-store.json"
free_doc="$work_dir/cold-store-free.json"
python3 - "$demo" "$free_doc" <<'PY'
import json, sys
document = json.load(open(sys.argv[1]))
document.pop("limits")
document["name"] = document["name"] + "-free"
json.dump(document, open(sys.argv[2], "w"))
PY
limited_id="$(register "$demo")"
free_id="$(register "$free_doc")"

python3 - "$base" "$limited_id" "$free_id" "$states" "$reps" "$warmup" <<'PY'
import http.client, json, random, statistics, sys, urllib.parse

base, limited_id, free_id, count, reps, warmup = sys.argv[1], sys.argv[2], sys.argv[3], int(sys.argv[4]), int(sys.argv[5]), int(sys.argv[6])
url = urllib.parse.urlparse(base)
connection = http.client.HTTPConnection(url.hostname, url.port)

def plan(model, body):
    connection.request("POST", f"/v1/models/{model}/plan", body=body, headers={"Content-Type": "application/json"})
    response = connection.getresponse()
    answer = json.loads(response.read())
    if response.status != 200:
        raise SystemExit(f"{response.status}: {answer}")
    return answer

rnd = random.Random(2026)
requests = []
for i in range(count):
    body = {"state": [-20 + rnd.uniform(-2, 3) for _ in range(3)]}
    if i % 2 == 1:
        body["previousInput"] = [rnd.uniform(0, 100) for _ in range(3)]
    requests.append(json.dumps(body))

# Warm-up: every state on both models, WARMUP times (30 unless set): the service's tiered JIT takes thousands of
# plans to settle on optimised code (with 3, plans were still several times slower).
for _ in range(warmup):
    for body in requests:
        plan(limited_id, body)
        plan(free_id, body)

limited, free, iterations, not_optimal = [], [], [], 0
for body in requests:
    a, b = [], []
    for _ in range(reps):
        answer = plan(limited_id, body)
        a.append(answer["solveMicroseconds"])
        b.append(plan(free_id, body)["solveMicroseconds"])
    limited.append(statistics.median(a))
    free.append(statistics.median(b))
    iterations.append(answer["iterations"])
    not_optimal += answer["status"] != "optimal"

limited.sort()
free_median = statistics.median(free)
median = statistics.median(limited)
p99 = limited[max(0, -(-99 * len(limited) // 100) - 1)]
print(f"demo as served through POST /v1/models/{{id}}/plan, {count} seeded states x {reps} interleaved repetitions (solveMicroseconds)")
print(f"unconstrained plan (limits removed): median {free_median:.3f} us")
print(f"limited plan: median {median:.1f} us = {median / free_median:.1f}x, p99 {p99:.1f} us = {p99 / free_median:.1f}x")
print(f"iterations: median {statistics.median(iterations)}, max {max(iterations)}; plans not optimal: {not_optimal}")
PY
