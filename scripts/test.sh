#!/usr/bin/env bash
# npm test: the same set-up as npm start for a separate test database, then every suite:
# typecheck, unit and reference checks, integration tests against the real PostgreSQL and a
# built server, and end-to-end tests in Debian's Chromium. Ends with one summary line.
source "$(dirname "$0")/lib.sh"
SECONDS=0
RESULTS="$ERGOSHELF_DATA_DIR/test-results"
rm -rf "$RESULTS"
mkdir -p "$RESULTS"

ensure_deps

if [ ! -x /usr/bin/chromium ]; then
  log "installing Debian's chromium for the end-to-end tests"
  sudo=""
  [ "$(id -u)" != 0 ] && sudo="sudo"
  $sudo env DEBIAN_FRONTEND=noninteractive apt-get update -qq
  $sudo env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium >/dev/null
fi

export ERGOSHELF_TEST_DB_PORT=${ERGOSHELF_TEST_DB_PORT:-54339}
bash scripts/db.sh reset test
DATABASE_URL=$(bash scripts/db.sh url test)
export DATABASE_URL
export SESSION_SECRET=${TEST_SESSION_SECRET:-ergoshelf-test-session-secret-0123456789}
export NODE_ENV=production ERGOSHELF_DEMO=1
node_modules/.bin/tsx scripts/migrate.ts
node_modules/.bin/tsx scripts/seed.ts

failed=()
run() {
  local name=$1; shift
  log "── $name"
  if ! "$@"; then failed+=("$name"); fi
}

run "typecheck" npm run -s check
run "unit + reference" node_modules/.bin/vitest run --project unit --project reference \
  --reporter=default --reporter=json --outputFile.json="$RESULTS/vitest-pure.json"

ensure_build
# The test server sends its review mail to its own fake SMTP server and mailbox folder, which
# the proposal tests read back (the demo's mailbox under .data/mail is left alone).
export SMTP_PORT=${ERGOSHELF_TEST_SMTP_PORT:-$((ERGOSHELF_TEST_DB_PORT - 51804))} ERGOSHELF_MAIL_FAKE=1
export ERGOSHELF_MAIL_DIR="$ERGOSHELF_DATA_DIR/mail-test"
rm -rf "$ERGOSHELF_MAIL_DIR"
node_modules/.bin/tsx scripts/mail-fake.ts >"$RESULTS/mail-fake.log" 2>&1 &
mail_pid=$!
APP_PORT=${ERGOSHELF_TEST_APP_PORT:-$((ERGOSHELF_TEST_DB_PORT - 15000))}
export ERGOSHELF_TEST_BASE_URL="http://127.0.0.1:$APP_PORT"
HOST=127.0.0.1 PORT=$APP_PORT node_modules/.bin/react-router-serve build/server/index.js >"$RESULTS/server.log" 2>&1 &
server_pid=$!
trap 'kill $server_pid $mail_pid 2>/dev/null || true' EXIT
for _ in $(seq 1 100); do
  curl -sf "$ERGOSHELF_TEST_BASE_URL/healthz" >/dev/null 2>&1 && break
  kill -0 $server_pid 2>/dev/null || { cat "$RESULTS/server.log"; break; }
  sleep 0.2
done

run "integration" node_modules/.bin/vitest run --project integration \
  --reporter=default --reporter=json --outputFile.json="$RESULTS/vitest-integration.json"
run "end-to-end" node_modules/.bin/playwright test

kill $server_pid $mail_pid 2>/dev/null || true
node scripts/test-summary.mjs "$RESULTS" "${failed[*]:-}" "$SECONDS"
