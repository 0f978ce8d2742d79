#!/bin/bash
# Command-line checks of `embz plot`, `embz report` and `embz demo`:
# outputs parse (XML via Python, PDF via pdftoppm, PNG signature), bad requests fail cleanly,
# failed writes leave no partial or temporary file. $1 = the embz binary.
set -u
EMBZ=${1:?usage: test_report.sh path/to/embz}
[ -e "$EMBZ" ] && EMBZ=$(realpath "$EMBZ")   # the demo runs in another directory
T=$(mktemp -d /tmp/embz-report-test-XXXXXX)
trap 'chmod -R u+w "$T"; rm -rf "$T"' EXIT
fail=0
check() {   # check NAME COMMAND...
    local name=$1; shift
    if "$@"; then echo "ok   $name"; else echo "FAIL $name"; fail=1; fi
}
xml_ok() { /usr/bin/python3 -c 'import sys, xml.etree.ElementTree as E; E.parse(sys.argv[1])' "$1"; }
png_ok() { [ -s "$1" ] && [ "$(head -c 8 "$1" | od -An -tx1 | tr -d ' \n')" = "89504e470d0a1a0a" ]; }
no_temp() { ! ls -a "$1" | grep -q '\.part-'; }

# error against n for three shipped families, all three formats
check "plot svg" "$EMBZ" plot inverse power geometric --to 10^5 --points 6 -o "$T/a.svg"
check "svg parses" xml_ok "$T/a.svg"
check "svg has text as glyphs or text" grep -q "<svg" "$T/a.svg"
check "plot png with weights" "$EMBZ" plot inverse power --to 10^4 --points 5 --weights -o "$T/b.png"
check "png header" png_ok "$T/b.png"
check "plot pdf" "$EMBZ" plot inverse --set a=-1 power --to 10^4 --points 4 -o "$T/c.pdf"
if command -v pdftoppm >/dev/null; then
    check "pdf renders" pdftoppm -r 30 -png "$T/c.pdf" "$T/c"
    check "pdf page image" png_ok "$T/c-1.png"
fi
# a very wide range uses the analytic engine and still plots
check "plot 10^300" "$EMBZ" plot inverse --from 10 --to 10^300 --points 2 -o "$T/w.svg"
check "wide svg parses" xml_ok "$T/w.svg"
# --optimum adds one dashed series (the optimum's exact curve) and changes nothing else
check "plot --optimum" "$EMBZ" plot inverse --to 10^300 --points 8 --optimum -o "$T/o1.svg"
check "plot without --optimum" "$EMBZ" plot inverse --to 10^300 --points 8 -o "$T/o0.svg"
check "optimum svg parses" xml_ok "$T/o1.svg"
check "--optimum adds a dashed line" test "$(grep -o 'stroke-dasharray' "$T/o1.svg" | wc -l)" -gt \
    "$(grep -o 'stroke-dasharray' "$T/o0.svg" | wc -l)"
if command -v pdftotext >/dev/null; then
    check "plot --optimum pdf" "$EMBZ" plot inverse --to 10^6 --points 5 --optimum -o "$T/o.pdf"
    check "the legend names the optimum" bash -c "pdftotext '$T/o.pdf' - | grep -qx optimum"
fi
# --measure: the measure's values as points, bounds-only sizes (logpower beyond 2^20) as
# intervals with a legend entry of their own, the axis naming the measure
check "plot --measure overlap svg" "$EMBZ" plot inverse power --to 10^40 --points 5 --measure overlap -o "$T/m.svg"
check "measure svg parses" xml_ok "$T/m.svg"
if command -v pdftotext >/dev/null; then
    check "plot --measure purified pdf" "$EMBZ" plot inverse logpower --to 10^40 --points 5 \
        --measure purified -o "$T/m.pdf"
    check "the title and axis name the purified distance" bash -c \
        "pdftotext '$T/m.pdf' - | grep -q 'Purified distance P, target ebit' && pdftotext '$T/m.pdf' - | grep -q 'F_max) (certified)'"
    check "bounds-only sizes have their legend entry" bash -c \
        "pdftotext '$T/m.pdf' - | grep -qF 'logpower (b=1/2) (bounds only)'"
    check "a family with values only has none" bash -c \
        "! pdftotext '$T/m.pdf' - | grep -qF 'inverse (bounds only)'"
fi

# usage errors: exit 2, nothing written
"$EMBZ" plot inverse -o "$T/x.gif" 2>/dev/null; check "bad extension exit 2" test $? -eq 2
"$EMBZ" plot inverse 2>/dev/null; check "missing -o exit 2" test $? -eq 2
"$EMBZ" plot inverse --from 100 --to 10 -o "$T/y.svg" 2>/dev/null; check "bad range exit 2" test $? -eq 2
"$EMBZ" plot inverse --set zz=1 -o "$T/y.svg" 2>/dev/null; check "unknown parameter exit 2" test $? -eq 2
check "nothing written by usage errors" test ! -e "$T/x.gif" -a ! -e "$T/y.svg"

# a file cannot be created: exit 1, no temporary file left
echo x > "$T/plain"
"$EMBZ" plot inverse --to 1000 --points 3 -o "$T/plain/z.svg" 2>/dev/null; check "not a directory exit 1" test $? -eq 1
mkdir "$T/ro"; chmod 555 "$T/ro"
"$EMBZ" plot inverse --to 1000 --points 3 -o "$T/ro/z.png" 2>/dev/null
st=$?
if [ "$(id -u)" != 0 ]; then check "read-only dir exit 1" test $st -eq 1; fi
check "no temporary file in read-only dir" no_temp "$T/ro"
check "no temporary file" no_temp "$T"

# an interrupted run (SIGTERM: background jobs of a script ignore SIGINT): the old file stays;
# the job takes about 100 s, far longer than the 1 s wait
echo "old" > "$T/keep.svg"
"$EMBZ" plot inverse iterlog logpower tilted --from 10 --to 10^5000 --points 400 --prec 256 -o "$T/keep.svg" 2>/dev/null &
pid=$!
sleep 1
kill -TERM $pid 2>/dev/null
wait $pid 2>/dev/null
check "interrupted run keeps the old file" test "$(cat "$T/keep.svg")" = "old"
check "interrupted run leaves no temporary file" no_temp "$T"

# `embz report`: four formats for three families on short ranges
REP="inverse power geometric --from 10 --to 10^12 --points 6 --sizes 1000,10^30 --eps 0.05 --prec 64"
for fmt in html md tex pdf; do
    check "report $fmt" "$EMBZ" report $REP -o "$T/cmp.$fmt" -q
done
check "report html has the table" grep -q "<table" "$T/cmp.html"
check "report html inlines its figures" grep -q "<svg" "$T/cmp.html"
check "report html loads nothing" bash -c "! grep -Eqi '<script|src=\"http|href=\"http' '$T/cmp.html'"
check "report tex uses booktabs" bash -c "grep -q toprule '$T/cmp.tex' && grep -q bottomrule '$T/cmp.tex'"
check "report pdf header" bash -c "head -c 5 '$T/cmp.pdf' | grep -q '%PDF-'"
if command -v pdftoppm >/dev/null; then
    check "report pdf renders" pdftoppm -r 30 -png -f 1 -l 1 "$T/cmp.pdf" "$T/cmp"
    check "report pdf page image" png_ok "$T/cmp-1.png"
fi
# --format wins over the extension; the format also comes from the extension alone
check "format option" "$EMBZ" report inverse --from 10 --to 10^6 --points 5 --sizes 1000 --eps 0.1 -q --format md -o "$T/fmt.txt"
check "format option gives markdown" grep -q '^| family' "$T/fmt.txt"

# The table holds the numbers of `embz error --json` and `embz size --qubits --json` (same
# precision): errors agree to the digits shown, sizes and qubits are the same.
for f in inverse power geometric; do
    for n in 1000 10^30; do
        "$EMBZ" error $f -n $n --prec 64 --json > "$T/err-$f-${n/^/_}.json"
    done
    "$EMBZ" size $f --eps 0.05 --qubits --prec 64 --json > "$T/size-$f.json"
done
"$EMBZ" optimal --eps 0.05 --json > "$T/opt-eps.json"
for n in 1000 10^30; do "$EMBZ" optimal -n $n --json > "$T/opt-${n/^/_}.json"; done
check "table matches --json" /usr/bin/python3 - "$T" <<'PY'
import json, re, sys
from fractions import Fraction
T = sys.argv[1]
SUP = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻", "0123456789-")
rows = {}
head = None
# every table of the document (key table, classification, errors and sizes), merged by family;
# the key table's names are links to the notes
for line in open(T + "/cmp.md", encoding="utf-8"):
    if not line.startswith("|"):
        head = None
        continue
    if line.startswith("|:") or line.startswith("|-"):
        continue
    cells = [c.strip().replace("\\", "") for c in re.split(r"(?<!\\)\|", line.strip())[1:-1]]
    cells[0] = re.sub(r"^\[(.*)\]\(#fam-\d+\)$", r"\1", cells[0])
    # powers are set as Unicode superscripts (10³⁰): back to 10^30
    cells = [re.sub("[⁰¹²³⁴⁵⁶⁷⁸⁹⁻]+", lambda m: "^" + m.group(0).translate(SUP), c) for c in cells]
    if head is None:
        head = cells
    else:
        rows.setdefault(cells[0].split(" ")[0], {}).update(dict(zip(head, cells)))
assert set(rows) == {"inverse", "power", "geometric", "optimal"}, rows.keys()
bad = []
# the optimum's row: the closed form of docs/optimal.md as `embz optimal` prints it (its
# theorem is checked against the certified linear program in tests/test_optimal.c)
opt = rows.pop("optimal")
o = json.load(open(T + "/opt-eps.json"))
if opt["qubits for E ≤ 0.05"] != str(o["qubits_per_side"]) or opt["n for E ≤ 0.05"] != o["n"]:
    bad.append(("optimal", "rank", opt["n for E ≤ 0.05"], opt["qubits for E ≤ 0.05"], o))
# [derived, docs/optimal.md section 3]: OPT_(2^18) = 1/(18 + 2) = 0.05 exactly, so the goal 0.05
# takes rank 2^18, 18 qubits per side
if o["n"] != str(2 ** 18) or o["qubits_per_side"] != 18:
    bad.append(("optimal", "2^18", o))
for n, key in (("1000", "E at n = 1000"), ("10_30", "E at n = 10^30")):
    j = json.load(open("%s/opt-%s.json" % (T, n)))
    shown = opt[key]
    digits = len(shown.split(".")[1])
    if abs(Fraction(j["optimum_fraction_lo"]) - Fraction(shown)) > Fraction(1, 10 ** digits):
        bad.append(("optimal", n, shown, j["optimum_fraction_lo"]))
for fam, row in rows.items():
    for n, key in (("1000", "E at n = 1000"), ("10_30", "E at n = 10^30")):
        j = json.load(open("%s/err-%s-%s.json" % (T, fam, n)))
        shown = row[key]
        digits = len(shown.split(".")[1]) if "." in shown else 0
        mid = (Fraction(j["error_lo"]) + Fraction(j["error_hi"])) / 2
        # the shown digits must enclose the certified value of the other command
        if abs(mid - Fraction(shown)) > Fraction(1, 10 ** digits) or digits < 3:
            bad.append((fam, n, shown, j["error_lo"]))
    s = json.load(open("%s/size-%s.json" % (T, fam)))["goals"][0]
    ncell, qcell = row["n for E ≤ 0.05"], row["qubits for E ≤ 0.05"]
    if s["status"] == "found":
        if qcell != str(s["qubits"]):
            bad.append((fam, "qubits", qcell, s["qubits"]))
        num = ncell.lstrip("≤ ").strip()
        if "e+" in num:   # rounded up, 5 significant digits
            ok = Fraction(int(s["n"])) <= Fraction(num) <= Fraction(int(s["n"])) * Fraction(10001, 10000)
        else:
            ok = num == s["n"]
        if not ok:
            bad.append((fam, "n", ncell, s["n"]))
        # extra qubits: the family's qubits minus the optimum's, as `embz size --vs-optimal`
        if row["extra qubits for E ≤ 0.05"] != str(s["qubits"] - o["qubits_per_side"]):
            bad.append((fam, "extra", row["extra qubits for E ≤ 0.05"], s["qubits"]))
    else:
        if row["extra qubits for E ≤ 0.05"] != "–":
            bad.append((fam, "extra when not found", row["extra qubits for E ≤ 0.05"]))
        if s["status"] != "not_reached" or ncell not in ("never", "not by 10^924"):
            bad.append((fam, "status", ncell, s["status"]))
# [derived, docs/math.md section 5]: the power family a = -1/2 never gets below 1 - 1/sqrt 2
if rows["power"]["n for E ≤ 0.05"] != "never":
    bad.append(("power", "never", rows["power"]["n for E ≤ 0.05"]))
# the one-ebit limit 1 - 2^-(1/2) = 0.29289321881... [derived, docs/math.md section 5]
if not rows["power"]["limit of E"].startswith("0.292893"):
    bad.append(("power", "limit", rows["power"]["limit of E"]))
if bad:
    print(bad)
    sys.exit(1)
PY

check "every format has the extra column" bash -c "grep -q 'extra qubits for E' '$T/cmp.html' \
    && grep -q 'extra qubits for E' '$T/cmp.tex' && grep -q 'optimal state (dyadic)' '$T/cmp.tex'"
if command -v pdftotext >/dev/null; then
    check "pdf table has the optimum's row" bash -c "pdftotext '$T/cmp.pdf' - | grep -q 'optimal state'"
fi
check "report notes name docs/optimal.md" grep -q "docs/optimal.md" "$T/cmp.md"
check "report figure caption names the optimum" grep -q "Dashed grey: the optimum" "$T/cmp.html"
# a target that is not uniform: the optimum is not known, the cells say n/a
check "report for a target vector" "$EMBZ" report inverse --target 0.6,0.4 --from 10 --to 10^6 \
    --points 5 --sizes 1000 --eps 0.1 -q -o "$T/vec.md"
check "target vector: extra qubits n/a" bash -c "grep '^| inverse ' '$T/vec.md' | grep -q '| n/a |$'"
check "target vector: the optimum's row n/a" bash -c "grep '^| optimal state ' '$T/vec.md' | grep -q 'n/a'"
check "target vector: no optimum in the caption" bash -c "! grep -q 'Dashed grey' '$T/vec.md'"

# escaping: a family file whose name is markup
printf 'name = <script>alert(1)</script>\ndescription = markup in a name\nweight = 1/i\n' > "$T/evil.fam"
check "report with a markup name" "$EMBZ" report "$T/evil.fam" --from 10 --to 10^6 --points 5 --sizes 1000 --eps 0.1 -q -o "$T/evil.html"
check "markup name escaped in html" grep -q '&lt;script&gt;alert(1)&lt;/script&gt;' "$T/evil.html"
check "no script element in html" bash -c "! grep -qi '<script' '$T/evil.html'"
check "markup name escaped in markdown" "$EMBZ" report "$T/evil.fam" --from 10 --to 10^6 --points 5 --sizes 1000 --eps 0.1 -q -o "$T/evil.md"
check "markdown has no raw tag" bash -c "! grep -Pq '(?<!\\\\)<script' '$T/evil.md'"

# a verdict map for a parameter grid
check "report with --grid" "$EMBZ" report power --grid a=-1.4:-0.6:3 --from 10 --to 10^12 --points 6 --sizes 1000 --eps 0.1 -q -o "$T/grid.html"
# power is not an embezzler: errors against n, the weights and the map (no ln n figure)
check "grid adds a third figure" test "$(grep -o '<figure ' "$T/grid.html" | wc -l)" -eq 3
check "grid html has no script" bash -c "! grep -qi '<script' '$T/grid.html'"

# usage errors: exit 2 and no file
"$EMBZ" report inverse --format doc -o "$T/u1.html" 2>/dev/null; check "bad format exit 2" test $? -eq 2
"$EMBZ" report inverse -o "$T/u2.xyz" 2>/dev/null; check "unknown extension exit 2" test $? -eq 2
"$EMBZ" report inverse --eps 2 -o "$T/u3.html" 2>/dev/null; check "bad goal exit 2" test $? -eq 2
"$EMBZ" report no_such_family_zz -o "$T/u4.html" 2>/dev/null; check "unknown family exit 2" test $? -eq 2
"$EMBZ" report inverse --grid zz=0:1:2 -o "$T/u5.html" 2>/dev/null; check "grid without parameter exit 2" test $? -eq 2
check "usage errors write nothing" bash -c "! ls '$T'/u[1-5].* 2>/dev/null | grep -q ."

# an interrupted report (a job far longer than the 1 s before the signal) keeps the old file
# and leaves no temporary file; with no old file
# there is no file at all
echo "old" > "$T/keep.html"
"$EMBZ" report inverse iterlog logpower --to 10^1000 --points 400 -q -o "$T/keep.html" 2>/dev/null &
pid=$!
sleep 1
kill -TERM $pid 2>/dev/null
wait $pid 2>/dev/null
check "interrupted report keeps the old file" test "$(cat "$T/keep.html")" = "old"
"$EMBZ" report inverse iterlog logpower --to 10^1000 --points 400 -q -o "$T/none.pdf" 2>/dev/null &
pid=$!
sleep 1
kill -TERM $pid 2>/dev/null
wait $pid 2>/dev/null
check "interrupted report writes no file" test ! -e "$T/none.pdf"
check "interrupted report leaves no temporary file" no_temp "$T"

# the demo: exit 0 within 5 minutes (also under sanitizers), the table on stdout, the report
mkdir "$T/demo"
start=$(date +%s)
( cd "$T/demo" && timeout 300 "$EMBZ" demo -q > out.txt 2> err.txt )
st=$?
echo "demo took $(( $(date +%s) - start )) s"
check "demo exit 0 within 5 minutes" test $st -eq 0
check "demo prints the table" grep -q "^family .*verdict .*qubits/side" "$T/demo/out.txt"
# [derived, docs/math.md section 6]: E_n(u_4) for 1/i is about ln 4 / ln n, so the inverse
# family needs n near 10^600 (about 2000 qubits) for 1e-3 and the power family never
check "demo: inverse needs about 2000 qubits" bash -c "grep '^inverse ' '$T/demo/out.txt' | grep -Eq ' (199[0-9]|200[0-9]) '"
check "demo: power never" bash -c "grep '^power ' '$T/demo/out.txt' | grep -q never"
# the optimum's line equals `embz optimal --eps`, and the inverse family's extra qubits are its
# qubits minus the optimum's
"$EMBZ" optimal --eps 1e-3 --target ebits:2 --json > "$T/opt-demo.json"
check "demo: the optimum's qubits" /usr/bin/python3 - "$T" <<'PY'
import json, re, sys
T = sys.argv[1]
o = json.load(open(T + "/opt-demo.json"))
text = open(T + "/demo/out.txt", encoding="utf-8").read()
m = re.search(r"^Optimum over all states .*: (\d+) qubits/side for E<=1e-3", text, re.M)
assert m and int(m.group(1)) == o["qubits_per_side"], (m and m.group(1), o)
head = next(l for l in text.splitlines() if l.startswith("family "))
inv = next(l for l in text.splitlines() if l.startswith("inverse "))
cols = re.split(r"\s{2,}", inv)
names = re.split(r"\s{2,}", head)
row = dict(zip(names, cols))
assert int(row["extra"]) == int(row["qubits/side E<=1e-3"]) - o["qubits_per_side"], row
PY
check "demo names the report" grep -q "embz-demo.html" "$T/demo/out.txt"
check "demo wrote the html" grep -q "<table" "$T/demo/embz-demo.html"
check "demo leaves no temporary file" no_temp "$T/demo"

# ---- layout as a reader sees it: the demo and a three-family report
LAYOUT="/usr/bin/python3 $(dirname "$0")/report_layout.py"
THREE=("inverse" "power (a=-1/2)" "geometric (r=9/10)")
DEMO=("inverse" "logpower (b=1/2)" "tilted" "iterlog" "nearmiss" "geometric (r=9/10)"
      "power (a=-1/2)" "uniform")
check "demo pdf" bash -c "cd '$T/demo' && '$EMBZ' demo -q -o demo.pdf > /dev/null"
# three families with the defaults (two goals, three sizes: the widest key table by default)
for fmt in html pdf; do
    check "three-family report $fmt" "$EMBZ" report inverse power geometric -q -o "$T/three.$fmt"
done
if command -v pdftoppm >/dev/null && command -v pdftotext >/dev/null; then
    pdf_layout() {   # pdf_layout FILE.pdf NAME...: words inside the page, tables whole, names whole
        local f=$1; shift
        rm -f "$f".page*
        pdftotext -bbox "$f" "$f.bbox.html" && pdftotext -raw "$f" "$f.txt" \
            && pdftoppm -r 40 -gray "$f" "$f.page" && $LAYOUT pdf "$f.bbox.html" "$f.txt" \
            $(ls "$f".page*.pgm | sort -V) -- "$@"
    }
    check "pdf layout: three families" pdf_layout "$T/three.pdf" "${THREE[@]}"
    check "pdf layout: three families, one goal" pdf_layout "$T/cmp.pdf" "${THREE[@]}"
    check "pdf layout: demo" pdf_layout "$T/demo/demo.pdf" "${DEMO[@]}"
fi
if [ -x /usr/bin/chromium ]; then
    html_layout() {   # html_layout FILE.html NAME...: at 1280 x 900, measured in the browser
        local f=$1; shift
        $LAYOUT inject "$f" "$f.m.html" || return 1
        timeout 120 /usr/bin/chromium --headless --no-sandbox --disable-gpu --disable-quic \
            --no-first-run --disable-background-networking --disable-component-update \
            --disable-sync --user-data-dir="$T/prof" --window-size=1280,900 \
            --dump-dom "file://$f.m.html" > "$f.dom" 2>/dev/null || return 1
        $LAYOUT html "$f.dom" "$@" || return 1
        # and the picture a reader gets, 1280 px wide
        timeout 120 /usr/bin/chromium --headless --no-sandbox --disable-gpu --disable-quic \
            --no-first-run --disable-background-networking --disable-component-update \
            --disable-sync --user-data-dir="$T/prof" --window-size=1280,900 \
            --screenshot="$f.png" "file://$f" >/dev/null 2>&1 || return 1
        png_ok "$f.png" && [ "$(od -An -tu1 -j16 -N4 "$f.png" | awk '{print $1*16777216+$2*65536+$3*256+$4}')" = 1280 ]
    }
    check "html layout: three families at 1280 px" html_layout "$T/three.html" "${THREE[@]}"
    check "html layout: demo at 1280 px" html_layout "$T/demo/embz-demo.html" "${DEMO[@]}"
fi
# Markdown and LaTeX link figure files written beside them
check "markdown links its figures" bash -c "grep -q '^!\[Figure 1\](<cmp-fig1.svg>)' '$T/cmp.md' && test -s '$T/cmp-fig1.svg'"
check "markdown figure parses" xml_ok "$T/cmp-fig1.svg"
check "report prints the figure files" bash -c "'$EMBZ' report inverse --from 10 --to 10^6 --points 5 \
    --sizes 1000 --eps 0.1 -q -o '$T/pf.md' | diff - <(printf '%s\n' '$T/pf.md' '$T/pf-fig1.svg' '$T/pf-fig2.svg' '$T/pf-fig3.svg')"
check "latex includes its figures" bash -c "grep -q 'includegraphics\[width=\\\\textwidth\]{cmp-fig1.pdf}' '$T/cmp.tex' && head -c 5 '$T/cmp-fig1.pdf' | grep -q '%PDF-'"
check "latex typesets powers" grep -q 'E at n = \$10^{30}\$' "$T/cmp.tex"
# the LaTeX document compiles as it is, with its figures beside it (pdflatex, Debian's
# texlive-latex-base and -recommended; skipped where they are absent), and no line overflows
# the text width by more than a hair
if command -v pdflatex >/dev/null; then
    check "latex compiles" bash -c "cd '$T' && timeout 300 pdflatex -interaction=nonstopmode \
        -halt-on-error cmp.tex >cmp.texlog 2>&1 && pdftoppm -r 20 -png -f 1 -l 1 cmp.pdf cmppg"
    check "latex: no line much too wide" bash -c "! grep -E 'Overfull .hbox \(([1-9][0-9]|[5-9])\.' '$T/cmp.log'"
else
    echo "pdflatex absent: skipping the LaTeX compile"
fi
check "html typesets powers" grep -q '<msup><mrow><mn>10</mn></mrow><mrow><mn>30</mn></mrow></msup>' "$T/cmp.html"

# `embz report` with the defaults: HTML, escaping, Chromium screenshot
# a size without an enclosure: '–' in the table, and the notes say why
check "report of an uncertified size" "$EMBZ" report '1/(i+n/10)' --sizes 10^1000 --points 6 \
    --to 10^20 --eps 0.3 -o "$T/nc.md"
check "the notes name the reason" grep -q "E at n = 10¹⁰⁰⁰: not certified (the weight" "$T/nc.md"
check "report with the defaults" "$EMBZ" report inverse -o "$T/r.html" --format html -q
if [ -s "$T/r.html" ]; then
    check "report html" grep -q "<table" "$T/r.html"
    check "report html has no script" bash -c "! grep -qi '<script' '$T/r.html'"
    if [ -x /usr/bin/chromium ]; then
        check "chromium screenshot" timeout 120 /usr/bin/chromium --headless --no-sandbox \
            --disable-gpu --disable-quic --no-first-run --disable-background-networking \
            --disable-component-update --disable-sync --user-data-dir="$T/prof" \
            --screenshot="$T/shot.png" --window-size=1200,900 "file://$T/r.html"
        check "screenshot png" png_ok "$T/shot.png"
    else
        echo "chromium absent: skipping the screenshot"
        [ $fail = 0 ] && exit 77
    fi
fi
exit $fail
