#!/usr/bin/env bash
# Replays ROWS (default 1,000,000) states through POST /v1/models/{id}/plans as NDJSON and as CSV, for the
# six-mass model without limits and with input limits, and prints elapsed seconds and rows/s for each.
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
trap stop_service EXIT
rows="${ROWS:-1000000}"
# The limited model solves a QP per row; its rate is measured on fewer rows so the script stays short.
limited_rows="${LIMITED_ROWS:-100000}"

build_service
start_service
free_id="$(register "$repo/tests/load/six-masses.json")"
limited_id="$(register "$repo/tests/load/six-masses-limited.json")"

python3 - "$rows" "$work_dir" <<'PY'
import random, sys
rows, folder = int(sys.argv[1]), sys.argv[2]
random.seed(7)
with open(f"{folder}/states.ndjson", "w") as nd, open(f"{folder}/states.csv", "w") as csv:
    csv.write("timestamp," + ",".join(f"p{i}" for i in range(1, 7)) + "," + ",".join(f"v{i}" for i in range(1, 7)) + ",tag\n")
    for k in range(rows):
        x = [f"{random.uniform(-1, 1):.6f}" for _ in range(12)]
        nd.write('{"state":[' + ",".join(x) + "]}\n")
        csv.write(f"{k},{','.join(x)},t{k % 7}\n")
PY
head -n 20001 "$work_dir/states.ndjson" >"$work_dir/warm.ndjson"
head -n "$limited_rows" "$work_dir/states.ndjson" >"$work_dir/limited.ndjson"
head -n "$((limited_rows + 1))" "$work_dir/states.csv" >"$work_dir/limited.csv"

post() { # id file content-type -> prints "seconds lines"
  local start end
  start=$(date +%s.%N)
  curl -fsS -X POST "$base/v1/models/$1/plans" -H "Content-Type: $3" -T "$2" -o "$work_dir/out"
  end=$(date +%s.%N)
  echo "$(python3 -c "print(f'{$end - $start:.2f}')") $(wc -l <"$work_dir/out")"
}

for id in "$free_id" "$limited_id"; do post "$id" "$work_dir/warm.ndjson" application/x-ndjson >/dev/null; done

printf "%-14s %-7s %10s %12s %10s\n" model format seconds rows/s lines-out
for pair in "no-limits:$free_id" "input-limits:$limited_id"; do
  name="${pair%%:*}"; id="${pair#*:}"
  for format in ndjson csv; do
    if [ "$format" = ndjson ]; then type=application/x-ndjson; else type=text/csv; fi
    file="$work_dir/states.$format"; count="$rows"
    if [ "$name" = input-limits ]; then file="$work_dir/limited.$format"; count="$limited_rows"; fi
    read -r seconds lines < <(post "$id" "$file" "$type")
    printf "%-14s %-7s %10s %12s %10s\n" "$name" "$format" "$seconds" "$(python3 -c "print(int($count / $seconds))")" "$lines"
  done
done
