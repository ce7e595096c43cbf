#!/usr/bin/env bash
# Dependency check (RELIABILITY.md 23): `npm audit --omit=dev` must report no high or critical
# finding. When the registry's advisory endpoint cannot be reached (some mirrors answer 405), say so
# plainly and exit 2, so that "not checked" is never mistaken for "clean"; the version floors are
# checked either way by tests/server/dependency-floors.test.ts.
set -uo pipefail
cd "$(dirname "$0")/.."
out=$(npm audit --omit=dev --audit-level=high --json 2>/tmp/parallax-audit.err)
status=$?
if grep -q -E '405|ENOTFOUND|ECONNREFUSED|EAI_AGAIN|audit endpoint returned an error' /tmp/parallax-audit.err && [ -z "$(printf '%s' "$out" | grep -o '"vulnerabilities"')" ]; then
  echo "audit: the advisory database is unreachable from here ($(grep -o -m1 -E '405[^"]*|ENOTFOUND|ECONNREFUSED|EAI_AGAIN' /tmp/parallax-audit.err)); NOT CHECKED" >&2
  exit 2
fi
printf '%s\n' "$out" | node -e '
  let s = ""; process.stdin.on("data", (d) => (s += d)).on("end", () => {
    const r = JSON.parse(s || "{}"); const v = r.metadata?.vulnerabilities ?? {};
    console.log(`audit: ${v.critical ?? 0} critical, ${v.high ?? 0} high, ${v.moderate ?? 0} moderate, ${v.low ?? 0} low (production dependencies)`);
  });'
exit $status
