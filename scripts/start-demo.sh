#!/usr/bin/env bash
# npm run start:demo – the whole product with its demo data on http://localhost:3000 (this machine only).
# Installs what is missing, starts MariaDB, migrates, seeds what is missing of the demo accounts and
# study (a restart keeps an admin's changes: deactivated accounts, roles, passwords), builds the app,
# and serves it together with the background worker and the local mail catcher. Ctrl-C stops all.
# Not a deployment: see `npm start` (scripts/serve.ts) in the README.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/ensure-system.sh

PORT="${PORT:-3000}"
ensure_debian_packages
ensure_node_modules
mkdir -p .data
bash scripts/db.sh start

if [ ! -s .data/nextauth-secret ]; then
  node -e "console.log(require('node:crypto').randomBytes(32).toString('hex'))" > .data/nextauth-secret
fi
export NEXTAUTH_SECRET="${NEXTAUTH_SECRET:-$(cat .data/nextauth-secret)}"
export NEXTAUTH_URL="${NEXTAUTH_URL:-http://localhost:$PORT}"

echo "migrating the database"
node --import tsx node_modules/knex/bin/cli.js --knexfile knexfile.ts migrate:latest
echo "seeding the demo (Fernhollow Imaging Core)"
node --import tsx scripts/seed-demo.ts
echo "importing the demo runs (synthetic, from our phantom) into the demo study"
node --conditions=react-server --import tsx scripts/import-demo-runs.ts

if [ "${QUORUM_SKIP_BUILD:-0}" != 1 ] || [ ! -f .next/BUILD_ID ]; then
  echo "building the app (about a minute)"
  npx next build > .data/build.log 2>&1 || { tail -30 .data/build.log; echo "the build failed; see .data/build.log"; exit 1; }
fi

pids=()
stop_all() {
  for pid in "${pids[@]}"; do kill "$pid" 2>/dev/null || true; done
  wait 2>/dev/null || true
}
trap stop_all EXIT INT TERM

# the local fake mail server catches every e-mail; read them at /dev/mailbox (signed in as the admin)
export SMTP_HOST="${SMTP_HOST:-127.0.0.1}" SMTP_PORT="${SMTP_PORT:-${QUORUM_MAIL_PORT:-2525}}" QUORUM_DEV_MAILBOX="${QUORUM_DEV_MAILBOX:-1}"
node --import tsx scripts/mail-server.ts &
pids+=($!)
node --conditions=react-server --import tsx scripts/worker.ts &
pids+=($!)

# the production server (scripts/serve.ts) in demo mode: the in-app mailbox is allowed, the schema
# was migrated above; it listens on this machine only unless QUORUM_HOST says otherwise
export PORT QUORUM_DEMO=1 QUORUM_SKIP_MIGRATE=1 QUORUM_HOST="${QUORUM_HOST:-127.0.0.1}"
echo "Quorum is starting on http://localhost:$PORT — sign in as lead@fernhollow.example / quorum-demo"
node --import tsx scripts/serve.ts &
pids+=($!)
wait -n "${pids[@]}"
