#!/usr/bin/env bash
# Throughput of POST /v1/models/{id}/plan against a bare endpoint with the same pipeline and a same-size,
# precomputed answer (Diagnostics:EnableBareEndpoint). The ratio is what planning costs; the goal is ≥ 70 %.
# Model: six masses on springs (12 states, 3 inputs, horizon 30). Loopback only, ~10 s per run.
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
trap stop_service EXIT
duration="${DURATION:-10s}"
connections="${CONNECTIONS:-16}"

if ! command -v wrk >/dev/null; then
  apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq wrk >/dev/null
fi

build_service
start_service Lookahead__Diagnostics__EnableBareEndpoint=true
id="$(register "$repo/tests/load/six-masses.json")"

cat >"$work_dir/post-state.lua" <<'LUA'
wrk.method = "POST"
wrk.headers["Content-Type"] = "application/json"
wrk.body = '{"state":[0.12,-0.05,0.3,0.08,-0.21,0.4,0.01,0.02,-0.03,0.05,0.0,-0.01],"previousInput":[0.1,0.0,-0.1]}'
LUA

run() { # url -> requests/s
  wrk -t1 -c"$connections" -d"$duration" -s "$work_dir/post-state.lua" "$1" | tee -a "$work_dir/wrk.txt" |
    awk '/Requests\/sec/ {print $2}'
}

# The first bare call computes and keeps the answer; both paths are warmed before measuring.
curl -fsS -X POST "$base/v1/echo-plan-shaped/$id" -H 'Content-Type: application/json' -d '{"state":[0.12,-0.05,0.3,0.08,-0.21,0.4,0.01,0.02,-0.03,0.05,0.0,-0.01],"previousInput":[0.1,0.0,-0.1]}' -o "$work_dir/bare.json"
curl -fsS -X POST "$base/v1/models/$id/plan" -H 'Content-Type: application/json' -d '{"state":[0.12,-0.05,0.3,0.08,-0.21,0.4,0.01,0.02,-0.03,0.05,0.0,-0.01],"previousInput":[0.1,0.0,-0.1]}' -o "$work_dir/plan.json"
wrk -t1 -c"$connections" -d3s -s "$work_dir/post-state.lua" "$base/v1/echo-plan-shaped/$id" >/dev/null
wrk -t1 -c"$connections" -d3s -s "$work_dir/post-state.lua" "$base/v1/models/$id/plan" >/dev/null

bare="$(run "$base/v1/echo-plan-shaped/$id")"
plan="$(run "$base/v1/models/$id/plan")"
echo "answer sizes: bare $(wc -c <"$work_dir/bare.json") bytes, plan $(wc -c <"$work_dir/plan.json") bytes"
echo "bare endpoint: $bare requests/s"
echo "plan endpoint: $plan requests/s"
python3 -c "import sys; b, p = float(sys.argv[1]), float(sys.argv[2]); print(f'plan/bare: {100 * p / b:.1f} % (goal >= 70 %)')" "$bare" "$plan"
