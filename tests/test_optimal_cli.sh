#!/bin/bash
# Command-line tests of `embz optimal`. $1 = path to the embz binary. References: the closed
# form 1/psi_d(n) recomputed here in Python's exact fractions, the program's enclosure around
# it, the state file read back by `embz convert` and `embz error`, and the error of the shipped
# family dyadic (2^(-ceil(log2 i))) at the same n.
source "$(dirname "$0")/common.sh"

# psi_d(n) = j + 1 + n / (d^j (d - 1)), j = floor(log_d n), in exact fractions
PSI='
from fractions import Fraction as F
def opt(n, d):
    j, t = 0, 1
    while t * d <= n:
        t *= d; j += 1
    return 1 / (j + 1 + F(n, t * (d - 1)))
'

run optimal --help; expect_rc 0 "optimal --help"; expect_out "usage: embz optimal" "optimal --help"
expect_out "--eps" "optimal --help lists --eps"
run help optimal; expect_rc 0 "help optimal"

# ---------------------------------------------------------------- the value, both methods
for t in "ebit 2" "ebits:2 4" "uniform:3 3" "uniform:10 10"; do
    set -- $t
    for n in 1 2 7 64 100 1000; do
        for m in closed lp; do
            run optimal -n $n -t $1 --method $m --json
            expect_rc 0 "optimal -n $n -t $1 --method $m"; json_ok "optimal -n $n -t $1 $m"
            pycheck "optimal -n $n -t $1 --method $m against the closed form" "$PSI
import json, sys
r = json.load(sys.stdin)
o = opt($n, $2)
assert F(r['optimum_fraction_lo']) <= o <= F(r['optimum_fraction_hi']), r
assert r['exact'] and F(r['optimum_fraction_lo']) == o, r
assert r['method'] == '$m'
"
        done
    done
done
run optimal -n 500 --method lp --start solver --json; expect_rc 0 "lp from the solver's start"
pycheck "solver start encloses the optimum" "$PSI
import json, sys
r = json.load(sys.stdin)
assert F(r['optimum_fraction_lo']) <= opt(500, 2) <= F(r['optimum_fraction_hi'])
assert r['pivots'] > 0
"

# huge n: the closed form, exact
run optimal -n 10^1000 --json; expect_rc 0 "optimal -n 10^1000"
pycheck "optimal at 10^1000" "$PSI
import json, sys
r = json.load(sys.stdin)
assert F(r['optimum_fraction_hi']) == opt(10**1000, 2)
assert r['qubits_per_side'] == 3322
"

# ---------------------------------------------------------------- text and CSV
run optimal -n 1000; expect_rc 0 "optimal table"
expect_out "64/765" "optimal -n 1000 prints the fraction"; expect_out "(exact)" "marked exact"
run optimal -n 1000 --csv; expect_rc 0 "optimal --csv"
pycheck "optimal --csv" '
import csv, sys
rows = list(csv.DictReader(sys.stdin))
assert len(rows) == 1 and rows[0]["optimum_fraction_hi"] == "64/765", rows
'

# ---------------------------------------------------------------- the state file
for m in closed lp; do
    run optimal -n 100 --method $m --state "$TMP/st-$m.txt"
    expect_rc 0 "--state ($m)"
    if ls "$TMP"/.*part* >/dev/null 2>&1; then fail "a temporary file was left"; else ok; fi
    # read back by convert (the vector form), and checked here: sorted, 100 entries, sum 1
    run convert "$TMP/st-$m.txt" 1 --json; expect_rc 0 "convert reads the state ($m)"
    pycheck "the state file has 100 entries summing to 1 ($m)" "
import sys
from fractions import Fraction as F
v = [F(l) for l in open('$TMP/st-$m.txt') if not l.startswith('#')]
assert len(v) == 100 and sum(v) == 1 and all(a >= b for a, b in zip(v, v[1:]))
"
done
# the program's rounded primal is the closed form's state at n = 100 (the comment lines aside)
sed 1d "$TMP/st-closed.txt" >"$TMP/a"; sed 1d "$TMP/st-lp.txt" >"$TMP/b"
cmp -s "$TMP/a" "$TMP/b" && ok || fail "the program's state differs from the closed form's at n = 100"

# the shipped family dyadic reaches the optimum (one ebit)
for n in 5 100 4096 100000; do
    run error dyadic -n $n --json; expect_rc 0 "error dyadic -n $n"
    r1=$out
    run optimal -n $n --json
    printf '%s\n%s\n' "$r1" "$out" >"$TMP/pair"
    if $PY -c "
import json, sys
from fractions import Fraction as F
from decimal import Decimal as D
a, b = [json.loads(l) for l in open('$TMP/pair')]
lo, hi = D(a['error_lo']), D(a['error_hi'])
o = F(b['optimum_fraction_hi'])
assert F(lo) <= o <= F(hi), (lo, hi, o)
"; then ok; else fail "dyadic at n = $n does not enclose the optimum"; fi
done

# ---------------------------------------------------------------- --eps
for e in 0.2 0.1 0.05 0.01 1/3; do
    run optimal --eps $e --json; expect_rc 0 "optimal --eps $e"
    pycheck "--eps $e: the smallest rank" "$PSI
import json, sys
r = json.load(sys.stdin)
n = int(r['n']); e = F('$e')
assert opt(n, 2) <= e and (n == 1 or opt(n - 1, 2) > e), n
"
done
run optimal --eps 0.6; expect_rc 0 "--eps above 1/2"; expect_out "1   (the smallest" "--eps 0.6 gives n = 1"

# ---------------------------------------------------------------- -o
run optimal -n 64 -o "$TMP/res.json" --json; expect_rc 0 "-o"
[ -z "$out" ] && ok || fail "-o still printed to stdout"
$PY -c "import json; json.load(open('$TMP/res.json'))" && ok || fail "-o file is not JSON"

# ---------------------------------------------------------------- error --vs-optimal
run error inverse -n 1000; plain=$out
run error inverse -n 1000 --vs-optimal; expect_rc 0 "error --vs-optimal"
case "$out" in "$plain"*) ok ;; *) fail "--vs-optimal changed the lines before its own" ;; esac
expect_out "optimum    64/765" "--vs-optimal prints the optimum"
expect_out "1 extra per side" "--vs-optimal: 1/i at n = 1000 needs one qubit per side more"
run error inverse -n 10^6 --vs-optimal --json; expect_rc 0 "error --vs-optimal --json"
pycheck "--vs-optimal JSON: the rank is the smallest reaching the error" "$PSI
import json, sys
from decimal import Decimal as D
r = json.load(sys.stdin)
lo, hi = F(D(r['error_lo'])), F(D(r['error_hi']))
m1, m2 = int(r['optimal_rank_lo']), int(r['optimal_rank_hi'])
assert opt(m1, 2) <= hi and (m1 == 1 or opt(m1 - 1, 2) > hi)
assert opt(m2, 2) <= lo and (m2 == 1 or opt(m2 - 1, 2) > lo)
assert F(r['optimum']) == opt(10**6, 2)
assert r['extra_qubits_lo'] >= 0 and r['qubits_per_side'] == 20
"
run error inverse -n 100 --vs-optimal --csv; expect_rc 0 "error --vs-optimal --csv"
pycheck "--vs-optimal CSV columns" '
import csv, sys
rows = list(csv.DictReader(sys.stdin))
assert rows[0]["optimum"] == "16/137" and rows[0]["extra_qubits_lo"] != ""
'

# ---------------------------------------------------------------- size --vs-optimal
run size inverse --eps 0.1 --vs-optimal --json; expect_rc 0 "size --vs-optimal"
pycheck "size --vs-optimal: the optimal rank and the extra qubits" "$PSI
import json, sys
g = json.load(sys.stdin)['goals'][0]
m = int(g['optimal_n'])
assert opt(m, 2) <= F(1, 10) < opt(m - 1, 2)
assert g['optimal_qubits'] == (m - 1).bit_length()
assert g['n'] == '570' and g['extra_qubits'] == g['qubits'] - g['optimal_qubits'] == 2
"
run size inverse --eps 0.1; plain=$out
run size inverse --eps 0.1 --vs-optimal
expect_out "optimal    rank 256 (8 qubits per side)" "size --vs-optimal text"
expect_out "extra      2 qubits per side" "size --vs-optimal extra"

# ---------------------------------------------------------------- --measure fidelity|purified|overlap
# The shared enclosure of the best F_max and O^2 (docs/optimal.md section 6). References: at
# n = 2 the tree matrix is [[1, 1/2], [1/2, 0]], lambda = (1 + sqrt 2)/2, so the optimum is
# lambda^2/2 = (3 + 2 sqrt 2)/8 [derived here, by hand]; for n <= d (a star: the root and
# n - 1 leaves) lambda = (1 + sqrt n)/2, lambda^2/d [derived here, by hand].
run optimal -n 2 --measure fidelity --json; expect_rc 0 "optimal --measure fidelity -n 2"; json_ok "fidelity json"
pycheck "n = 2: (3 + 2 sqrt 2)/8 inside the enclosure" '
import json, sys
from decimal import Decimal as D, getcontext
getcontext().prec = 50
j = json.load(sys.stdin)
v = (3 + 2 * D(2).sqrt()) / 8
assert j["measure"] == "fidelity" and j["method"] == "perron" and j["exact"] is False, j
assert D(j["optimum_lo"]) <= v <= D(j["optimum_hi"]), j
assert D(j["optimum_hi"]) - D(j["optimum_lo"]) < D("1e-14"), j
for k in ("fidelity_lo", "fidelity_hi", "optimum_certified", "qubits_per_side", "how", "state_file"):
    assert k in j, k
'
run optimal -n 5 -t uniform:7 --measure purified --json; expect_rc 0 "purified, star"
pycheck "star n = 5, d = 7: sqrt(1 - ((1 + sqrt 5)/2)^2/7) inside" '
import json, sys
from decimal import Decimal as D, getcontext
getcontext().prec = 50
j = json.load(sys.stdin)
lam = (1 + D(5).sqrt()) / 2
v = (1 - lam * lam / 7).sqrt()
assert D(j["optimum_lo"]) <= v <= D(j["optimum_hi"]), (v, j)
'
# fidelity and overlap share the enclosure; purified is sqrt(1 - it)
run optimal -n 1000 --measure overlap --json; o=$out
run optimal -n 1000 --measure purified --json; p=$out
printf '%s\n%s\n' "$o" "$p" >"$TMP/fp"
pycheck "purified = sqrt(1 - overlap's enclosure)" "
import json
from decimal import Decimal as D, getcontext
getcontext().prec = 40
a, b = [json.loads(l) for l in open('$TMP/fp')]
assert (1 - D(a['optimum_hi'])).sqrt() >= D(b['optimum_lo']) - D('1e-25')
assert (1 - D(a['optimum_lo'])).sqrt() <= D(b['optimum_hi']) + D('1e-25')
"
# never beaten by a shipped family's certified value (embz error --measure)
for n in 100 4096 100000; do
    for m in fidelity overlap purified; do
        run error inverse -n $n --measure $m --json; f=$out
        run optimal -n $n --measure $m --json
        printf '%s\n%s\n' "$f" "$out" >"$TMP/fo"
        pycheck "inverse -n $n --measure $m not better than the optimum" "
import json
from decimal import Decimal as D
f, o = [json.loads(l) for l in open('$TMP/fo')]
fl, fh = D(f['value_lo']), D(f['value_hi'])
if '$m' == 'purified': assert fh >= D(o['optimum_lo']), (f, o)
else: assert fl <= D(o['optimum_hi']), (f, o)
"
    done
done
# the state file: sorted, n entries summing to 1, read by convert; its overlap is the lower end
run optimal -n 64 --measure overlap --state "$TMP/st-ov.txt" --json; expect_rc 0 "--measure overlap --state"
ol=$(printf '%s' "$out" | python3 -c 'import json,sys; print(json.load(sys.stdin)["fidelity_lo"])')
run convert "$TMP/st-ov.txt" 1 --json; expect_rc 0 "convert reads the overlap state"
pycheck "the overlap state: 64 sorted entries summing to 1, overlap squared >= the lower end" "
from fractions import Fraction as F
from decimal import Decimal as D, getcontext
getcontext().prec = 40
v = [F(l) for l in open('$TMP/st-ov.txt') if not l.startswith('#')]
assert len(v) == 64 and sum(v) == 1 and all(a >= b for a, b in zip(v, v[1:]))
r = sorted([x / 2 for x in v for _ in range(2)], reverse=True)[:64]
o = sum((D(a.numerator) / D(a.denominator) * D(b.numerator) / D(b.denominator)).sqrt() for a, b in zip(v, r))
assert abs(o * o - D('$ol')) < D('1e-25'), (o * o, '$ol')
"
run optimal -n 1000 --measure fidelity; expect_rc 0 "fidelity table"
expect_out "(certified digits)" "certified digits"; expect_out "(certified bounds)" "bounds line"
run optimal -n 1000 --measure fidelity --csv; expect_rc 0 "fidelity csv"
pycheck "fidelity --csv" '
import csv, sys
rows = list(csv.DictReader(sys.stdin))
assert len(rows) == 1 and rows[0]["measure"] == "fidelity" and rows[0]["method"] == "perron", rows
'

# --eps with --measure purified: OPT^P_n <= E < OPT^P_(n-1), each end recomputed with -n
for e in 0.5 0.3 0.2 0.16; do
    run optimal --eps $e --measure purified --json; expect_rc 0 "optimal --eps $e --measure purified"
    n=$(printf '%s' "$out" | python3 -c 'import json,sys; j=json.load(sys.stdin); assert j["n_lo"] == j["n_hi"] == j["n"]; print(j["n"])')
    run optimal -n $n --measure purified --json; a=$out
    run optimal -n $((n - 1)) --measure purified --json; b=$out
    printf '%s\n%s\n' "$a" "$b" >"$TMP/pe"
    pycheck "--eps $e: the optimum at n = $n reaches it, at n - 1 it does not" "
import json
from decimal import Decimal as D
a, b = [json.loads(l) for l in open('$TMP/pe')]
assert D(a['optimum_hi']) <= D('$e') < D(b['optimum_lo']), (a, b)
"
done
# the family 1/i needs a larger rank for the same goal (its size search, a different path)
run optimal --eps 0.3 --measure purified --json; o=$out
run size inverse --eps 0.3 --measure purified --json; f=$out
printf '%s\n%s\n' "$o" "$f" >"$TMP/pf"
pycheck "inverse needs at least the optimal rank for P <= 0.3" "
import json
o, f = [json.loads(l) for l in open('$TMP/pf')]
assert int(f['goals'][0]['n']) >= int(o['n']), (o, f)
"

# error --vs-optimal with a fidelity-type measure: the optimum at rank n is the one of
# `embz optimal --measure`, and the optimal state reaches the family's value exactly from the
# rank printed: at rank_hi its enclosure is on the better side of the family's, at rank_lo - 1
# on the worse side
for spec in "inverse 1000 purified" "inverse 10^30 fidelity" "power 100 overlap" "inverse 4096 fidelity"; do
    set -- $spec
    run error $1 -n $2 --measure $3 --vs-optimal --json; expect_rc 0 "error $1 -n $2 --measure $3 --vs-optimal"
    f=$out
    printf '%s' "$f" | python3 -c 'import json,sys; j=json.load(sys.stdin); print(j["optimal_rank_lo"], j["optimal_rank_hi"])' >"$TMP/rk"
    read rlo rhi <"$TMP/rk"
    run optimal -n $2 --measure $3 --json; o=$out
    run optimal -n $rhi --measure $3 --json; a=$out
    if [ "$rlo" -gt 1 ]; then run optimal -n $((rlo - 1)) --measure $3 --json; b=$out; else b=null; fi
    printf '%s\n%s\n%s\n%s\n' "$f" "$o" "$a" "$b" >"$TMP/vs"
    pycheck "error $1 -n $2 --measure $3 --vs-optimal against embz optimal" "
import json
from decimal import Decimal as D
f, o, a, b = [json.loads(l) for l in open('$TMP/vs')]
assert abs(D(f['optimum_lo']) - D(o['optimum_lo'])) < D('1e-20') and abs(D(f['optimum_hi']) - D(o['optimum_hi'])) < D('1e-20'), (f, o)
assert int(f['optimal_rank_lo']) <= int(f['optimal_rank_hi']) <= int(float(f['n'])), f
if '$3' == 'purified':
    assert D(a['optimum_hi']) <= D(f['value_lo']), (a, f)
    assert b is None or D(b['optimum_lo']) > D(f['value_hi']), (b, f)
else:
    assert D(a['optimum_lo']) >= D(f['value_hi']), (a, f)
    assert b is None or D(b['optimum_hi']) < D(f['value_lo']), (b, f)
assert f['extra_qubits_lo'] >= 0, f
"
done
run error inverse -n 1000 --measure purified --vs-optimal; expect_rc 0 "--vs-optimal purified text"
expect_out "extra per side" "--vs-optimal purified prints the extra qubits"

echo "$((checks - fails)) passed, $fails failed"
[ "$fails" -eq 0 ]
