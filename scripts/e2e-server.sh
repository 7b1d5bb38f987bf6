#!/usr/bin/env bash
# Serves a production build for the browser tests on its own database (quorum_e2e), freshly
# migrated and seeded with the demo accounts. Usage: bash scripts/e2e-server.sh [PORT]
set -euo pipefail
cd "$(dirname "$0")/.."
PORT="${1:-3100}"
export QUORUM_DB_NAME="${QUORUM_DB_NAME:-quorum_e2e}"
export NEXTAUTH_URL="http://localhost:$PORT"
export NEXTAUTH_SECRET="${NEXTAUTH_SECRET:-$(node -e "process.stdout.write(require('node:crypto').randomBytes(32).toString('hex'))")}"
export QUORUM_UPLOADS_DIR="${QUORUM_UPLOADS_DIR:-$PWD/.data/e2e-uploads}"
# the browser tests play a deployment behind the facility's own proxy (per-address throttles are
# exercised through X-Forwarded-For) and batch notification e-mails over 2 s instead of a minute
export QUORUM_TRUST_PROXY="${QUORUM_TRUST_PROXY:-1}" QUORUM_NOTIFY_BATCH_MS="${QUORUM_NOTIFY_BATCH_MS:-2000}"

bash scripts/db.sh start >/dev/null
node --import tsx scripts/reset-database.ts "$QUORUM_DB_NAME"
node --import tsx node_modules/knex/bin/cli.js --knexfile knexfile.ts migrate:latest >/dev/null
node --import tsx scripts/seed-demo.ts >/dev/null
rm -rf "$QUORUM_UPLOADS_DIR" && mkdir -p "$QUORUM_UPLOADS_DIR"
[ -f "${QUORUM_NEXT_DIST:-.next}/BUILD_ID" ] || npx next build
# local fake mail server (scripts/mail-server.ts): the tests read its store with lib/mail/mailbox.ts;
# it stops when the server started by the exec below ends
export QUORUM_MAIL_PORT="${QUORUM_MAIL_PORT:-2526}" SMTP_HOST=127.0.0.1 SMTP_PORT="${QUORUM_MAIL_PORT:-2526}"
export QUORUM_MAIL_DIR="${QUORUM_MAIL_DIR:-$PWD/.data/mail/$QUORUM_DB_NAME}" QUORUM_DEV_MAILBOX=1
rm -rf "$QUORUM_MAIL_DIR"
# the mail catcher, the worker and the app run together; stopping this script stops all three
pids=()
trap 'kill "${pids[@]}" 2>/dev/null; wait' EXIT INT TERM
node --import tsx scripts/mail-server.ts --exit-with-parent &
pids+=($!)
node --conditions=react-server --import tsx scripts/worker.ts &
pids+=($!)
# the production start (scripts/serve.ts) in demo mode: the tests read the dev mailbox
QUORUM_DEMO=1 QUORUM_SKIP_MIGRATE=1 QUORUM_HOST=127.0.0.1 PORT="$PORT" node --import tsx scripts/serve.ts &
pids+=($!)
wait -n "${pids[@]}"
