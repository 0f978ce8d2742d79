#!/bin/bash
# Table-driven checks of how the command line treats bad (and borderline) input.
# Usage: test_bad_inputs.sh path/to/embz [table]   (table defaults to bad_inputs.tsv beside
# this script). Every row of the table runs once, in an empty temporary directory of its own
# that holds the small fixtures made by make_fixtures below.
#
# Table format: one row per line, fields separated by one TAB:
#   1. expected exit status
#   2. text that standard error must contain (fixed string), or '-' for no requirement
#   3. time limit in seconds (the row fails when it is exceeded)
#   4. extended regular expression (case-insensitive) that standard output must NOT match,
#      or '-' for none
#   5. the arguments after 'embz', as shell words (evaluated by the shell, so quotes and
#      $(...) work; $LONG_SUM and $DEEP hold long expressions)
# Empty lines and lines starting with '#' are ignored.
# Besides the columns, every row fails when the process died from a signal (status >= 128,
# which also covers the 124 of timeout: see below), when the sanitizer reported anything, or
# when a temporary '*.part-*' output file was left behind.
set -u
EMBZ=${1:?usage: $(basename "$0") path/to/embz [table]}
TABLE=${2:-$(dirname "$0")/bad_inputs.tsv}
case $EMBZ in /*) ;; *) EMBZ=$PWD/$EMBZ ;; esac
case $TABLE in /*) ;; *) TABLE=$PWD/$TABLE ;; esac
[ -x "$EMBZ" ] || { echo "not executable: $EMBZ"; exit 2; }
[ -r "$TABLE" ] || { echo "cannot read table: $TABLE"; exit 2; }
command -v timeout >/dev/null || { echo "timeout(1) is missing"; exit 77; }

ROOT=$(mktemp -d)
trap 'rm -rf "$ROOT"' EXIT

# Long expressions used by some rows (too long to write into the table).
LONG_SUM="i$(printf '+i%.0s' $(seq 2100))"                        # 4201 characters
DEEP="$(printf '(%.0s' $(seq 250))i$(printf ')%.0s' $(seq 250))"   # 250 levels
export LONG_SUM DEEP

make_fixtures() {  # in the current directory
    mkdir adir d.svg d.html
    printf 'name = badkey\nparam a = -1\nweight = i^a\nbogus = 3\n' > bad.fam
    printf 'name = noweight\nparam a = -1\n' > noweight.fam
    printf 'name = badexpr\nweight = i^(\n' > badexpr.fam
    printf '\357\273\277name = bom\nparam a = -1\nweight = i^a\n' > bom.fam
    printf '0.5\n0.25\n0.25\n' > good.txt
    printf '0.5\n0.5,\n' > trailing.txt
    printf '0.5\nabc\n' > word.txt
    printf '' > empty.txt
    : > h1.svg; ln h1.svg h2.svg
}

rows=0
fails=0
lineno=0
while IFS= read -r line || [ -n "$line" ]; do
    lineno=$((lineno + 1))
    case $line in ''|'#'*) continue ;; esac
    IFS=$'\t' read -r want frag limit nomatch args <<<"$line"
    tabs=${line//[!$'\t']/}
    # the arguments may be empty (no command at all), but all five fields must be there
    if [ "${#tabs}" -ne 4 ] || ! [[ $want =~ ^[0-9]+$ && $limit =~ ^[0-9]+$ ]] ||
       [ -z "$frag" ] || [ -z "$nomatch" ]; then
        echo "line $lineno: malformed row: $line"; fails=$((fails + 1)); continue
    fi
    rows=$((rows + 1))
    dir="$ROOT/row$lineno"
    mkdir "$dir"
    # The arguments are evaluated inside the row's directory, so relative fixture paths work.
    ( cd "$dir" && make_fixtures && eval "set -- $args" &&
      exec timeout -k 2 "$limit" "$EMBZ" "$@" ) >"$dir.out" 2>"$dir.err"
    rc=$?
    why=""
    if [ "$rc" -eq 124 ] || [ "$rc" -eq 137 ]; then
        why="did not finish within ${limit} s"
    elif [ "$rc" -ge 128 ]; then
        why="killed by signal $((rc - 128))"
    elif [ "$rc" -ne "$want" ]; then
        why="exit $rc, expected $want"
    fi
    if [ "$frag" != "-" ] && ! grep -qF -- "$frag" "$dir.err"; then
        why="${why:+$why; }stderr lacks '$frag'"
    fi
    if [ "$nomatch" != "-" ] && grep -qEi -- "$nomatch" "$dir.out"; then
        why="${why:+$why; }stdout matches /$nomatch/"
    fi
    if grep -q Sanitizer "$dir.err"; then
        why="${why:+$why; }sanitizer report"
    fi
    left=$(find "$dir" -name '*.part-*' | head -3)
    if [ -n "$left" ]; then
        why="${why:+$why; }partial file left: $left"
    fi
    if [ -n "$why" ]; then
        fails=$((fails + 1))
        echo "FAIL line $lineno: embz $args: $why (stderr: $(head -c 300 "$dir.err" | tr '\n' ' '))"
    fi
    rm -rf "$dir" "$dir.out" "$dir.err"
done <"$TABLE"

echo "bad inputs: $rows rows, $fails failing"
[ "$rows" -gt 0 ] || { echo "no rows read from $TABLE"; exit 1; }
[ "$fails" -eq 0 ]
