#!/bin/bash
# Output files of the commands that write them (report, demo, plot): symbolic links followed
# to their targets, permissions (and as root owner and group) kept, hard links and non-regular
# files refused, "-" and /dev/stdout streamed to standard output, write errors, and SIGINT /
# SIGTERM arriving while the file is being written. $1 = the embz binary.
source "$(dirname "$0")/common.sh"
[ -e "$EMBZ" ] && EMBZ=$(realpath "$EMBZ")
D=$TMP/d
mkdir "$D"
# a small report: well under a second
R=(inverse --from 10 --to 10^4 --points 5 -n 1000 --eps 0.1 -q)
P=(inverse --to 1000 --points 3)

expect() {  # expect DESCRIPTION COMMAND...: the command must succeed
    local what=$1; shift
    if "$@"; then ok; else fail "$what"; fi
}
run_bin() {  # run_bin ARGS...: like run, for binary standard output (kept in $TMP/out only)
    "$EMBZ" "$@" >"$TMP/out" 2>"$TMP/err"
    rc=$?
    err=$(cat "$TMP/err")
}
no_temp() { ! find "$1" -name '*.part-*' | grep -q .; }
content_is() { [ "$(cat "$1")" = "$2" ]; }
mode_of() { stat -c %a "$1"; }

# ---- a symbolic link: the target is written, the link stays
echo old > "$D/real.md"
ln -s real.md "$D/link.md"
run report "${R[@]}" -o "$D/link.md"; expect_rc 0 "report through a link"
expect "the link is still a link" test -L "$D/link.md"
expect "the link still points to its target" test "$(readlink "$D/link.md")" = real.md
expect "the target holds the report" grep -q '^| family' "$D/real.md"
expect_out "$D/link.md" "the name as given is printed"
# a relative link into another directory: the temporary file goes beside the target
mkdir "$D/a" "$D/b"
echo old > "$D/b/t.svg"
ln -s ../b/t.svg "$D/a/l.svg"
run plot "${P[@]}" -o "$D/a/l.svg"; expect_rc 0 "plot through a link to another directory"
expect "link to another directory kept" test -L "$D/a/l.svg"
expect "target in the other directory written" grep -q '<svg' "$D/b/t.svg"
# a dangling link: its target is created
ln -s made.md "$D/dangling.md"
run report "${R[@]}" -o "$D/dangling.md"; expect_rc 0 "report through a dangling link"
expect "dangling link's target created" grep -q '^| family' "$D/made.md"
expect "dangling link kept" test -L "$D/dangling.md"

# ---- the mode of an existing file is kept; as root also its owner and group
echo old > "$D/private.md"
chmod 600 "$D/private.md"
run report "${R[@]}" -o "$D/private.md"; expect_rc 0 "report over a mode-600 file"
expect "mode 600 kept" test "$(mode_of "$D/private.md")" = 600
expect "mode-600 file replaced" grep -q '^| family' "$D/private.md"
echo old > "$D/group.svg"
chmod 640 "$D/group.svg"
run plot "${P[@]}" -o "$D/group.svg"; expect_rc 0 "plot over a mode-640 file"
expect "mode 640 kept" test "$(mode_of "$D/group.svg")" = 640
if [ "$(id -u)" = 0 ]; then
    echo old > "$D/owned.md"
    chown 65534:65534 "$D/owned.md"
    run report "${R[@]}" -o "$D/owned.md"; expect_rc 0 "report over another user's file"
    expect "owner and group kept (root)" test "$(stat -c %u:%g "$D/owned.md")" = 65534:65534
fi

# ---- a file with two hard links is refused (exit 2), both names keep their text
echo old > "$D/h1.md"
ln "$D/h1.md" "$D/h2.md"
run report "${R[@]}" -o "$D/h1.md"; expect_rc 2 "hard-linked file refused"
expect_err "$D/h1.md" "refusal names the file"
expect_err "2 hard links" "refusal says why"
expect "first name unchanged" content_is "$D/h1.md" old
expect "second name unchanged" content_is "$D/h2.md" old
expect "still two links" test "$(stat -c %h "$D/h1.md")" = 2

# ---- non-regular outputs are refused (exit 2) and left alone
mkfifo "$D/fifo.md"
run report "${R[@]}" -o "$D/fifo.md"; expect_rc 2 "fifo refused"
expect_err "$D/fifo.md: it is a fifo, not a regular file" "fifo refusal names the path"
expect "fifo still a fifo" test -p "$D/fifo.md"
mkdir "$D/dir.svg"
run plot "${P[@]}" -o "$D/dir.svg"; expect_rc 2 "directory refused by plot"
expect_err "$D/dir.svg: it is a directory" "directory refusal names the path"
expect "directory left empty" test -z "$(ls -A "$D/dir.svg")"
run demo -q -o "$D/dir.svg" --format html; expect_rc 2 "directory refused by demo"
ln -s dir.svg "$D/dirlink.html"
run report "${R[@]}" -o "$D/dirlink.html"; expect_rc 2 "link to a directory refused"
expect_err "a link to $D/dir.svg" "refusal names the link's target"
expect "link to a directory kept" test -L "$D/dirlink.html"
# /dev/full is a device: refused, not replaced, no temporary file beside it
run report "${R[@]}" --format md -o /dev/full; expect_rc 2 "/dev/full refused"
expect_err "/dev/full: it is a character device" "device refusal names the path"
expect "/dev/full still a device" test -c /dev/full
expect "no temporary file in /dev" no_temp /dev
run plot "${P[@]}" --format svg -o /dev/null; expect_rc 2 "/dev/null refused by plot"
expect "/dev/null still a device" test -c /dev/null
# /dev/stderr is an open descriptor, not a file
run report "${R[@]}" --format md -o /dev/stderr; expect_rc 2 "/dev/stderr refused"
expect_err "open file descriptor" "descriptor refusal says why"

# ---- "-" streams to standard output: the same bytes as the file, and no file name after them
run report "${R[@]}" --format md -o "$D/file.md"; expect_rc 0 "report to a file"
run report "${R[@]}" --format md -o -; expect_rc 0 "report to -"
# a file gets its figures beside it (file-fig1.svg, linked); standard output cannot, and says
# so where the link would be: the rest is the same bytes
nofig() { grep -v -e '^!\[Figure [0-9]*\](<' -e '^(Figure [0-9]* is written beside' "$1"; }
expect "report on stdout equals the file" cmp -s <(nofig "$TMP/out") <(nofig "$D/file.md")
expect "figures beside the file" test -s "$D/file-fig1.svg"
run report "${R[@]}" -o -; expect_rc 0 "report to - (html by default)"
expect "html on stdout" bash -c "head -c 15 '$TMP/out' | grep -qi '<!doctype html'"
expect "stdout ends with the document" test "$(tail -n 1 "$TMP/out")" = "</html>"
run_bin report "${R[@]}" --format pdf -o /dev/stdout; expect_rc 0 "report to /dev/stdout"
expect "pdf on stdout" bash -c "head -c 5 '$TMP/out' | grep -q '%PDF-'"
expect "/dev/stdout still a link" test -L /dev/stdout
run plot "${P[@]}" -o -; expect_rc 0 "plot to -"
expect "plot svg on stdout parses" $PY -c 'import sys, xml.etree.ElementTree as E; E.parse(sys.argv[1])' "$TMP/out"
expect_err "wrote standard output" "plot says where it wrote"
run_bin plot "${P[@]}" -o - --format png; expect_rc 0 "plot png to -"
expect "png signature on stdout" test "$(head -c 8 "$TMP/out" | od -An -tx1 | tr -d ' \n')" = 89504e470d0a1a0a
run plot "${P[@]}" -o - --format gif; expect_rc 2 "unknown plot format"
run demo -q -o - --format md; expect_rc 0 "demo to -"
expect "demo report on stdout" bash -c "head -n 1 '$TMP/out' | grep -q '^# Embezzling two ebits'"
expect_err "Report: standard output" "demo table on stderr"
if printf '%s' "$err" | grep -q '^family .*verdict'; then ok; else fail "demo table on stderr"; fi
if printf '%s' "$out" | grep -q '^family .*verdict'; then fail "demo table in the document stream"; else ok; fi

# ---- write errors: exit 1 with the reason; the old file stays, no temporary file
"$EMBZ" report "${R[@]}" -o - > /dev/full 2> "$TMP/err"; rc=$?; err=$(cat "$TMP/err")
expect_rc 1 "report to a full standard output"
expect_err "cannot write standard output: No space left on device" "ENOSPC message"
"$EMBZ" plot "${P[@]}" -o - > /dev/full 2> "$TMP/err"; rc=$?; err=$(cat "$TMP/err")
expect_rc 1 "plot to a full standard output"
expect_err "No space left on device" "plot ENOSPC message"
# a file size limit with SIGXFSZ ignored: write() fails with EFBIG
echo old > "$D/big.html"
( ulimit -f 2; trap '' XFSZ; exec "$EMBZ" report "${R[@]}" -o "$D/big.html" ) 2> "$TMP/err"
rc=$?; err=$(cat "$TMP/err")
expect_rc 1 "report beyond the file size limit"
expect_err "cannot write $D/big.html: File too large" "EFBIG message"
expect "old file kept after a write error" content_is "$D/big.html" old
expect "no temporary file after a write error" no_temp "$D"
# the same limit with SIGXFSZ at its default: the signal ends the run, the handler cleans up
if env --default-signal=XFSZ true 2>/dev/null; then
    # (the braces keep bash's "File size limit exceeded" notice off the log)
    { ( ulimit -f 2; exec env --default-signal=XFSZ "$EMBZ" report "${R[@]}" -o "$D/big.html" ); } \
        2>/dev/null
    rc=$?
    expect_rc $((128 + $(kill -l XFSZ))) "report killed by SIGXFSZ"
    expect "old file kept after SIGXFSZ" content_is "$D/big.html" old
    expect "no temporary file after SIGXFSZ" no_temp "$D"
fi

# ---- SIGINT and SIGTERM while the temporary file exists. The helper starts the command with
# both signals at their defaults, watches the directory, and sends the signal as soon as a
# .part- file appears (report and demo then render a PDF, about 20-50 ms). The command must die
# by that signal, leave no temporary file, and leave the old file or a complete new one. A
# run that finishes before the file is seen is retried; never seeing it is a failure.
cat > "$TMP/interrupt.py" <<'PY'
import os, signal, subprocess, sys, time
d, name, keep, tries = sys.argv[1], sys.argv[2], sys.argv[3], int(sys.argv[4])
cmd = sys.argv[5:]
sig = getattr(signal, "SIG" + name)
def defaults():
    signal.signal(signal.SIGINT, signal.SIG_DFL)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
def temps():
    return [n for n in os.listdir(d) if ".part-" in n]
for attempt in range(tries):
    with open(keep, "w") as f:
        f.write("old\n")
    p = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                         preexec_fn=defaults)
    sent = False
    while p.poll() is None:
        if temps():
            p.send_signal(sig)
            sent = True
            break
        time.sleep(0.001)
    rc = p.wait()
    left = temps()
    if left:
        sys.exit("SIG%s: temporary file left: %s (exit %d)" % (name, left, rc))
    data = open(keep, "rb").read()
    if data != b"old\n" and not (data.startswith(b"%PDF-") and b"%%EOF" in data[-32:]):
        sys.exit("SIG%s: the file is neither the old one nor a complete PDF" % name)
    if sent and rc != 0:
        if rc != -sig:
            sys.exit("SIG%s: exit status %d, expected death by the signal" % (name, rc))
        print("SIG%s caught the write in run %d" % (name, attempt + 1))
        sys.exit(0)
sys.exit("SIG%s: never saw the temporary file in %d runs" % (name, tries))
PY
mkdir "$D/sig"
for s in INT TERM; do
    if $PY "$TMP/interrupt.py" "$D/sig" $s "$D/sig/r.pdf" 8 \
           "$EMBZ" report inverse geometric --from 10 --to 10^4 --points 5 -n 1000 \
           --eps 0.1 -j 2 -q -o "$D/sig/r.pdf"; then ok; else fail "SIG$s during report"; fi
done
if $PY "$TMP/interrupt.py" "$D/sig" INT "$D/sig/d.pdf" 3 "$EMBZ" demo -q -o "$D/sig/d.pdf"; then
    ok; else fail "SIGINT during demo"; fi

expect "no temporary file anywhere" no_temp "$D"
echo "$((checks - fails)) passed, $fails failed"
[ "$fails" -eq 0 ]
