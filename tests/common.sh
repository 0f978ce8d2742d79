# Shared preamble of the command-line test scripts, sourced as
#     source "$(dirname "$0")/common.sh"
# $1 of the script = path to the embz binary. Defines $EMBZ, $PY, a temporary directory $TMP
# (removed on exit), the counters $checks / $fails and the check helpers below.
set -u
EMBZ=${1:?usage: $(basename "$0") path/to/embz}
PY=/usr/bin/python3
TMP=$(mktemp -d)
trap 'rm -rf "$TMP"' EXIT
fails=0
checks=0

ok()   { checks=$((checks + 1)); }
fail() { checks=$((checks + 1)); fails=$((fails + 1)); echo "FAIL: $*"; }

# run ARGS...: sets $out, $err, $rc
run() {
    "$EMBZ" "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
    out=$(cat "$TMP/out")
    err=$(cat "$TMP/err")
    # under -Db_sanitize a report on any path (also error paths) is a failure
    if grep -q "Sanitizer" "$TMP/err"; then fail "sanitizer report for: $*"; fi
}

expect_rc() {  # expect_rc CODE DESCRIPTION
    if [ "$rc" -eq "$1" ]; then ok; else fail "$2: exit $rc, expected $1 (stderr: $err)"; fi
}
expect_out() {  # expect_out TEXT DESCRIPTION (fixed string in stdout)
    if printf '%s' "$out" | grep -qF -- "$1"; then ok; else fail "$2: stdout lacks '$1'"; fi
}
expect_err() {  # expect_err TEXT DESCRIPTION (fixed string in stderr)
    if printf '%s' "$err" | grep -qF -- "$1"; then ok; else fail "$2: stderr lacks '$1' (got: $err)"; fi
}
json_ok() {  # stdout must be valid JSON
    if printf '%s' "$out" | $PY -c 'import json,sys; json.load(sys.stdin)' 2>/dev/null; then ok
    else fail "$1: stdout is not valid JSON: $out"; fi
}
pycheck() {  # pycheck DESCRIPTION PYTHON-CODE (stdout of the last run on stdin; exit 0 = pass)
    if printf '%s' "$out" | $PY -c "$2"; then ok; else fail "$1"; fi
}
