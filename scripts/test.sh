#!/usr/bin/env bash
# `npm test`: the checks side by side (scripts/checks.sh), then the tests in two lanes at once:
#   - lane 1: the browser specs (tests/e2e, one spec at a time: each starts the real server and Chromium, and
#     spends much of its time waiting for them);
#   - lane 2: the unit, API and page tests on SQLite (two files at a time), then the API tests on a throw-away
#     PostgreSQL server (scripts/with-postgres.sh).
# Lane 2 fills the CPU time lane 1 leaves idle. Lane 2 prints as it runs; lane 1's output is kept in a file and
# printed when both have ended. The status is 1 if the checks or any lane failed; Ctrl-C stops both lanes.
set -uo pipefail
cd "$(dirname "$0")/.."

bash scripts/checks.sh || exit 1

dir="$(mktemp -d "${TMPDIR:-/tmp}/cristae-test.XXXXXX")"
node_modules/.bin/vitest run --project e2e >"$dir/e2e.log" 2>&1 &
browser_pid=$!
stop() {
  kill "$browser_pid" 2>/dev/null
  wait "$browser_pid" 2>/dev/null
  rm -rf "$dir"
  exit 130
}
trap stop INT TERM

node_modules/.bin/vitest run --project node --project jsdom
sqlite=$?
npm run --silent test:pg
postgres=$?
wait "$browser_pid"
browser=$?

echo
echo "== browser specs (tests/e2e), run beside the tests above:"
cat "$dir/e2e.log"
rm -rf "$dir"

status=0
report() {
  if (($2 == 0)); then echo "== $1: passed"; else echo "== $1: FAILED"; status=1; fi
}
echo
report "unit, API and page tests on SQLite" "$sqlite"
report "API tests on PostgreSQL" "$postgres"
report "browser specs" "$browser"
exit "$status"
