#!/usr/bin/env bash
# npm test: every test of the project on this machine. Installs what is missing, runs the static
# checks (type-check, lint, dependency rule, dead exports: scripts/checks.sh), starts its own
# MariaDB (unless DATABASE_URL is set) and app, runs vitest (unit + integration) and Playwright,
# stops what it started, and ends with one line "N passed, N failed" (each static check counts as one).
set -uo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/ensure-system.sh

ensure_debian_packages with-browser || exit 1
ensure_node_modules || exit 1
mkdir -p .data/test-results
rm -f .data/test-results/*.json

status=0
echo "== static checks =="
bash scripts/checks.sh || status=1

started_db=0
if [ -z "${DATABASE_URL:-}" ] && ! bash scripts/db.sh status >/dev/null 2>&1; then started_db=1; fi
bash scripts/db.sh start || exit 1

# a private single-node Slurm for the cluster executor's tests (installs Debian's packages when
# missing; loopback ports QUORUM_SLURM_CTLD_PORT/QUORUM_SLURM_NODE_PORT, default 6917/6918)
started_slurm=0
if ! bash scripts/slurm.sh status >/dev/null 2>&1; then
  if bash scripts/slurm.sh start; then started_slurm=1; else echo "Slurm could not be started: the cluster tests are skipped and say why"; fi
fi
eval "$(bash scripts/slurm.sh env)"

cleanup() {
  if [ "$started_slurm" = 1 ]; then bash scripts/slurm.sh stop >/dev/null 2>&1 || true; fi
  if [ "$started_db" = 1 ]; then bash scripts/db.sh stop >/dev/null 2>&1 || true; fi
}
trap cleanup EXIT

echo "== unit and integration tests (vitest) =="
npx vitest run --reporter=default --reporter=json --outputFile=.data/test-results/vitest.json || status=1

echo "== production build =="
if npx next build > .data/test-results/build.log 2>&1; then
  echo "build ok"
  echo "== browser tests (Playwright, Debian Chromium) =="
  CI=1 PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1 npx playwright test || status=1
else
  tail -40 .data/test-results/build.log
  echo "the production build failed; browser tests were not run"
  status=1
fi

node scripts/lib/test-summary.mjs .data/test-results/vitest.json .data/test-results/playwright.json build=$( [ -f .next/BUILD_ID ] && echo ok || echo failed ) checks=.data/test-results/checks.json || status=1
exit $status
