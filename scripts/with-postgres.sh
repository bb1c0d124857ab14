#!/usr/bin/env bash
# Runs a command against a throw-away PostgreSQL server:
#   bash scripts/with-postgres.sh <command> [args...]
# initdb's a temporary directory, starts postgres on a free TCP port of 127.0.0.1 (its unix socket in the same
# directory), creates the database "cristae", runs the command with DATABASE_URL pointing at it, then stops the
# server and removes the directory, also when the command fails or the script is interrupted. The command's exit
# status is the script's.
#
# PostgreSQL's binaries come from Debian's packages (/usr/lib/postgresql/<major>/bin; PG_BIN overrides). initdb
# refuses to run as root: as root the server runs as the "postgres" system user (created by the package).
# PG_DURABLE=1 keeps fsync and synchronous commits on (the benchmark); by default they are off, since the data
# is thrown away at the end.
set -euo pipefail

if (($# == 0)); then
  echo "usage: $0 <command> [args...]" >&2
  exit 2
fi

bin="${PG_BIN:-}"
if [[ -z "$bin" ]]; then
  bin="$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)"
fi
if [[ -z "$bin" || ! -x "$bin/initdb" ]]; then
  echo "with-postgres: no PostgreSQL binaries found (apt-get install postgresql, or set PG_BIN)" >&2
  exit 1
fi

as_owner=()
if [[ "$(id -u)" == 0 ]]; then
  id postgres >/dev/null 2>&1 || { echo "with-postgres: running as root needs the 'postgres' system user" >&2; exit 1; }
  as_owner=(runuser -u postgres --)
fi

dir="$(mktemp -d "${TMPDIR:-/tmp}/cristae-pg.XXXXXX")"
chmod 755 "$dir"
((${#as_owner[@]})) && chown postgres "$dir"
data="$dir/data"
started=0

cleanup() {
  local status=$?
  if ((started)); then
    "${as_owner[@]}" "$bin/pg_ctl" -D "$data" -m immediate -w stop >/dev/null 2>&1 || true
  fi
  rm -rf "$dir"
  exit "$status"
}
trap cleanup EXIT
trap 'exit 130' INT
trap 'exit 143' TERM

port="$(node -e "const s=require('node:net').createServer();s.listen(0,'127.0.0.1',()=>{console.log(s.address().port);s.close()})")"

"${as_owner[@]}" "$bin/initdb" -D "$data" -U cristae --auth=trust --encoding=UTF8 --locale=C.UTF-8 >"$dir/initdb.log" 2>&1 || {
  cat "$dir/initdb.log" >&2
  exit 1
}

durability=(-c fsync=off -c synchronous_commit=off -c full_page_writes=off)
[[ "${PG_DURABLE:-0}" == 1 ]] && durability=()
opts="-c listen_addresses=127.0.0.1 -c port=$port -c unix_socket_directories=$dir -c max_connections=200 ${durability[*]}"
started=1
"${as_owner[@]}" "$bin/pg_ctl" -D "$data" -l "$dir/server.log" -o "$opts" -w -t 60 start >/dev/null || {
  cat "$dir/server.log" >&2
  exit 1
}
"${as_owner[@]}" "$bin/createdb" -h "$dir" -p "$port" -U cristae cristae

export DATABASE_URL="postgres://cristae@127.0.0.1:$port/cristae"
echo "with-postgres: PostgreSQL $("$bin/postgres" --version | awk '{print $3}') on 127.0.0.1:$port" >&2
set +e
"$@"
status=$?
set -e
exit "$status"
