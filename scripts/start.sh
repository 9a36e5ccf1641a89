#!/usr/bin/env bash
# The start command: install, start PostgreSQL, migrate, seed, build, start every service on loopback.
# Ctrl-C stops everything it started, PostgreSQL included.
source "$(dirname "${BASH_SOURCE[0]}")/lib/bootstrap.sh"
cd "$EBBTIDE_ROOT"

API_PORT="${API_PORT:-4610}"
DB_NAME="${EBBTIDE_DB:-ebbtide}"

ensure_dependencies
pg_was_running=0
bash scripts/db.sh status >/dev/null 2>&1 && pg_was_running=1
bash scripts/db.sh start
export DATABASE_URL="$(bash scripts/db.sh url "$DB_NAME")"

children=()
cleanup() {
  trap - INT TERM EXIT
  log "stopping services"
  for pid in "${children[@]}"; do kill -TERM "$pid" 2>/dev/null || true; done
  for pid in "${children[@]}"; do wait "$pid" 2>/dev/null || true; done
  # Stop PostgreSQL only if this command started it.
  [ "$pg_was_running" = 1 ] || bash scripts/db.sh stop || true
}
trap cleanup INT TERM EXIT

pnpm exec tsx scripts/db-migrate.ts create-db "$DB_NAME"
pnpm exec tsx scripts/db-migrate.ts latest
pnpm exec tsx scripts/seed.ts
log "building the web client"
pnpm --filter @ebbtide/web exec vite build --logLevel warn

export NODE_ENV="${NODE_ENV:-development}"
export API_HOST=127.0.0.1 API_PORT WEB_DIST="$EBBTIDE_ROOT/apps/web/dist"

# The development mail catcher on loopback receives every e-mail the API sends (unless SMTP_HOST
# already points at a real mail server).
MAIL_PAGE="(not started: SMTP_HOST is set)"
if [ -z "${SMTP_HOST:-}" ]; then
  MAILCATCHER_SMTP_PORT="${MAILCATCHER_SMTP_PORT:-4625}" MAILCATCHER_HTTP_PORT="${MAILCATCHER_HTTP_PORT:-4626}"
  MAILCATCHER_HOST=127.0.0.1 MAILCATCHER_SMTP_PORT="$MAILCATCHER_SMTP_PORT" MAILCATCHER_HTTP_PORT="$MAILCATCHER_HTTP_PORT" \
    "$EBBTIDE_ROOT/node_modules/.bin/tsx" apps/mailcatcher/src/main.ts &
  children+=($!)
  for _ in $(seq 1 50); do
    curl -fsS "http://127.0.0.1:$MAILCATCHER_HTTP_PORT/health" >/dev/null 2>&1 && break
    sleep 0.2
  done
  export SMTP_HOST=127.0.0.1 SMTP_PORT="$MAILCATCHER_SMTP_PORT"
  MAIL_PAGE="http://127.0.0.1:$MAILCATCHER_HTTP_PORT/ (development mail catcher)"
fi

# The local identity provider (development stand-in for the hospital's), before the API.
# Set OIDC_ISSUER (with OIDC_CLIENT_ID and OIDC_CLIENT_SECRET) to use a real provider instead.
IDP_PORT="${IDP_PORT:-4611}"
SIGN_IN="(hospital provider: ${OIDC_ISSUER:-})"
LOCAL_IDP=0
if [ -z "${OIDC_ISSUER:-}" ]; then
  LOCAL_IDP=1
  log "building the sign-in page styles"
  (cd apps/idp && ./node_modules/.bin/tailwindcss -i src/styles.css -o dist/styles.css --minify >/dev/null 2>&1)
  IDP_HOST=127.0.0.1 IDP_PORT="$IDP_PORT" \
    IDP_REDIRECT_URIS="http://127.0.0.1:$API_PORT/auth/callback,http://127.0.0.1:5173/auth/callback" \
    IDP_POST_LOGOUT_REDIRECT_URIS="http://127.0.0.1:$API_PORT/signed-out,http://127.0.0.1:5173/signed-out" \
    IDP_EVENTS_URL="http://127.0.0.1:$API_PORT/api/internal/identity-provider-events" \
    "$EBBTIDE_ROOT/node_modules/.bin/tsx" apps/idp/src/main.ts &
  children+=($!)
  for _ in $(seq 1 100); do
    curl -fsS --max-time 2 "http://127.0.0.1:$IDP_PORT/.well-known/openid-configuration" >/dev/null 2>&1 && break
    sleep 0.2
  done
  export OIDC_ISSUER="http://127.0.0.1:$IDP_PORT"
  SIGN_IN="http://127.0.0.1:$API_PORT/sign-in (local identity provider at $OIDC_ISSUER)"
fi

"$EBBTIDE_ROOT/node_modules/.bin/tsx" apps/api/src/main.ts &
children+=($!)

for _ in $(seq 1 100); do
  curl -fsS --max-time 2 "http://127.0.0.1:$API_PORT/api/health" >/dev/null 2>&1 && break
  sleep 0.2
done

cat <<MSG

  Ebbtide is running.
    Open:  http://127.0.0.1:$API_PORT/
    Mail:  $MAIL_PAGE
    Sign in: $SIGN_IN
MSG
if [ "$LOCAL_IDP" = 1 ]; then
  DEV_PASSWORD=$(sed -n "s/^export const DEMO_PASSWORD = '\(.*\)';/\1/p" apps/idp/src/demo.ts)
  cat <<MSG
    Demo accounts (Kestrel Bay, invented), all with the development password: $DEV_PASSWORD
      pharmacist            maren.okafor          Maren Okafor
      reviewing pharmacist  tomasz.lindqvist      Tomasz Lindqvist
      trainee               priya.ferreira-hale   Priya Ferreira-Hale
      admin                 dov.achterberg        Dov Achterberg
MSG
fi
cat <<MSG
    Stop:  Ctrl-C (stops the API, the identity provider and PostgreSQL)

MSG
wait
