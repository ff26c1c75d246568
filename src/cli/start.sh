#!/usr/bin/env bash
# npm start (and npm run dev with --dev): installs what is missing, then starts the services and the app.
set -euo pipefail
cd "$(dirname "$0")/../.."
source src/cli/prereqs.sh
ensure_node_modules
ensure_debian mariadbd mariadb-server
export PATH="$PATH:/usr/sbin"
exec node_modules/.bin/tsx src/cli/start.ts "$@"
