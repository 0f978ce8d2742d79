#!/bin/bash
# One command language: the shared defaults (include/embz/defaults.h) read the same in every
# command's --help, -j means one thing, the old spellings still work with a note, and the bash
# completion script is made from the same option tables as --help (every option of every
# command is offered, nothing else), and completes what a user types.
source "$(dirname "$0")/common.sh"

# --- defaults: one line per shared option, identical wherever the option exists
for opt in from to points threads; do
    lines=$(for c in sweep classify scan plot report; do
                "$EMBZ" "$c" --help | grep -E -- "--$opt " | sed 's/  */ /g'
            done | sed 's/^ //; s/ T [a-z ]* at a time/ T X at a time/' | sort -u)
    n=$(printf '%s\n' "$lines" | grep -c .)
    if [ "$n" -le 1 ]; then ok; else fail "--$opt reads differently across commands: $lines"; fi
done
for c in sweep classify scan plot report; do
    run "$c" --help
    expect_out "working precision in bits, per size (default 64)" "$c: the many-size precision default"
    expect_out "(default 10^120)" "$c: the shared sweep range"
done
for c in error size; do
    run "$c" --help
    expect_out "working precision in bits (default 128" "$c: the one-result precision default"
done
for c in sweep classify scan report demo; do
    case $c in
        scan) run scan power --grid a=-1..-0.5,count=2 -j 0 ;;
        demo) run demo -j 0 ;;
        *) run "$c" inverse -j 0 ;;
    esac
    expect_rc 2 "$c -j 0"
    expect_err "bad number of threads '0' (1 to 256)" "$c: one message for -j"
done
# results do not depend on -j (sizes at a time; the timing and the work counters of the
# note may differ, since an engine's caches are shared by the sizes of one thread)
nosec() { printf '%s' "$out" | $PY -c '
import csv, sys
for r in csv.DictReader(sys.stdin):
    r.pop("seconds", None); r.pop("note", None); print(sorted(r.items()))'; }
run sweep inverse --to 10^40 --points 6 --csv -j 1
one=$(nosec)
run sweep inverse --to 10^40 --points 6 --csv -j 2
if [ "$one" = "$(nosec)" ] && [ -n "$one" ]; then ok; else fail "sweep -j 1 and -j 2 differ"; fi
# the default sweep: 16 sizes from 100 to 10^120
run sweep inverse --csv --no-fit
pycheck "sweep default range: 16 sizes, 100 .. 10^120" '
import csv, sys
rows = list(csv.DictReader(sys.stdin))
assert len(rows) == 16 and rows[0]["n"] == "100" and rows[-1]["log10_n"] == "120", rows[-1]
'
# report: -n/--size, the old --sizes read with a note
mkdir -p "$TMP/a" "$TMP/b"     # the same file name: a Markdown report names its figures after it
run report inverse --from 10 --to 10^4 --points 5 --sizes 1000 --eps 0.1 -q -o "$TMP/a/r.md"
expect_rc 0 "report --sizes (old name)"
expect_err "note: --sizes is now --size (-n)" "the old name is noted"
run report inverse --from 10 --to 10^4 --points 5 -n 1000 --eps 0.1 -q -o "$TMP/b/r.md"
expect_rc 0 "report -n"
if cmp -s "$TMP/a/r.md" "$TMP/b/r.md"; then ok; else fail "report --sizes and -n differ"; fi
run report --help
if printf '%s' "$out" | grep -q -- "--sizes"; then fail "the old name is in --help"; else ok; fi

# --- tables as data: families --csv (one row per family, as --names), demo --json/--csv
run families --csv
pycheck "families --csv: a row per family of --names, each with its kind and weight" "
import csv, subprocess, sys
rows = list(csv.DictReader(sys.stdin))
names = subprocess.run(['$EMBZ', 'families', '--names'], capture_output=True, text=True).stdout.split()
assert [r['name'] for r in rows] == names, (rows, names)
assert all(r['kind'] in ('weight', 'amplitude', 'levels') and r['weight'] for r in rows)
"
run demo -q --json -o "$TMP/demo.html"
expect_rc 0 "demo --json"
printf '%s' "$out" >"$TMP/demo.json"
run size inverse --eps 1e-3 --target ebits:2 --qubits --json
printf '%s' "$out" >"$TMP/size.json"
run error inverse -n 10^30 --target ebits:2 --prec 64 --json
pycheck "demo --json: the rows agree with embz size and embz error for the same family" "
import json, sys
from fractions import Fraction as F
e = json.load(sys.stdin)
d = json.load(open('$TMP/demo.json'))
s = json.load(open('$TMP/size.json'))
assert d['target'] == 'ebits:2' and d['goals'] == ['1e-3'] and d['sizes'] == ['10^30', '10^100']
inv = [r for r in d['rows'] if r['family'] == 'inverse'][0]
assert int(inv['qubits_per_side'][0]) == s['goals'][0]['qubits'], (inv, s['goals'][0])
t = inv['error'][0]          # certified digits: the enclosure of embz error lies inside them
lo, hi = F(e['error_lo']), F(e['error_hi'])
assert F(t) - F(1, 10 ** (len(t) - 2)) <= lo and hi <= F(t) + F(1, 10 ** (len(t) - 2)), (t, lo, hi)
"
run demo -q --csv -o "$TMP/demo2.html"
pycheck "demo --csv: a header and one row per shipped family of the scenario" '
import csv, sys
rows = list(csv.DictReader(sys.stdin))
assert len(rows) == 8 and rows[0]["family"] == "inverse" and "why" in rows[0], rows
'
run demo --json --csv
expect_rc 2 "demo --json --csv"

# plot --data: the drawn points as CSV, one row per family and size, each point inside its bar,
# and next to the certified enclosure of embz sweep at the same size
run plot inverse logpower --to 10^30 --points 5 -o "$TMP/p.svg" --data "$TMP/p.csv"
expect_rc 0 "plot --data"
run sweep inverse --to 10^30 --points 5 --csv --no-fit
pycheck "plot --data: 10 rows, points inside their bars, inverse next to sweep's enclosures" "
import csv, sys
sw = list(csv.DictReader(sys.stdin))
rows = list(csv.DictReader(open('$TMP/p.csv')))
assert len(rows) == 10 and {r['series'] for r in rows} == {'inverse', 'logpower (b=1/2)'}, rows
for r in rows:
    assert float(r['y_lo']) <= float(r['y']) <= float(r['y_hi'])
inv = [r for r in rows if r['series'] == 'inverse']
for r, s in zip(inv, sw):
    y, lo, hi = float(r['y']), float(s['error_lo']), float(s['error_hi'])
    assert lo * (1 - 1e-12) <= y <= hi * (1 + 1e-12), (r, s)
"
run plot inverse -o - --data -
expect_rc 2 "plot -o - --data -"

# --- completion
run completion bash
expect_rc 0 "completion bash"
printf '%s\n' "$out" >"$TMP/comp.bash"
bash -n "$TMP/comp.bash" && ok || fail "the completion script is not valid bash"
run completion zsh
expect_rc 2 "completion zsh is refused"
# complete WORDS...: the words a user typed (the last is the one being completed)
complete_words() {
    EMBZ_BIN="$EMBZ" bash -c '
        source "$1"; shift
        COMP_WORDS=("$EMBZ_BIN" "$@"); COMP_CWORD=$(( ${#COMP_WORDS[@]} - 1 ))
        _embz
        printf "%s\n" "${COMPREPLY[@]}"' _ "$TMP/comp.bash" "$@" 2>/dev/null
}
got=$(complete_words er)
[ "$got" = error ] && ok || fail "completion of 'er': $got"
got=$(complete_words error --mea)
[ "$got" = --measure ] && ok || fail "completion of 'error --mea': $got"
got=$(complete_words error inverse --measure "" | sort | tr '\n' ' ')
[ "$got" = "fidelity k overlap purified " ] && ok || fail "values of error --measure: $got"
got=$(complete_words size inverse --measure "" | sort | tr '\n' ' ')
[ "$got" = "k purified " ] && ok || fail "values of size --measure: $got"
got=$(complete_words optimal --method "" | sort | tr '\n' ' ')
[ "$got" = "closed lp " ] && ok || fail "values of optimal --method: $got"
got=$(complete_words plot inverse --format "" | sort | tr '\n' ' ')
[ "$got" = "pdf png svg " ] && ok || fail "values of plot --format: $got"
got=$(complete_words error inver)
[ "$got" = inverse ] && ok || fail "family name completion: $got"
got=$(complete_words report --siz)
[ "$got" = --size ] && ok || fail "report --siz offers only the current name: $got"
# --opt=value: bash splits at '=', the script joins it again
got=$(complete_words error inverse --measure = "" | sort | tr '\n' ' ')
[ "$got" = "fidelity k overlap purified " ] && ok || fail "values of error --measure=: $got"
got=$(complete_words error inverse --measure = pu)
[ "$got" = purified ] && ok || fail "error --measure=pu: $got"
# file names are candidates as they are: a space stays inside one candidate, a '*' is not a glob
mkdir -p "$TMP/files"
: >"$TMP/files/my probs.txt"
: >"$TMP/files/star*"
got=$(cd "$TMP/files" && complete_words convert my | tr '\n' '|')
[ "$got" = "my probs.txt|" ] && ok || fail "a file name with a space: $got"
got=$(cd "$TMP/files" && complete_words convert 'star' | tr '\n' '|')
[ "$got" = "star*|" ] && ok || fail "a file name with a star: $got"
# a family name that looks like shell code is offered, never run
mkdir -p "$TMP/fam"
printf 'name = $(touch %s/ran)\nweight = 1/i\n' "$TMP" >"$TMP/fam/odd.fam"
got=$(EMBZ_FAMILY_PATH="$TMP/fam" complete_words error '$')
[ "$got" = "\$(touch $TMP/ran)" ] && ok || fail "the odd family name is offered as it is: $got"
[ ! -e "$TMP/ran" ] && ok || fail "a family name was run by the completion"
run help completion
expect_rc 0 "embz help completion"
expect_out "usage: embz completion" "help completion prints its usage"

# every option of every command's --help is offered after '-', and nothing else
for c in $("$EMBZ" --help | awk '/^commands:/ {on = 1; next} on && !NF {exit} on {print $1}'); do
    want=$("$EMBZ" "$c" --help | grep -oE '^ +(-[a-zA-Z], )?--[a-z-]+' | grep -oE -- '--[a-z-]+|-[a-zA-Z]' | sort -u)
    have=$(complete_words "$c" - | sort -u)
    if [ "$want" = "$have" ]; then ok; else fail "completion of '$c -' differs from its --help: $(diff <(echo "$want") <(echo "$have") | tr '\n' ' ')"; fi
done

echo "$checks checks, $fails failures"
[ "$fails" -eq 0 ]
