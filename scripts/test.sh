#!/usr/bin/env bash
# `npm test`: everything the tests need, then every test. Installs Debian's chromium, sox,
# aubio-tools, espeak-ng, ffmpeg, poppler-utils and postgresql when missing (as root, through apt-get), starts a
# throwaway PostgreSQL server for the server-database tests unless TEST_DATABASE_URL is given,
# type-checks, and runs the unit, integration and end-to-end suites.
set -euo pipefail
cd "$(dirname "$0")/.."

need=()
command -v chromium >/dev/null 2>&1 || [ -x "${CHROMIUM_PATH:-/nonexistent}" ] || need+=(chromium)
command -v sox >/dev/null 2>&1 || need+=(sox)
command -v aubioonset >/dev/null 2>&1 || need+=(aubio-tools)
command -v espeak-ng >/dev/null 2>&1 || need+=(espeak-ng)
# ffmpeg encodes the MP4/AAC, M4A, WebM, Ogg and MP3 recordings the upload and "Use a recording" tests use.
command -v ffmpeg >/dev/null 2>&1 || need+=(ffmpeg)
# poppler-utils (pdfinfo, pdftoppm, pdftotext) reads printed reports and the report PDF back page by page.
{ command -v pdftoppm >/dev/null 2>&1 && command -v pdftotext >/dev/null 2>&1 && command -v pdfinfo >/dev/null 2>&1; } || need+=(poppler-utils)
if [ -z "${TEST_DATABASE_URL:-}" ]; then
  ls /usr/lib/postgresql/*/bin/postgres >/dev/null 2>&1 || need+=(postgresql)
fi
if [ "${#need[@]}" -gt 0 ]; then
  if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
    echo "test: installing ${need[*]} from Debian's packages"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq
    apt-get install -y -qq --no-install-recommends "${need[@]}" >/dev/null
  else
    echo "test: missing ${need[*]}; install them (sudo apt-get install ${need[*]}) and run again" >&2
    exit 1
  fi
fi

PGROOT=""
PGBIN=""
as_pg() {
  if [ "$(id -u)" = "0" ]; then su postgres -s /bin/sh -c "$*"; else sh -c "$*"; fi
}
cleanup() {
  if [ -n "$PGROOT" ]; then
    as_pg "'$PGBIN/pg_ctl' -D '$PGROOT/data' -m fast stop >/dev/null 2>&1" || true
    rm -rf "$PGROOT"
  fi
}
trap cleanup EXIT

if [ -z "${TEST_DATABASE_URL:-}" ]; then
  PGBIN="$(ls -d /usr/lib/postgresql/*/bin | sort -V | tail -1)"
  PGROOT="$(mktemp -d /tmp/grindfade-test-pg.XXXXXX)"
  PGPORT="$(node -e 'const s=require("net").createServer();s.listen(0,"127.0.0.1",()=>{console.log(s.address().port);s.close()})')"
  if [ "$(id -u)" = "0" ]; then chown postgres "$PGROOT"; fi
  as_pg "'$PGBIN/initdb' -D '$PGROOT/data' -U postgres --auth=trust -E UTF8 >/dev/null"
  # Commit timestamps let the sign-off race test (tests/review/sign-off-race.test.ts) read the order writes landed in.
  as_pg "'$PGBIN/pg_ctl' -D '$PGROOT/data' -l '$PGROOT/log' -w -o \"-p $PGPORT -k $PGROOT -c listen_addresses=127.0.0.1 -c track_commit_timestamp=on\" start >/dev/null"
  export TEST_DATABASE_URL="postgres://postgres@127.0.0.1:$PGPORT/postgres"
  echo "test: throwaway PostgreSQL $("$PGBIN/postgres" --version | awk '{print $3}') on port $PGPORT"
fi

npm run --silent typecheck
npx vitest run "$@"
