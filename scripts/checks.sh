#!/usr/bin/env bash
# npm run checks: the static checks that run before the tests (type-check, lint, the dependency
# rule, dead exports, formatting). Prints each one's verdict; writes .data/test-results/checks.json
# ({ "typecheck": "passed", ... }) for scripts/lib/test-summary.mjs, which counts each as one
# passed or failed check. Exit code 1 if any failed.
set -uo pipefail
cd "$(dirname "$0")/.."
mkdir -p .data/test-results
out=.data/test-results/checks.json
status=0
results=()

check() {
  local name=$1 what=$2
  shift 2
  echo "== $name: $what =="
  if "$@"; then
    echo "$name: passed"
    results+=("\"$name\": \"passed\"")
  else
    echo "$name: FAILED ($*)"
    results+=("\"$name\": \"failed\"")
    status=1
  fi
}

check typecheck 'tsc --noEmit over the whole tree' npx tsc --noEmit
check lint 'ESLint (Next core web vitals, react-hooks, TypeScript)' npx eslint --max-warnings 0 .
check deps 'dependency rule (app → lib/<domain> → lib/db/queries → knex)' npx depcruise app components lib db scripts --ignore-known
check knip 'dead exports and unused dependencies' npx knip --no-progress
check format 'Prettier (.prettierrc.json, width 140; npm run format fixes it)' npx prettier --check --log-level warn .

(IFS=,; echo "{${results[*]}}") > "$out"
exit $status
