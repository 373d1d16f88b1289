#!/usr/bin/env bash
# `npm test`: lint and format check, type check, Vitest (unit + integration against a fresh
# PostgreSQL), then Playwright against the built app in Debian's Chromium. Installs Debian's
# packages it needs when run as root.
set -euo pipefail
cd "$(dirname "$0")/.."

need=()
[ -x /usr/lib/postgresql/15/bin/postgres ] || ls /usr/lib/postgresql/*/bin/postgres >/dev/null 2>&1 || need+=(postgresql)
command -v chromium >/dev/null 2>&1 || need+=(chromium)
command -v mosquitto_pub >/dev/null 2>&1 || need+=(mosquitto-clients)
[ -x /usr/sbin/mosquitto ] || need+=(mosquitto) # the bridge tests start a home broker of their own
if [ ${#need[@]} -gt 0 ]; then
  if [ "$(id -u)" = 0 ]; then
    echo "Installing Debian packages: ${need[*]}"
    apt-get update -qq
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "${need[@]}" >/dev/null
  else
    echo "Missing Debian packages: ${need[*]}. Install them with: sudo apt-get install -y ${need[*]}" >&2
    exit 1
  fi
fi
[ -d node_modules ] || npm ci --no-audit --no-fund

echo "== lint (ESLint) and format (Prettier)"
npm run --silent lint
echo "== type check"
npm run --silent typecheck
echo "== unit and integration tests (Vitest)"
npx vitest run --project unit --project integration
echo "== build"
npm run --silent build >/dev/null
echo "== end-to-end tests (Playwright, Chromium)"
npx playwright test
