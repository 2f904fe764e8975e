#!/usr/bin/env bash
# Starts (or stops) the developers' throwaway PostgreSQL cluster for the PostgreSql state tests,
# the same way .ci/run does. Usage:
#   eval "$(bash tools/test-postgres.sh start)"   # exports SEAMWRIGHT_TEST_PG
#   dotnet test tests/Seamwright.Pipeline.Tests --filter 'FullyQualifiedName~PostgreSql'
#   bash tools/test-postgres.sh stop
# Needs Debian's `postgresql` (sudo apt-get install postgresql). Data under ${SEAMWRIGHT_PG_DIR:-/tmp/seamwright-pg-$USER}.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
dir=${SEAMWRIGHT_PG_DIR:-/tmp/seamwright-pg-$(id -un)}
case "${1:-start}" in
  start) conn=$(bash "$here/.ci/pg-cluster.sh" start "$dir/db"); echo "export SEAMWRIGHT_TEST_PG='$conn'" ;;
  stop) bash "$here/.ci/pg-cluster.sh" stop "$dir/db"; rm -rf "$dir" ;;
  *) echo "usage: test-postgres.sh start|stop" >&2; exit 2 ;;
esac
