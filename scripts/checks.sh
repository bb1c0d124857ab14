#!/usr/bin/env bash
# The checks `npm test` runs before the tests, side by side instead of one after another: the type check, ESLint
# and the client build (the browser tests serve dist/client). Each one's output is printed under its name when
# all have ended; the status is 1 if any of them failed. Ctrl-C stops all three.
set -uo pipefail
cd "$(dirname "$0")/.."

dir="$(mktemp -d "${TMPDIR:-/tmp}/cristae-checks.XXXXXX")"
declare -A pids=()
stop() {
  for pid in "${pids[@]}"; do kill "$pid" 2>/dev/null; done
  rm -rf "$dir"
  exit 130
}
trap stop INT TERM

start() {
  local name=$1
  shift
  "$@" >"$dir/$name.log" 2>&1 &
  pids[$name]=$!
}

start typecheck npm run --silent typecheck
start lint npm run --silent lint
start build npx vite build

status=0
for name in typecheck lint build; do
  if wait "${pids[$name]}"; then
    echo "== $name: passed"
  else
    status=1
    echo "== $name: FAILED"
  fi
  cat "$dir/$name.log"
done
rm -rf "$dir"
exit "$status"
