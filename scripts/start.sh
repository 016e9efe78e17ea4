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
cat <<INFO

  Ergoshelf is ready after ${SECONDS} s:  http://$HOST:$PORT/

  Demo mode (ERGOSHELF_DEMO=1): sign in with any of these, password ergoshelf-demo
    admin@example.org        administrator
    curator@example.org      curator
    contributor@example.org  contributor

  Database: PostgreSQL on 127.0.0.1:${ERGOSHELF_DB_PORT:-54329}, data in $ERGOSHELF_DATA_DIR (stop it with npm run db:stop)
  Press Ctrl+C to stop the app.

INFO
exec node_modules/.bin/react-router-serve build/server/index.js
