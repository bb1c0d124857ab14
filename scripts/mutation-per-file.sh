#!/bin/bash
# One Stryker run per server file, each with its own incremental file and JSON report in reports/mutation-rest/
# (a stopped run keeps nothing, so one file per run keeps what was finished). Idle CPU class: other work on the
# machine goes first. Usage: bash scripts/mutation-per-file.sh server/domain/assay-engine/engine.ts …
# CONC=1 for one test runner (default 2). A file whose report exists is skipped. VITEST_CONFIG=vitest.stryker.subset.config.ts
# with STRYKER_TESTS=<test files> runs only those test files against each mutant (a lower bound, for the report-pdf
# files whose mutants are mostly static and would each re-run every related test file).
cd "$(dirname "$0")/.." || exit 1
out=reports/mutation-rest
mkdir -p "$out"
for f in "$@"; do
  b=$(basename "$f" .ts)
  [ -f "$out/$b.json" ] && continue
  vitest=${VITEST_CONFIG:+", \"vitest\": {\"configFile\": \"$VITEST_CONFIG\"}"}
  node scripts/stryker-config-copy.mjs stryker.config.json "$out/$b.config.json" "{
    \"concurrency\": ${CONC:-2}, \"incrementalFile\": \"reports/stryker-rest-$b.json\",
    \"reporters\": [\"json\", \"progress\"], \"jsonReporter\": {\"fileName\": \"$out/$b.json\"},
    \"thresholds\": {\"high\": 90, \"low\": 85, \"break\": null}, \"tempDirName\": \".stryker-tmp-$b\"$vitest
  }"
  echo "start $f $(date -u +%T)" >> "$out/progress.txt"
  chrt -i 0 nice -n 19 npx stryker run "$out/$b.config.json" --mutate "$f" > "$out/$b.log" 2>&1
  echo "end $f rc=$? $(date -u +%T)" >> "$out/progress.txt"
done
