#!/usr/bin/env bash
# psql 15 (Debian's postgresql-client) against plumb serve: its backslash
# commands, \gdesc, \copy both ways, and diagnose over the demo's shops.
# Each operation is one psql run; its output must contain the expected text.
set -u
export PGHOST="$PLUMB_HOST" PGPORT="$PLUMB_PORT" PGUSER="$PLUMB_USER" PGPASSWORD="$PLUMB_PASSWORD" PGDATABASE=plumb PGCONNECT_TIMEOUT=10
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
results=()
failed=0
check() { # operation, expected text, psql arguments...
  local op="$1" want="$2"; shift 2
  local out
  if out=$(psql -X -v ON_ERROR_STOP=1 "$@" 2>&1) && grep -qF -- "$want" <<<"$out"; then
    results+=("$op|ok|$(grep -F -m1 -- "$want" <<<"$out" | tr -s ' ' | cut -c1-100)")
  else
    results+=("$op|FAIL|$(tr '\n' ' ' <<<"$out" | cut -c1-160)")
    failed=$((failed + 1))
  fi
}
psql -X -q -v ON_ERROR_STOP=1 -c "CREATE TABLE psql_t (id INTEGER PRIMARY KEY, name VARCHAR, x DOUBLE)" \
  -c "CREATE VIEW psql_v AS SELECT id, name FROM psql_t" -c "CREATE SEQUENCE psql_seq" \
  -c "CREATE INDEX psql_idx ON psql_t (name)" >/dev/null 2>&1
check '\dt' 'psql_t' -c '\dt'
check '\d (lists views too)' 'psql_v' -c '\d'
check '\d table' 'Table "main.psql_t"' -c '\d psql_t'
check '\d+ view' 'View definition:' -c '\d+ psql_v'
check '\dv' 'psql_v' -c '\dv'
check '\dn' 'main' -c '\dn'
check '\l' 'plumb' -c '\l'
check '\di' 'psql_idx' -c '\di'
check '\ds' 'psql_seq' -c '\ds'
check '\df difference' 'difference' -c '\df difference'
check '\du' "$PLUMB_USER" -c '\du'
check '\dx' 'List of installed extensions' -c '\dx'
check '\gdesc' 'double precision' -f <(printf 'SELECT 1::INTEGER AS a, 2.5::DOUBLE AS b \\gdesc\n')
check 'SELECT version()' 'plumb' -c 'SELECT version()'
check 'diagnose on a relative path' '(12 rows)' -c "SELECT shop, product, rank FROM diagnose('$PLUMB_SHOPS', by := ['shop', 'product'], at := 'day', value := 'units') ORDER BY rank"
printf '1,one,1.5\n2,"t,wo",\n' > "$work/in.csv"
check '\copy from (csv)' 'COPY 2' -c "\\copy psql_t from '$work/in.csv' with csv"
check '\copy to (csv header)' 'COPY 2' -c "\\copy (SELECT * FROM psql_t ORDER BY id) to '$work/out.csv' with csv header"
if [ "$(cat "$work/out.csv" 2>/dev/null)" = $'id,name,x\n1,one,1.5\n2,"t,wo",' ]; then
  results+=('\copy round trip|ok|file matches')
else
  results+=("\\copy round trip|FAIL|$(tr '\n' ' ' < "$work/out.csv" 2>/dev/null)"); failed=$((failed + 1))
fi
printf 'operation                   | result | detail\n'
printf -- '----------------------------+--------+-------\n'
for r in "${results[@]}"; do
  IFS='|' read -r op res detail <<<"$r"
  printf '%-27s | %-6s | %s\n' "$op" "$res" "$detail"
done
printf 'psql: %d passed, %d failed\n' $((${#results[@]} - failed)) "$failed"
[ "$failed" -eq 0 ]
