#!/usr/bin/env bash
# `npm test`: every test — physics and scoring units, API tests, browser tests (vitest projects
# shared, server, e2e). Installs Debian's chromium first when it is missing and we run as root.
set -uo pipefail
cd "$(dirname "$0")/.."
bash scripts/ensure-browser.sh || exit 1
mkdir -p test-output
node node_modules/vitest/vitest.mjs run --reporter=default --reporter=json --outputFile.json=test-output/vitest.json "$@"
status=$?
node -e '
  const fs = require("fs");
  try {
    const r = JSON.parse(fs.readFileSync("test-output/vitest.json", "utf8"));
    console.log(`${r.numPassedTests} passed, ${r.numFailedTests} failed` + (r.numPendingTests ? `, ${r.numPendingTests} skipped` : ""));
    if (r.numTotalTests === 0) process.exitCode = 1;
  } catch (e) { console.log("0 passed, 1 failed"); process.exitCode = 1; }
' || status=1
exit $status
