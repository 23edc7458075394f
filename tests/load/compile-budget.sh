#!/usr/bin/env bash
# Compile budgets under load (goal: while 20 of the largest models register at once, a small model's plans keep
# p99 ≤ 5 ms; the service's memory stays under a stated bound and comes back after the compiles). Starts the service
# (SQLite, default Compile settings unless overridden through the environment, e.g.
# Lookahead__Compile__MaxConcurrent=1), then runs tests/Lookahead.Benchmarks --compile-load: a small model (six
# masses, 12 states) planned back to back from two clients alone, during REGISTRATIONS (20) concurrent registrations
# of different 200-state, 10-input, horizon-100 models with input and rate limits, and after them; the service's
# resident memory is sampled from /proc throughout.
#   service_cpus   a taskset list for the service (e.g. 0,1); the generator then runs on the others, if any.
source "$(dirname "${BASH_SOURCE[0]}")/common.sh"
trap stop_service EXIT
build_service
dotnet build "$repo/tests/Lookahead.Benchmarks/Lookahead.Benchmarks.csproj" -c Release -nologo -v quiet >/dev/null
start_service Lookahead__Demo__Enabled=false "$@"
cd "$repo"
dotnet "$repo/tests/Lookahead.Benchmarks/bin/Release/net10.0/Lookahead.Benchmarks.dll" --compile-load "$base" "$service_pid" "${REGISTRATIONS:-20}" "${PHASE_SECONDS:-10}"
