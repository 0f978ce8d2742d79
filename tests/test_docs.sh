#!/bin/bash
# Every command example in the README and docs/*.md runs: the indented lines that start with
# "embz " (synopsis lines with placeholders such as COMMAND, FAMILY..., FILE or [--opt] are
# skipped), each in a fresh directory holding the files the examples name, must exit 0 within
# its time limit and leave no temporary file. $1 = the embz binary, $2 = the source root.
set -u
EMBZ=${1:?usage: test_docs.sh path/to/embz source-root}
ROOT=${2:?usage: test_docs.sh path/to/embz source-root}
[ -e "$EMBZ" ] && EMBZ=$(realpath "$EMBZ")
ROOT=$(realpath "$ROOT")
T=$(mktemp -d /tmp/embz-docs-test-XXXXXX)
trap 'rm -rf "$T"' EXIT
fails=0
runs=0

# the files the examples name (invented data for the examples)
mk_inputs() {
    printf '0.5 0.3 0.2\n' >"$1/probs.txt"
    mkdir -p "$1/my/families"
    printf 'name = test\nweight = 1/(i*(1+log(i)))\ndescription = an example family\n' \
        >"$1/my/families/test.fam"
}

# The sanitizer run (EMBZ_QUICK) takes the README's examples only: the docs' examples repeat
# command paths the other CLI suites run under the sanitizers too, and take minutes there;
# the normal build runs every one.
list_examples() {
    local files=("$ROOT/README.md" "$ROOT"/docs/*.md)
    [ -n "${EMBZ_QUICK:-}" ] && files=("$ROOT/README.md")
    for f in "${files[@]}"; do
        grep -nE '^    embz ' "$f" | sed "s|^|$(basename "$f"):|"
    done
}

while IFS= read -r line; do
    where=${line%%:    embz *}
    cmd=${line#*:    embz }
    cmd=${cmd%%#*}                                  # a trailing comment
    cmd=$(printf '%s' "$cmd" | sed 's/[[:space:]]*$//')
    case "$cmd" in
        *COMMAND*|*FAMILY*|*FILE*|*'[--'*|*' | '*) continue ;;
    esac
    runs=$((runs + 1))
    d="$T/run$runs"
    mkdir -p "$d"
    mk_inputs "$d"
    # shellcheck disable=SC2086
    (cd "$d" && eval "timeout 300 \"$EMBZ\" $cmd" >"$d/out" 2>"$d/err")
    rc=$?
    if [ "$rc" -ne 0 ]; then
        echo "FAIL $where: embz $cmd: exit $rc: $(head -c 400 "$d/err")"
        fails=$((fails + 1))
    elif ls -a "$d" | grep -q '\.part-'; then
        echo "FAIL $where: embz $cmd: left a temporary file"
        fails=$((fails + 1))
    else
        echo "ok   $where: embz $cmd"
    fi
done < <(list_examples)

[ "$runs" -ge 20 ] || { echo "FAIL only $runs examples found"; fails=$((fails + 1)); }
echo "$((runs - fails)) passed, $fails failed"
[ "$fails" -eq 0 ]
