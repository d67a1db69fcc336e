#!/usr/bin/env bash
# Development mode: MariaDB, mail fake and the API as in `npm start`, plus Vite's dev server with hot reload
# on http://127.0.0.1:5173 proxying /api to the API.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/ensure-system.sh
ensure_node_modules
ensure_apt mariadbd mariadb-server
exec node --import tsx scripts/stack.ts --dev "$@"
