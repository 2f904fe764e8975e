#!/usr/bin/env bash
# A throwaway PostgreSQL cluster for the tests (Debian's `postgresql` package).
#   pg-cluster.sh start DIR   initdb into DIR (when empty), start it listening on a socket in DIR only,
#                             create the database, print the Npgsql connection string
#   pg-cluster.sh stop DIR    stop it (fast shutdown); the data stays, `start DIR` brings it back
# As root the server runs as the `postgres` user (PostgreSQL refuses to run as root); otherwise as
# the caller. No TCP port is opened, so clusters of several engineers or runs never collide.
set -euo pipefail
cmd=${1:?start|stop}; dir=${2:?data folder}

bin=""
for d in /usr/lib/postgresql/*/bin; do [ -x "$d/pg_ctl" ] && bin=$d; done
[ -n "$bin" ] || { echo "pg-cluster: no PostgreSQL server found (apt-get install postgresql)" >&2; exit 2; }

as_owner() {
  if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi
}

case "$cmd" in
  start)
    mkdir -p "$dir"
    # As root the server runs as `postgres`: it must be able to pass through the parent folder.
    if [ "$(id -u)" = 0 ]; then chown postgres "$dir"; chmod a+x "$(dirname "$dir")"; fi
    chmod 700 "$dir"
    if [ ! -f "$dir/PG_VERSION" ]; then
      as_owner "$bin/initdb" -D "$dir" -U postgres --auth=trust --encoding=UTF8 --no-sync >"$dir.initdb.log" 2>&1 \
        || { cat "$dir.initdb.log" >&2; exit 1; }
      cat >>"$dir/postgresql.conf" <<CONF
listen_addresses = ''
unix_socket_directories = '$dir'
max_connections = 200
fsync = on
CONF
    fi
    as_owner "$bin/pg_ctl" -D "$dir" status >/dev/null 2>&1 \
      || as_owner "$bin/pg_ctl" -D "$dir" -l "$dir/server.log" -w -t 60 start >/dev/null
    as_owner "$bin/psql" -h "$dir" -U postgres -d postgres -tAc "SELECT 1 FROM pg_database WHERE datname='seamwright_test'" | grep -q 1 \
      || as_owner "$bin/psql" -h "$dir" -U postgres -d postgres -qc "CREATE DATABASE seamwright_test" >/dev/null
    echo "Host=$dir;Username=postgres;Database=seamwright_test"
    ;;
  stop)
    [ -f "$dir/postmaster.pid" ] && as_owner "$bin/pg_ctl" -D "$dir" -m fast -w -t 60 stop >/dev/null
    ;;
  *) echo "usage: pg-cluster.sh start|stop DIR" >&2; exit 2 ;;
esac
