#!/usr/bin/env bash
# The test command: does its own set-up (install, PostgreSQL on loopback, a fresh database,
# migrations, the client build, Chromium), then lint, format, type-check, unit tests,
# API tests against PostgreSQL, engine validation and browser tests.
# Ends with one line: "N passed, N failed".
source "$(dirname "${BASH_SOURCE[0]}")/lib/bootstrap.sh"
cd "$EBBTIDE_ROOT"

ensure_dependencies
ensure_chromium
ensure_poppler

pg_was_running=0
bash scripts/db.sh status >/dev/null 2>&1 && pg_was_running=1
bash scripts/db.sh start

TEST_DB="ebbtide_test_$(date +%s)_$$"
export DATABASE_URL="$(bash scripts/db.sh url "$TEST_DB")"
export NODE_ENV=test
mkdir -p test-output

cleanup() {
  pnpm exec tsx scripts/db-migrate.ts drop-db "$TEST_DB" >/dev/null 2>&1 || true
  [ "$pg_was_running" = 1 ] || bash scripts/db.sh stop || true
}
trap cleanup EXIT

checks_passed=0
checks_failed=0
check() {
  local name="$1"; shift
  log "check: $name"
  if "$@"; then checks_passed=$((checks_passed + 1)); else checks_failed=$((checks_failed + 1)); log "FAILED: $name"; fi
}

pnpm exec tsx scripts/db-migrate.ts create-db "$TEST_DB"
pnpm exec tsx scripts/db-migrate.ts latest
log "building the web client"
pnpm --filter @ebbtide/web exec vite build --logLevel warn

check lint pnpm exec eslint . --max-warnings=0
check format pnpm exec prettier --check . --log-level warn
check typecheck pnpm run --silent typecheck
if [ -f packages/kinetics/src/cli/validate.ts ]; then
  check "engine validation" pnpm --filter @ebbtide/kinetics run --silent validate
fi

log "vitest: unit, API (PostgreSQL) and browser suites"
set +e
pnpm exec vitest run --reporter=default --reporter=json --outputFile.json=test-output/vitest.json
vitest_rc=$?
set -e

read -r tests_passed tests_failed < <(node -e '
  const fs = require("fs");
  let p = 0, f = 0;
  try {
    const r = JSON.parse(fs.readFileSync("test-output/vitest.json", "utf8"));
    p = r.numPassedTests; f = r.numFailedTests + (r.numRuntimeErrorTests || 0);
    for (const s of r.testResults)
      if (s.status === "failed" && !s.assertionResults.some((a) => a.status === "failed")) f++;
  } catch { f = 1; }
  console.log(p, f);
')
[ "$vitest_rc" -ne 0 ] && [ "$tests_failed" -eq 0 ] && tests_failed=1

passed=$((tests_passed + checks_passed))
failed=$((tests_failed + checks_failed))
echo
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
