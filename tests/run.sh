#!/usr/bin/env bash
# Runs every test project and prints the plain "N passed, N failed, N skipped" line last.
# Works on a fresh machine: installs what the tests need (Debian packages) when it is missing,
# starts a throwaway PostgreSQL for the shared-store tests, and stops it afterwards.
set -uo pipefail
repo="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$repo"
results="$repo/.ci-results"
rm -rf "$results"
mkdir -p "$results"

export DOTNET_CLI_TELEMETRY_OPTOUT=1 DOTNET_NOLOGO=1 DOTNET_SKIP_FIRST_TIME_EXPERIENCE=1

# shellcheck source=tests/postgres.sh
source "$repo/tests/postgres.sh"
start_test_postgres || echo "PostgreSQL unavailable: the shared-store tests will be skipped" >&2
trap stop_test_postgres EXIT

# The OpenAPI linter .ci/run installs, when an earlier run left it in the cache and nobody named another.
default_linter="${LOOKAHEAD_CACHE:-$HOME/.cache/lookahead}/openapi-lint/node_modules/.bin/redocly"
if [ -z "${LOOKAHEAD_OPENAPI_LINTER:-}" ] && [ -x "$default_linter" ]; then
  export LOOKAHEAD_OPENAPI_LINTER="$default_linter"
fi

dotnet build Service.sln -c Release -nologo -v quiet -warnaserror
build_rc=$?
if [ $build_rc -ne 0 ]; then
  echo "build failed"
  echo "0 passed, 1 failed"
  exit 1
fi

dotnet test Service.sln -c Release --no-build -nologo \
  --logger "trx;LogFilePrefix=results" --results-directory "$results"
test_rc=$?

passed=0; failed=0; skipped=0; total=0
while IFS= read -r -d '' trx; do
  line=$(grep -o '<Counters [^>]*>' "$trx" | head -n 1)
  get() { echo "$line" | sed -n "s/.* $1=\"\([0-9]*\)\".*/\1/p"; }
  t=$(get total); p=$(get passed); f=$(get failed); e=$(get error); x=$(get timeout); nx=$(get notExecuted)
  total=$((total + ${t:-0})); passed=$((passed + ${p:-0}))
  failed=$((failed + ${f:-0} + ${e:-0} + ${x:-0})); skipped=$((skipped + ${nx:-0}))
done < <(find "$results" -name '*.trx' -print0)

# xunit's skipped tests are counted as notExecuted. A runner that failed without a counted failure,
# or a run that executed nothing, must not look green.
if [ "$test_rc" -ne 0 ] && [ "$failed" -eq 0 ]; then failed=1; fi
if [ "$passed" -eq 0 ] && [ "$failed" -eq 0 ]; then failed=1; fi
echo "$passed passed, $failed failed, $skipped skipped"
[ "$failed" -eq 0 ]
