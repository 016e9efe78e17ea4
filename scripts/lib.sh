# Shared set-up steps for scripts/start.sh and scripts/test.sh (sourced, not run).
set -euo pipefail
cd "$(dirname "${BASH_SOURCE[0]}")/.."
export ERGOSHELF_DATA_DIR=${ERGOSHELF_DATA_DIR:-.data}
mkdir -p "$ERGOSHELF_DATA_DIR"

log() { echo "[ergoshelf] $*"; }

# Installs packages when node_modules is missing or older than the lock file.
ensure_deps() {
  local stamp=node_modules/.ergoshelf-lock-sha256 want
  want=$(sha256sum package-lock.json | cut -d' ' -f1)
  if [ ! -f "$stamp" ] || [ "$(cat "$stamp")" != "$want" ]; then
    log "installing packages (npm ci)"
    npm ci --no-audit --no-fund --loglevel=error
    echo "$want" >"$stamp"
  fi
}

# A session secret kept in the data folder unless SESSION_SECRET is set.
ensure_session_secret() {
  if [ -z "${SESSION_SECRET:-}" ]; then
    local f="$ERGOSHELF_DATA_DIR/session-secret"
    if [ ! -s "$f" ]; then
      (umask 077; node -e 'process.stdout.write(require("crypto").randomBytes(32).toString("base64url"))' >"$f")
    fi
    SESSION_SECRET=$(cat "$f")
    export SESSION_SECRET
  fi
}

# Builds the app unless build/ is newer than every source file.
ensure_build() {
  local stamp=build/.ergoshelf-built
  if [ -f "$stamp" ] && [ -z "$(find app public catalog package-lock.json vite.config.ts react-router.config.ts -newer "$stamp" -print -quit 2>/dev/null)" ]; then
    log "build is up to date"
    return
  fi
  log "building the app"
  node_modules/.bin/react-router build >"$ERGOSHELF_DATA_DIR/build.log" 2>&1 || { tail -n 40 "$ERGOSHELF_DATA_DIR/build.log"; exit 1; }
  touch "$stamp"
}
