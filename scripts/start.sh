#!/usr/bin/env bash
# npm start: set everything up, then serve the production build with demo data.
source "$(dirname "$0")/lib.sh"
SECONDS=0
ensure_deps
bash scripts/db.sh up main
DATABASE_URL=$(bash scripts/db.sh url main)
export DATABASE_URL
ensure_session_secret
node_modules/.bin/tsx scripts/migrate.ts
node_modules/.bin/tsx scripts/seed.ts
ensure_build
export NODE_ENV=production ERGOSHELF_DEMO=1 HOST=${HOST:-127.0.0.1} PORT=${PORT:-3000}
# The local fake mail server (every message lands in the dev mailbox at /dev/mail).
DB_PORT=${ERGOSHELF_DB_PORT:-54329}
export SMTP_PORT=${SMTP_PORT:-$((DB_PORT - 51804))} ERGOSHELF_MAIL_FAKE=${ERGOSHELF_MAIL_FAKE:-1} ERGOSHELF_MAIL_DIR=${ERGOSHELF_MAIL_DIR:-$ERGOSHELF_DATA_DIR/mail}
node_modules/.bin/tsx scripts/mail-fake.ts >"$ERGOSHELF_DATA_DIR/mail-fake.log" 2>&1 &
MAIL_FAKE_PID=$!
trap 'kill $MAIL_FAKE_PID 2>/dev/null || true' EXIT INT TERM
cat <<INFO

  Ergoshelf is ready after ${SECONDS} s:  http://$HOST:$PORT/

  Demo mode (ERGOSHELF_DEMO=1): sign in with any of these, password ergoshelf-demo
    admin@example.org        administrator
    curator@example.org      curator
    contributor@example.org  contributor

  Mail: a local fake SMTP server on 127.0.0.1:$SMTP_PORT; read what was sent at http://$HOST:$PORT/dev/mail
  Database: PostgreSQL on 127.0.0.1:${ERGOSHELF_DB_PORT:-54329}, data in $ERGOSHELF_DATA_DIR (stop it with npm run db:stop)
  Press Ctrl+C to stop the app.

INFO
node_modules/.bin/react-router-serve build/server/index.js
