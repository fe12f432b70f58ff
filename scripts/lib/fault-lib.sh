# Shared helpers for scripts/fault-* and scripts/bench-*: sourced, not run. Loopback only; every
# wait is bounded; only processes started here are stopped (by pid).
set -euo pipefail

ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)
JAR="$ROOT/target/eigencov.jar"
PG_PORT=${EIGENCOV_CI_PG_PORT:-5432}
WORK=$(mktemp -d "${TMPDIR:-/tmp}/eigencov-$(basename "$0").XXXXXX")
chmod 755 "$WORK"
STARTED_PIDS=()
CREATED_DBS=()
CLEANUPS=()

log() { echo "[$(basename "$0") $(date +%T)] $*" >&2; }

# Prints FAIL with the reason and exits 1 (the EXIT trap cleans up).
fail() {
  echo "FAIL $(basename "$0"): $*"
  exit 1
}

pass() { echo "PASS $(basename "$0"): $*"; }

cleanup() {
  local pid db f
  for f in "${CLEANUPS[@]}"; do eval "$f" || true; done
  for pid in "${STARTED_PIDS[@]}"; do { kill -9 "$pid" && wait "$pid"; } 2>/dev/null || true; done
  for db in "${CREATED_DBS[@]}"; do
    psql -X -q -h 127.0.0.1 -p "${db%%/*}" -U postgres -d postgres -c "DROP DATABASE IF EXISTS ${db#*/} WITH (FORCE)" >/dev/null 2>&1 || true
  done
  if [[ "${KEEP_WORK:-0}" == 1 ]]; then log "work files kept in $WORK"; else rm -rf "$WORK"; fi
}
trap cleanup EXIT

require_jar() {
  [[ -f "$JAR" ]] || (cd "$ROOT" && mvn -B -q -DskipTests package) || fail "cannot build $JAR"
  [[ -d "$ROOT/target/test-classes" ]] || (cd "$ROOT" && mvn -B -q -DskipTests test-compile) || fail "cannot compile test classes"
}

# psql as postgres on the given port: sql PORT DB STATEMENT
sql() { psql -X -q -At -h 127.0.0.1 -p "$1" -U postgres -d "$2" -v ON_ERROR_STOP=1 -c "$3"; }

# fresh_db PORT: creates a fresh database on PORT, dropped at exit, and sets DB_URL to its JDBC URL
# (no command substitution: the subshell would lose the record of what to drop).
fresh_db() {
  local port=$1 name="eigencov_$(basename "$0" | tr -c 'a-z0-9\n' '_')_$$_${RANDOM}"
  sql "$port" postgres "CREATE DATABASE $name" >/dev/null || fail "cannot create database $name on port $port"
  CREATED_DBS+=("$port/$name")
  DB_URL="jdbc:postgresql://127.0.0.1:$port/$name?user=postgres"
}

# A free TCP port on loopback.
free_port() { python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1",0)); print(s.getsockname()[1]); s.close()'; }

# start_server NAME PORT DB_URL [extra serve flags...]: starts the jar, waits (60 s max) for /health.
# Sets ${NAME}_PID.
start_server() {
  local name=$1 port=$2 db=$3 pid i
  shift 3
  java --add-modules jdk.incubator.vector -Xmx1g -jar "$JAR" serve --port "$port" --db "$db" "$@" >"$WORK/$name.log" 2>&1 &
  pid=$!
  STARTED_PIDS+=("$pid")
  printf -v "${name}_PID" '%s' "$pid"
  for i in $(seq 1 120); do
    if curl -fsS -o /dev/null "http://127.0.0.1:$port/health" 2>/dev/null; then return 0; fi
    kill -0 "$pid" 2>/dev/null || { tail -30 "$WORK/$name.log" >&2; fail "server $name exited during start"; }
    sleep 0.5
  done
  tail -30 "$WORK/$name.log" >&2
  fail "server $name did not answer /health on port $port within 60 s"
}

# Stops a server started here: TERM, then KILL after 20 s.
stop_server() {
  local pid=$1 i
  kill "$pid" 2>/dev/null || return 0
  for i in $(seq 1 40); do kill -0 "$pid" 2>/dev/null || return 0; sleep 0.5; done
  kill -9 "$pid" 2>/dev/null || true
}

# wait_for SECONDS CMD...: retries CMD every 0.25 s until it succeeds or time runs out.
wait_for() {
  local secs=$1 end
  shift
  end=$(( $(date +%s) + secs ))
  while (( $(date +%s) < end )); do
    "$@" >/dev/null 2>&1 && return 0
    sleep 0.25
  done
  return 1
}

# http METHOD URL [curl args...]: prints "STATUS CONTENT_TYPE" and leaves the body in $WORK/body.
http() {
  local method=$1 url=$2
  shift 2
  curl -sS -o "$WORK/body" -w '%{http_code} %{content_type}\n' -X "$method" --max-time 60 "$@" "$url"
}

# json_field FILE EXPR: a value from a JSON file, e.g. json_field "$WORK/body" '["rows"]'.
json_field() { python3 -c "import json,sys; print(json.load(open(sys.argv[1]))$2)" "$1"; }

# gen_csv FILE FIRST_DATE DATES TICKERS SEED: date,ticker,value rows (weekdays from FIRST_DATE),
# tickers T0000.., values a deterministic function of (date, ticker, seed), all within (-0.2, 0.2).
gen_csv() {
  python3 - "$@" <<'PY'
import datetime, sys, random
path, first, ndates, ntick, seed = sys.argv[1], sys.argv[2], int(sys.argv[3]), int(sys.argv[4]), int(sys.argv[5])
rng = random.Random(seed)
d = datetime.date.fromisoformat(first)
with open(path, "w") as f:
    f.write("date,ticker,value\n")
    out = []
    n = 0
    while n < ndates:
        if d.weekday() < 5:
            ds = d.isoformat()
            m = rng.gauss(0, 0.01)
            for t in range(ntick):
                out.append(f"{ds},T{t:04d},{m + rng.gauss(0, 0.015):.6f}\n")
            n += 1
            if len(out) > 200000:
                f.writelines(out); out = []
        d += datetime.timedelta(days=1)
    f.writelines(out)
PY
}
