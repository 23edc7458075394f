# Sourced by the load scripts: build, start and stop the service on a free loopback port with a temp database.
# Everything started here is stopped by stop_service (the scripts call it from an EXIT trap).
set -euo pipefail
repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
service_pid=""
work_dir="$(mktemp -d /tmp/lookahead-load.XXXXXX)"

free_port() {
  python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1]); s.close()'
}

build_service() {
  dotnet build "$repo/src/Lookahead.Api/Lookahead.Api.csproj" -c Release -nologo -v quiet >/dev/null
}

# start_service [extra environment assignments...] — they come last, so they can override the defaults here.
# service_cpus (a taskset list, e.g. 0,1): run the service on those processors only, from its start.
start_service() {
  port="$(free_port)"
  base="http://127.0.0.1:$port"
  local pin=()
  if [ -n "${service_cpus:-}" ]; then pin=(taskset -c "$service_cpus"); fi
  (
    cd "$repo/src/Lookahead.Api/bin/Release/net10.0"
    # Request logs go to a file at Warning: the load tests measure the service, not the console.
    exec "${pin[@]}" env \
      Lookahead__Store__SqlitePath="$work_dir/lookahead.db" \
      Lookahead__Serilog__MinimumLevel__Default=Warning \
      "$@" \
      dotnet Lookahead.Api.dll --urls "$base"
  ) >"$work_dir/service.log" 2>&1 &
  service_pid=$!
  for _ in $(seq 1 300); do
    if curl -fsS "$base/health/ready" >/dev/null 2>&1; then return 0; fi
    if ! kill -0 "$service_pid" 2>/dev/null; then cat "$work_dir/service.log" >&2; return 1; fi
    sleep 0.2
  done
  echo "service did not become ready within 60 s" >&2
  return 1
}

stop_service() {
  if [ -n "$service_pid" ] && kill -0 "$service_pid" 2>/dev/null; then
    kill "$service_pid" 2>/dev/null || true
    wait "$service_pid" 2>/dev/null || true
  fi
  rm -rf "$work_dir"
}

# register FILE -> prints the model id
register() {
  curl -fsS -X POST "$base/v1/models" -H 'Content-Type: application/json' --data-binary "@$1" |
    python3 -c 'import json, sys; print(json.load(sys.stdin)["id"])'
}
