#!/usr/bin/env bash
# The project's test command: build, type-check, lint, run every vitest suite, and close with the plain
# line "N passed, N failed" taken from vitest's JSON report (so a run with no tests shows as 0 passed).
set -uo pipefail
cd "$(dirname "$0")/.."
export NO_COLOR=1 FORCE_COLOR=0
mkdir -p tests/.artifacts
rm -f tests/.artifacts/vitest.json

node_modules/.bin/react-router build >tests/.artifacts/build.log 2>&1 || { cat tests/.artifacts/build.log; echo "0 passed, 1 failed"; exit 1; }
node_modules/.bin/react-router typegen >/dev/null 2>&1 && node_modules/.bin/tsc || { echo "type check failed"; echo "0 passed, 1 failed"; exit 1; }
npm run --silent lint >tests/.artifacts/lint.log 2>&1 || { cat tests/.artifacts/lint.log; echo "lint failed"; echo "0 passed, 1 failed"; exit 1; }

node_modules/.bin/vitest run --reporter=default --reporter=json --outputFile.json=tests/.artifacts/vitest.json "$@"
status=$?

if [ -f tests/.artifacts/vitest.json ]; then
  node -e '
    const r = require("./tests/.artifacts/vitest.json");
    const skipped = (r.numPendingTests || 0) + (r.numTodoTests || 0);
    console.log(`${r.numPassedTests} passed, ${r.numFailedTests} failed` + (skipped ? `, ${skipped} skipped` : ""));
    if (r.numTotalTests === 0) process.exit(1);
  ' || status=1
else
  echo "0 passed, 1 failed"
  status=1
fi
exit $status
