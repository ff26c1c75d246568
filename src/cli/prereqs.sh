# Shared by start.sh and test.sh: install what is missing (npm packages; Debian packages as root or with sudo).
export ASTRO_TELEMETRY_DISABLED=1

ensure_node_modules() {
  if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ]; then
    echo "▸ installing npm packages (npm ci)"
    npm ci --no-audit --no-fund
  elif [ package-lock.json -nt node_modules/.package-lock.json ]; then
    echo "▸ package-lock.json changed: npm install"
    npm install --no-audit --no-fund
  fi
}

APT_UPDATED=0
# ensure_debian COMMAND PACKAGE...: installs the packages when COMMAND is not on the PATH.
ensure_debian() {
  local cmd="$1"; shift
  if command -v "$cmd" >/dev/null 2>&1 || [ -x "/usr/sbin/$cmd" ] || [ -x "/usr/bin/$cmd" ]; then return 0; fi
  local sudo=""
  if [ "$(id -u)" != "0" ]; then
    if command -v sudo >/dev/null 2>&1 && sudo -n true 2>/dev/null; then sudo="sudo"; else
      echo "✗ $cmd is missing. Install it first, as root:" >&2
      echo "    apt-get update && apt-get install -y $*" >&2
      exit 1
    fi
  fi
  echo "▸ installing $* from Debian"
  if [ "$APT_UPDATED" = 0 ]; then $sudo apt-get update -qq; APT_UPDATED=1; fi
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq --no-install-recommends "$@" >/dev/null
}
