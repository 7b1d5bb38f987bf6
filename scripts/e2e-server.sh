#!/usr/bin/env bash
# Serves a production build for the browser tests on its own database (quorum_e2e), freshly
# migrated and seeded with the demo accounts. Usage: bash scripts/e2e-server.sh [PORT]
set -euo pipefail
cd "$(dirname "$0")/.."
PORT="${1:-3100}"
export QUORUM_DB_NAME="${QUORUM_DB_NAME:-quorum_e2e}"
export NEXTAUTH_URL="http://localhost:$PORT"
export NEXTAUTH_SECRET="${NEXTAUTH_SECRET:-e2e-only-secret-$(date +%s)}"
export QUORUM_UPLOADS_DIR="${QUORUM_UPLOADS_DIR:-$PWD/.data/e2e-uploads}"

bash scripts/db.sh start >/dev/null
node --import tsx scripts/reset-database.ts "$QUORUM_DB_NAME"
node --import tsx node_modules/knex/bin/cli.js --knexfile knexfile.ts migrate:latest >/dev/null
node --import tsx scripts/seed-demo.ts >/dev/null
rm -rf "$QUORUM_UPLOADS_DIR" && mkdir -p "$QUORUM_UPLOADS_DIR"
[ -f "${QUORUM_NEXT_DIST:-.next}/BUILD_ID" ] || npx next build
exec npx next start -p "$PORT" -H 127.0.0.1
