#!/usr/bin/env bash
# Runs every test: engine unit tests, API tests against a real MariaDB (and Redis for the queue), browser tests in Debian's Chromium.
# Installs whatever is missing first, so it works on a clean clone (this is what .ci/run calls).
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/ensure-system.sh
ensure_node_modules
ensure_apt mariadbd mariadb-server
ensure_apt redis-server redis-server
ensure_apt chromium chromium
ensure_python_numpy
echo "› Building the client for the browser tests"
node_modules/.bin/vite build --logLevel warn
exec node_modules/.bin/vitest run "$@"
