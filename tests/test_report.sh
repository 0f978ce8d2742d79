#!/bin/bash
# Command-line checks of `embz plot` (and of `embz report` once it writes documents):
# outputs parse (XML via Python, PDF via pdftoppm, PNG signature), bad requests fail cleanly,
# failed writes leave no partial or temporary file. $1 = the embz binary.
set -u
EMBZ=${1:?usage: test_report.sh path/to/embz}
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

# an interrupted run (SIGTERM: background jobs of a script ignore SIGINT): the old file stays
echo "old" > "$T/keep.svg"
"$EMBZ" plot inverse iterlog --from 10 --to 10^2000 --points 40 -o "$T/keep.svg" 2>/dev/null &
pid=$!
sleep 1
kill -TERM $pid 2>/dev/null
wait $pid 2>/dev/null
check "interrupted run keeps the old file" test "$(cat "$T/keep.svg")" = "old"
check "interrupted run leaves no temporary file" no_temp "$T"

# `embz report`, once it writes documents: HTML, escaping, Chromium screenshot, PDF
if "$EMBZ" report inverse -o "$T/r.html" --format html >/dev/null 2>&1; then
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
