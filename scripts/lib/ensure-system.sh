#!/usr/bin/env bash
# Installs what Phasewright needs on a fresh Debian machine with Node 20, only when it is missing.
# Sourced by scripts/start.sh, scripts/dev.sh and scripts/test.sh.

as_root() {
  if [ "$(id -u)" -eq 0 ]; then "$@"; elif command -v sudo >/dev/null 2>&1; then sudo "$@"; else
    echo "Need root (or sudo) to run: $*" >&2; return 1
  fi
}

APT_UPDATED=0
# ensure_apt BINARY PACKAGE... — installs the Debian packages when BINARY is not on the machine.
ensure_apt() {
  local binary="$1"; shift
  if command -v "$binary" >/dev/null 2>&1 || [ -x "/usr/sbin/$binary" ]; then return 0; fi
  echo "› Installing Debian packages: $* (needed for $binary)"
  if [ "$APT_UPDATED" -eq 0 ]; then as_root apt-get update -qq; APT_UPDATED=1; fi
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "$@" >/dev/null
}

# Installs npm dependencies from the lock file when node_modules is missing or older than the lock.
ensure_node_modules() {
  if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    echo "› Installing npm dependencies (npm ci)"
    npm ci --no-audit --no-fund --loglevel=error
  fi
}

# numpy/scipy serve as independent references in tests and benchmarks; Debian's packages when missing.
ensure_python_numpy() {
  if python3 -c 'import numpy, scipy' >/dev/null 2>&1; then export PW_PYTHON="$(command -v python3)"; return 0; fi
  if [ -x /usr/bin/python3 ] && /usr/bin/python3 -c 'import numpy, scipy' >/dev/null 2>&1; then export PW_PYTHON=/usr/bin/python3; return 0; fi
  echo "› Installing Debian packages: python3-numpy python3-scipy"
  if [ "$APT_UPDATED" -eq 0 ]; then as_root apt-get update -qq; APT_UPDATED=1; fi
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq python3-numpy python3-scipy >/dev/null
  export PW_PYTHON=/usr/bin/python3
}
