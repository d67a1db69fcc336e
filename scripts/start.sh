#!/usr/bin/env bash
# Starts Phasewright with demo data: installs what is missing, starts MariaDB and the mail fake on
# loopback, migrates, seeds, builds the client and serves everything on one port. Ctrl-C stops it all.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib/ensure-system.sh
ensure_node_modules
ensure_apt mariadbd mariadb-server
# RUN_QUEUE=redis: runs go through a private Redis to worker processes.
if [ "${RUN_QUEUE:-embedded}" = redis ]; then ensure_apt redis-server redis-server; fi
exec node --import tsx scripts/stack.ts "$@"
