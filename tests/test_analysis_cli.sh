#!/bin/bash
# Command-line tests of sweep, classify and scan. $1 = path to the embz binary;
# EMBZ_FAMILY_PATH points at families/. Reference values: docs/math.md section 5 (leading-order
# estimates, tested with stated tolerances) and [memory] constants.
source "$(dirname "$0")/common.sh"

# ---- sweep
# --measure: the measure per size, the same enclosures as embz error (values where certified)
run sweep inverse --to 10^40 --points 4 --measure purified --json
expect_rc 0 "sweep --measure purified"
cp "$TMP/out" "$TMP/msweep.json"
run error inverse -n 10^40 --measure purified --prec 64 --json
expect_rc 0 "error at the last size of the measure sweep"
printf '%s' "$out" > "$TMP/merr.json"
pycheck "sweep --measure purified: explicit then analytic values, P falling, matching embz error" "
import json
from fractions import Fraction as F
s = json.load(open('$TMP/msweep.json')); e = json.load(open('$TMP/merr.json'))
pts = s['points']
assert s['measure'] == 'purified' and len(pts) == 4 and all(p['status'] == 'ok' for p in pts)
assert pts[0]['method'] == 'explicit' and pts[-1]['method'] == 'analytic'
assert all(not p['bounds_only'] for p in pts)
his = [F(p['value_hi']) for p in pts]; los = [F(p['value_lo']) for p in pts]
assert all(los[j] > his[j + 1] for j in range(3))
assert pts[-1]['n'] == e['n'] and F(e['value_lo']) <= his[-1] and los[-1] <= F(e['value_hi'])
"
run sweep logpower --from 10^30 --to 10^40 --points 2 --measure fidelity
expect_rc 0 "sweep --measure fidelity, bounds"
expect_out "BOUNDS [" "bounds are marked in the measure sweep"
# ---- classify --measure: the distance per size as sweep --measure certifies it, the verdict
# from the K criterion (K <= P <= sqrt(K (2 - K)), docs/measures.md), the 1/i law
run classify inverse --measure purified --to 10^60 --points 8 --json
expect_rc 0 "classify --measure purified"
cp "$TMP/out" "$TMP/mcls.json"
run sweep inverse --from 100 --to 10^60 --points 8 --measure purified --json
expect_rc 0 "sweep --measure purified at classify's sizes"
cp "$TMP/out" "$TMP/mcls_sweep.json"
run classify inverse --to 10^60 --points 8 --json
expect_rc 0 "classify (K) at the same sizes"
printf '%s' "$out" > "$TMP/kcls.json"
pycheck "classify --measure purified: same enclosures as sweep --measure, K <= P, proven verdict, fits marked" "
import json
from fractions import Fraction as F
c = json.load(open('$TMP/mcls.json')); s = json.load(open('$TMP/mcls_sweep.json'))
k = json.load(open('$TMP/kcls.json'))
assert c['measure'] == 'purified' and c['distance'] == 'P' and c['verdict'] == 'converges'
assert c['verdict_proven'] and c['k_verdict'] == k['verdict'] == 'embezzler'
assert 'exponent' in c['estimates_not_certified'] and c['harmonic_law'] is not None
assert len(c['points']) == len(s['points']) == len(k['points']) == 8
for p, q, e in zip(c['points'], s['points'], k['points']):
    assert p['n'] == q['n'] == e['n'] and not p['bounds_only']
    assert F(p['distance_lo']) <= F(q['value_hi']) and F(q['value_lo']) <= F(p['distance_hi'])
    assert F(e['error_lo']) <= F(p['distance_hi'])
"
run classify inverse --measure overlap --to 10^40 --points 6
expect_rc 0 "classify --measure overlap, text"
expect_out "verdict    converges   (proven)" "the overlap of 1/i converges by its exact law"
expect_out "1 - O = C_2(n) / H_n" "the derived law is shown"
expect_out "(fitted estimate)" "the fitted rate is marked as an estimate"
run classify logpower --measure purified --to 10^60 --points 6 --csv
expect_rc 0 "classify --measure purified, bounds-only sizes, CSV"
pycheck "classify --measure purified of logpower: bounds-only sizes counted, not fitted, one row" '
import csv, sys
rows = list(csv.DictReader(sys.stdin))
assert len(rows) == 1, rows
r = rows[0]
assert r["measure"] == "purified" and int(r["sizes_bounds_only"]) >= 4
assert int(r["sizes_values"]) + int(r["sizes_bounds_only"]) + int(r["sizes_failed"]) == 6
assert "certified bounds only" in r["reasons"] and r["fit_verdict"] == "inconclusive"
assert r["verdict"] == "converges" and r["verdict_proven"] == "1"
'
run classify geometric --measure fidelity --to 10^40 --points 6
expect_rc 0 "classify --measure fidelity of a summable weight"
expect_out "verdict    does_not_converge" "F_max stays away from 1 when K stays away from 0"

run sweep inverse --from 10 --to 10^30 --points 7 --csv
expect_rc 0 "sweep csv"
pycheck "sweep csv: 7 rows, sizes 10^(1+29j/6) rounded, E decreasing, no progress bar" '
import csv, sys, math
rows = list(csv.DictReader(sys.stdin))
assert len(rows) == 7, len(rows)
assert rows[0]["n"] == "10" and rows[-1]["n"] == "1" + "0" * 30
for j, r in enumerate(rows):
    want = 10 ** (1 + 29 * j / 6)
    assert abs(int(r["n"]) - want) <= 0.5 + want * 1e-12, (r["n"], want)
    assert r["status"] == "ok"
    assert float(r["error_lo"]) <= float(r["error"]) <= float(r["error_hi"])
E = [float(r["error"]) for r in rows]
assert all(E[i + 1] < E[i] for i in range(6))
# ln 2 / (ln n + gamma) to leading order [math.md 5]: within 1% at n >= 10^10
g = 0.5772156649015329  # [memory]
for r in rows[2:]:
    n = int(r["n"]); want = math.log(2) / (math.log(n) + g)
    assert abs(float(r["error"]) / want - 1) < 0.01, (n, r["error"], want)
'
if [ -s "$TMP/err" ]; then fail "sweep: stderr not empty when not a terminal: $err"; else ok; fi

# increasing weights: the tail certified up to 10^300 has a remainder bound above the whole
# weight of n = 10^14 (it was refused there as 'total weight is 0'); that size is certified
# on its own. Limit of i^a, a > 0: (1 - r^(a+1)) / (2 - r)^(a+1), r = 2^(-1/a) [math.md 5]
run sweep power --set a=20 --from 10^14 --to 10^300 --points 2 --no-fit --csv
expect_rc 0 "sweep of i^20 to 10^300"
pycheck "i^20: both sizes certified, at the large-n limit" '
import csv, sys
from fractions import Fraction as F
rows = list(csv.DictReader(sys.stdin))
assert [r["status"] for r in rows] == ["ok", "ok"], rows
a = 20; r = 2 ** (-1 / a); L = (1 - r ** (a + 1)) / (2 - r) ** (a + 1)
for x in rows:
    lo, hi = F(x["error_lo"]), F(x["error_hi"])
    assert hi - lo < F(1, 10**12) and abs(float(lo) - L) < 1e-9, (x["n"], x["error"], L)
'

run sweep inverse --to 10^30 --points 8 --json
expect_rc 0 "sweep json"
pycheck "sweep json: points, fits with residuals, best law" '
import json, sys
d = json.load(sys.stdin)
assert d["family"] == "inverse" and d["target"] == "ebit"
assert len(d["points"]) == 8
assert d["fits"]["estimate"] is True
laws = {l["law"]: l for l in d["fits"]["laws"]}
assert set(laws) == {"power_limit", "log", "loglog", "log_limit"}
assert len(laws["log"]["residuals"]) == d["fits"]["points_used"]
assert abs(laws["log"]["g"]["value"] - 1) < 0.05, laws["log"]["g"]
assert d["fits"]["best"] in laws
'
# the same enclosures on one thread and on two (each thread has its own engine and cache of
# integrals; every cached value is computed the same way whatever the order of the sizes)
OMP_NUM_THREADS=1 run sweep logpower --to 10^300 --points 9 --prec 128 --json
cp "$TMP/out" "$TMP/one.json"
export ONE_THREAD="$TMP/one.json"
OMP_NUM_THREADS=2 run sweep logpower --to 10^300 --points 9 --prec 128 --json
expect_rc 0 "sweep on two threads"
pycheck "sweep: the same enclosures on 1 and 2 threads" '
import json, os, sys
a = json.load(open(os.environ["ONE_THREAD"]))["points"]; b = json.load(sys.stdin)["points"]
assert [(p["error_lo"], p["error_hi"]) for p in a] == [(p["error_lo"], p["error_hi"]) for p in b]
assert sum(p["method"] == "analytic" for p in b) >= 7
'

# a target vector: every size above 4096 by the analytic engine (10^3 by explicit summation,
# the one threshold between the methods), tight, and overlapping the
# enclosure of `embz error` at that size (the sweep's engine certifies its tail for the
# largest size, so the balls need not be identical)
run sweep inverse --from 10^3 --to 10^60 --points 5 --target 0.7,0.3 --prec 128 --json
expect_rc 0 "sweep with a target vector"
cp "$TMP/out" "$TMP/vec.json"
export VEC_SWEEP="$TMP/vec.json"
run error inverse -n "$(python3 -c 'import json,os; print(json.load(open(os.environ["VEC_SWEEP"]))["points"][2]["n"])')" --target 0.7,0.3 --method analytic --json
pycheck "sweep with a target vector: explicit to 4096, analytic beyond, tight, overlapping embz error" '
import json, os, sys
from fractions import Fraction as F
pts = json.load(open(os.environ["VEC_SWEEP"]))["points"]
e = json.load(sys.stdin)
assert [p["method"] for p in pts] == ["explicit"] + ["analytic"] * 4, [p["method"] for p in pts]
assert all(F(p["error_hi"]) - F(p["error_lo"]) < F(1, 10**30) for p in pts)
assert F(pts[2]["error_lo"]) <= F(e["error_hi"]) and F(e["error_lo"]) <= F(pts[2]["error_hi"])
assert F(e["error_hi"]) - F(e["error_lo"]) < F(1, 10**30)
'

# a weight the analytic engine declines (not monotone): swept up to the reach of explicit
# summation (10^6), every size computed, and the output says so
run sweep "1/(i*(2+sin(i)))" --to 10^100 --points 4 --no-fit
expect_rc 0 "sweep narrowed"
expect_out "sizes limited to n <= 1000000, the reach of explicit summation" "sweep narrowed: the line"
run sweep "1/(i*(2+sin(i)))" --from 10 --to 10^100 --points 4 --no-fit --csv
pycheck "sweep narrowed, csv: 4 computed sizes from 10 to 10^6, a note on stderr" '
import csv, sys
rows = list(csv.DictReader(sys.stdin))
assert len(rows) == 4 and rows[0]["n"] == "10" and rows[-1]["n"] == "1000000", rows
assert all(r["status"] == "ok" and r["method"] == "explicit" for r in rows)
'
expect_err "note: sizes limited to n <= 1000000" "sweep narrowed csv: the note"

run sweep power --set a=-0.5 --to 10^12 --points 5
expect_rc 0 "sweep table"
expect_out "fitted laws (estimates, not certified" "sweep table marks fits as estimates"
expect_out "(certified digits)" "sweep table header"

run sweep inverse --from 100 --to 10
expect_rc 2 "sweep: from > to"
run sweep inverse --points 0
expect_rc 2 "sweep: zero points"
run sweep inverse --to banana
expect_rc 2 "sweep: bad size"
run sweep inverse --json --csv
expect_rc 2 "sweep: json and csv"
run sweep "1/(i-5)" --to 10^6 --points 4
expect_rc 2 "sweep: weight undefined is an input/domain error"

# ---- classify
run classify inverse --to 10^30 --points 8 --json
expect_rc 0 "classify inverse"
pycheck "classify inverse: embezzler, C (ln n)^-g with g near 1 and C near ln 2 (10%)" '
import json, sys, math
d = json.load(sys.stdin)
assert d["verdict"] == "embezzler", d["verdict"]
assert d["numeric_verdict"] == "embezzler" and d["analytic_verdict"] == "embezzler"
assert d["law"] == "log"
e = d["exponent"]; assert e["lo"] <= e["value"] <= e["hi"] and abs(e["value"] - 1) < 0.05
assert abs(d["coefficient"] / math.log(2) - 1) < 0.10
assert d["limit"]["lo"] == 0 and 0 < d["limit"]["hi"] < 0.02
assert d["limit"]["by_criterion"] is True and d["limit"]["certified"] is False
assert d["asymptotic_form"] and isinstance(d["reasons"], list) and len(d["reasons"]) >= 3
assert len(d["points"]) >= 5
'
# the limit 0 from the criterion is called so (as in the report), and the rate names the power
# of ln x, not the family's parameter letter: logpower b = 1/2 has f ~ x^-1 (ln x)^(-1/2), so
# E ~ C / (ln n)^(1/2) [docs/math.md section 5]
run classify logpower --set b=1/2 --to 10^30 --points 8
expect_out "rate       C / (ln n)^p, p = 1 + (the power of ln x in f) = 1/2" "classify: rate wording"
expect_out "limit      0   (criterion of the analytic route" "classify: limit by criterion"
run classify nearmiss --to 10^30 --points 8 --json
expect_rc 0 "classify nearmiss"
pycheck "classify nearmiss: not_embezzler by both routes, limit near 0.31" '
import json, sys
d = json.load(sys.stdin)
assert d["verdict"] == "not_embezzler"
assert d["numeric_verdict"] == "not_embezzler" and d["analytic_verdict"] == "not_embezzler"
assert abs(d["limit"]["value"] - 0.31) < 0.01
'
run classify power --set a=-2 --to 10^30 --points 8 --json
pycheck "classify i^-2: limit 3/pi^2 (1e-6)" '
import json, sys, math
d = json.load(sys.stdin)
assert d["verdict"] == "not_embezzler"
assert abs(d["limit"]["value"] - 3 / math.pi ** 2) < 1e-6, d["limit"]
'
run classify tilted --to 10^30 --points 8
expect_rc 0 "classify tilted"
expect_out "verdict    embezzler" "n-dependent family classified numerically"
expect_out "analytic   not applicable" "n-dependent family: no analytic route"
run classify inverse --points 2
expect_rc 2 "classify: too few points"

# ---- scan: shards concatenate to the full scan
run scan power --grid a=-1.5..-0.5,count=5 --to 10^20 --points 8
new_form=$out
if [ -s "$TMP/err" ]; then fail "scan, new grid form: unexpected stderr: $err"; else ok; fi
run scan power --grid a=-1.5:-0.5:5 --to 10^20 --points 8
if [ "$out" = "$new_form" ]; then ok; else fail "scan: the old and new grid forms differ"; fi
expect_err "note: --grid a=-1.5:-0.5:5 is the old form" "scan: note on the old grid form"
expect_err "write --grid a=-1.5..-0.5,count=5" "scan: the note gives the new form"
expect_rc 0 "scan full"
cp "$TMP/out" "$TMP/full.csv"
: > "$TMP/cat.csv"
for i in 1 2 3; do
    if [ "$i" -eq 1 ]; then h=""; else h="--no-header"; fi
    run scan power --grid a=-1.5:-0.5:5 --to 10^20 --points 8 --shard $i/3 $h
    expect_rc 0 "scan shard $i/3"
    cat "$TMP/out" >> "$TMP/cat.csv"
done
if cmp -s "$TMP/full.csv" "$TMP/cat.csv"; then ok; else fail "shards 1..3 do not concatenate to the full scan"; fi
out=$(cat "$TMP/full.csv")
pycheck "scan: 5 rows, a = -1 embezzles, the rest not" '
import csv, sys
rows = list(csv.DictReader(sys.stdin))
assert [int(r["index"]) for r in rows] == list(range(5))
assert [r["a"] for r in rows] == ["-3/2", "-5/4", "-1", "-3/4", "-1/2"], [r["a"] for r in rows]
v = [r["verdict"] for r in rows]
assert v == ["not_embezzler", "not_embezzler", "embezzler", "not_embezzler", "not_embezzler"], v
'
run scan power --grid a=-1.5:-0.5:3 --to 10^20 --points 8 --threads 2 --json
expect_rc 0 "scan json threads"
pycheck "scan json lines" '
import json, sys
rows = [json.loads(l) for l in sys.stdin.read().splitlines()]
assert [r["index"] for r in rows] == [0, 1, 2]
assert rows[1]["verdict"] == "embezzler"
'
run scan power --grid zz=0:1:3
expect_rc 2 "scan: unknown parameter"
expect_err "'zz'" "scan: names the parameter"
run scan power --grid a=0:1
expect_rc 2 "scan: bad grid"
run scan power --grid a=0:1:3 --shard 4/3
expect_rc 2 "scan: bad shard"
run scan power
expect_rc 2 "scan: no grid"
run scan "i^c" --grid c=-1.5:-0.5:3 --to 10^20 --points 8 --numeric-only
expect_rc 0 "scan inline expression with a grid parameter"

echo "$checks checks, $fails failures"
[ "$fails" -eq 0 ]
