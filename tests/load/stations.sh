#!/usr/bin/env bash
# Stations under load (goal: ≥ 2,000 steps/s on 2 cores). STATIONS (default 100) closed loops step the demo model
# concurrently through POST /v1/stations/{name}/step on the SQLite store (WAL, synchronous=FULL: an answer leaves
# only after its commit is synced), each against its own seeded simulated cold store (tests/Lookahead.Benchmarks,
# StationPlant.cs): the step's measurement, applied input (the last answer's first move), setpoint and outdoor
# temperature, then the move applied to the plant. Prints steps/s and latency percentiles over MEASURE_SECONDS (30) after
# WARMUP (20) s, the service's own mean request and solve times and the CPU each side used per step. The warm-up is
# long because 100 concurrent loops on 2 cores keep the runtime's tiered compilation busy for tens of seconds (the
# solver still ran instrumented code 8-18 s after start); the table's two half-window rates show whether it settled.
#   service_cpus / generator_cpus   taskset lists (e.g. 0,1 and 2,3) for the service and the load generator.
#   COMPARE=1   also, for where the time goes: the same loops through POST /v1/models/{id}/plan (no estimator, no
#               store), and the stations with the database on tmpfs (/dev/shm, where a sync costs nothing).
#   ROUNDS      repeats of the whole set, interleaved (default 1).
# While the first stations run is measured, perf (when present) counts the service's fsync/fdatasync calls over
# 5 s against the steps answered meanwhile: about one sync per step shows the commits really reach the disk.
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
shm_db="/dev/shm/lookahead-stations-$$.db"
cleanup() {
  stop_service
  rm -f "$shm_db" "$shm_db-wal" "$shm_db-shm"
}
trap cleanup EXIT
stations="${STATIONS:-100}"
seconds="${MEASURE_SECONDS:-30}"
warmup="${WARMUP:-20}"
rounds="${ROUNDS:-1}"
generator_pin=()
if [ -n "${generator_cpus:-}" ]; then generator_pin=(taskset -c "$generator_cpus"); fi

build_service
dotnet build "$repo/tests/Lookahead.Benchmarks/Lookahead.Benchmarks.csproj" -c Release -nologo -v quiet >/dev/null
generator="$repo/tests/Lookahead.Benchmarks/bin/Release/net10.0/Lookahead.Benchmarks.dll"

# Steps the service has answered 200 so far (its own request histogram).
answered_steps() {
  curl -fsS "$base/metrics" | awk '/^http_request_duration_seconds_count\{code="200",method="POST".*endpoint="\/v1\/stations\/\{name\}\/step"\}/ {print $2}'
}

# Counts the service's syncs over 5 s in the measuring window, beside the steps answered in the same 5 s (read by
# the command perf times, so both counts cover the same interval).
count_syncs() {
  sleep "$((warmup + 2))"
  perf stat -x, -e syscalls:sys_enter_fdatasync,syscalls:sys_enter_fsync -p "$service_pid" -o "$work_dir/perf.csv" -- \
    bash -c "$(declare -f answered_steps); base=$base; answered_steps >'$work_dir/steps-before'; sleep 5; answered_steps >'$work_dir/steps-after'" || true
  if ! grep -q 'syscalls:sys_enter_fdatasync' "$work_dir/perf.csv" 2>/dev/null || grep -q 'not supported\|not counted' "$work_dir/perf.csv"; then
    echo "durability check skipped: perf cannot count the service's syscalls here" >"$work_dir/syncs.txt"
    return
  fi
  python3 -c "import sys; s, a, b = (float(v) for v in sys.argv[1:]); print(f'durability check: {s:.0f} fsync/fdatasync calls by the service over 5 s, {b - a:.0f} steps answered: {s / max(b - a, 1):.2f} per step')" \
    "$(awk -F, '/syscalls:sys_enter_f/ {s += $1} END {print s + 0}' "$work_dir/perf.csv")" \
    "$(cat "$work_dir/steps-before")" "$(cat "$work_dir/steps-after")" >"$work_dir/syncs.txt"
}

# measure LABEL ROUTE [extra service environment...]
measure() {
  local label="$1" route="$2"
  shift 2
  start_service Lookahead__Demo__Enabled=true "$@"
  local checker=""
  if [ "$label" = "durable" ] && [ ! -s "$work_dir/syncs.txt" ] && command -v perf >/dev/null; then
    count_syncs &
    checker=$!
  fi

  local status=0
  "${generator_pin[@]}" dotnet "$generator" --station-load "$base" --stations "$stations" --seconds "$seconds" --warmup "$warmup" \
    --route "$route" --service-pid "$service_pid" --label "$label" || status=$?
  if [ -n "$checker" ]; then wait "$checker" || true; cat "$work_dir/syncs.txt" 2>/dev/null; echo; fi
  kill "$service_pid" 2>/dev/null || true
  wait "$service_pid" 2>/dev/null || true
  service_pid=""
  rm -f "$work_dir"/lookahead.db*
  return "$status"
}

# What one small write and its sync cost on the database's disk now (it varies with other work on the machine).
sync_probe() {
  python3 - "$1" <<'PY'
import os, sys, time
path = os.path.join(sys.argv[1], "sync-probe.bin")
fd = os.open(path, os.O_WRONLY | os.O_CREAT, 0o644)
times = []
for i in range(300):
    started = time.perf_counter()
    os.pwrite(fd, b"x" * 4096, (i % 16) * 4096)
    os.fdatasync(fd)
    times.append(time.perf_counter() - started)
os.close(fd)
os.remove(path)
times.sort()
print(f"4 KiB write + fdatasync in {sys.argv[1]}: median {1e3 * times[150]:.2f} ms, p90 {1e3 * times[270]:.2f} ms")
PY
}

echo "$(nproc) processors; service on ${service_cpus:-all}, generator on ${generator_cpus:-all}; load average $(cut -d' ' -f1-3 /proc/loadavg)"
sync_probe "$work_dir"
echo
failed=0
for round in $(seq 1 "$rounds"); do
  measure durable step || failed=1
  if [ "${COMPARE:-0}" = 1 ]; then
    measure "plan only" plan || failed=1
    rm -f "$shm_db" "$shm_db-wal" "$shm_db-shm"
    measure "store on tmpfs" step Lookahead__Store__SqlitePath="$shm_db" || failed=1
  fi
done
exit "$failed"
