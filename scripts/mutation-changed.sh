#!/bin/bash
# Mutation testing of the core files a change touched (CI runs it after `npm test`; `npm run mutation:changed`).
# Changed = server/domain, server/auth or server/lib .ts files that differ between MUTATION_BASE (default: the
# parent of HEAD, the commit before the newest) and the working tree. Each part runs with its own Stryker
# configuration (domain: unit tests; auth: its API tests; lib: its unit tests), not incremental, and fails below
# the configuration's break score (85). A whole run on 2 cores can take an hour for one large file, and CI has
# 90 minutes in all, so the parts together stop after MUTATION_TIME_LIMIT seconds (default 1200): a run stopped by
# that limit is reported and does not fail; the full score is measured outside CI (docs/testing.md, "Mutation testing").
set -uo pipefail
cd "$(dirname "$0")/.." || exit 1
base=${MUTATION_BASE:-HEAD~1}
limit=${MUTATION_TIME_LIMIT:-1200}
if ! git rev-parse --verify --quiet "$base^{commit}" > /dev/null; then
  echo "mutation:changed: no commit $base to compare with; nothing to run"
  exit 0
fi
status=0
deadline=$((SECONDS + limit))
for part in domain auth lib; do
  case $part in
    domain) config=stryker.config.json ;;
    auth) config=stryker.auth.config.json ;;
    lib) config=stryker.lib.config.json ;;
  esac
  files=$(git diff --name-only --diff-filter=AMR "$base" -- "server/$part/" |
    grep -E '\.ts$' | grep -vE '(\.d\.ts|/types\.ts|/index\.ts)$' | paste -sd, -)
  if [ -z "$files" ]; then
    echo "mutation:changed: no server/$part file changed since $base"
    continue
  fi
  left=$((deadline - SECONDS))
  if [ "$left" -lt 60 ]; then
    echo "mutation:changed: server/$part changed ($files) but the ${limit} s are used up; not run"
    continue
  fi
  echo "mutation:changed: server/$part, changed since $base: $files (at most ${left} s)"
  mkdir -p reports
  node scripts/stryker-config-copy.mjs "$config" "reports/mutation-changed-$part.config.json" "{
    \"incremental\": false, \"concurrency\": 2, \"tempDirName\": \".stryker-tmp-changed-$part\",
    \"reporters\": [\"clear-text\", \"progress\", \"json\"],
    \"jsonReporter\": {\"fileName\": \"reports/mutation-changed-$part.json\"}
  }"
  timeout --signal=INT "$left" npx stryker run "reports/mutation-changed-$part.config.json" --mutate "$files" 2>&1 | tail -n 60
  rc=${PIPESTATUS[0]}
  if [ "$rc" -eq 124 ] || [ "$rc" -eq 130 ]; then
    echo "mutation:changed: server/$part stopped at the time limit; not a failure (score not measured here)"
  elif [ "$rc" -ne 0 ]; then
    echo "mutation:changed: server/$part failed (exit $rc): below the break score, or Stryker could not run"
    status=1
  fi
done
exit $status
