#!/usr/bin/env bash
# npm test: installs what is missing, then runs every test against throwaway services (see test.ts).
set -euo pipefail
cd "$(dirname "$0")/../.."
source src/cli/prereqs.sh
ensure_node_modules
ensure_debian mariadbd mariadb-server
ensure_debian chromium chromium
ensure_debian ffprobe ffmpeg
export PATH="$PATH:/usr/sbin"
exec node_modules/.bin/tsx src/cli/test.ts "$@"
