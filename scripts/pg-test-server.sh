#!/usr/bin/env bash
# Starts a throw-away PostgreSQL server on loopback for the integration tests and prints its URL.
# Usage: scripts/pg-test-server.sh start <dir> [port]  |  scripts/pg-test-server.sh stop <dir>
set -euo pipefail
cmd=${1:?start or stop}
dir=${2:?folder for the cluster}
port=${3:-55432}
bin=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)
[ -n "$bin" ] || { echo "PostgreSQL server binaries not found; install the Debian package postgresql" >&2; exit 1; }
as_pg() { if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi; }
case "$cmd" in
  start)
    mkdir -p "$dir"
    if [ "$(id -u)" = 0 ]; then
      chown postgres "$dir"
      runuser -u postgres -- test -w "$dir" || {
        echo "user postgres cannot reach $dir (a parent folder is private?); use a folder directly under /tmp" >&2
        exit 1
      }
    fi
    if [ ! -f "$dir/PG_VERSION" ]; then
      as_pg "$bin/initdb" -D "$dir" -U saltus --auth=trust -E UTF8 --locale=C.UTF-8 >/dev/null
    fi
    as_pg "$bin/pg_ctl" -D "$dir" -l "$dir/server.log" -w \
      -o "-c listen_addresses=127.0.0.1 -p $port -c unix_socket_directories=$dir -c fsync=off" start >/dev/null
    for db in saltus_test saltus_shadow; do
      as_pg "$bin/createdb" -h 127.0.0.1 -p "$port" -U saltus "$db" 2>/dev/null || true
    done
    echo "postgresql://saltus@127.0.0.1:$port/saltus_test"
    ;;
  stop)
    as_pg "$bin/pg_ctl" -D "$dir" -m fast stop >/dev/null || true
    ;;
  *) echo "usage: $0 start|stop <dir> [port]" >&2; exit 2 ;;
esac
