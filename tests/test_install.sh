#!/bin/bash
# The installed library: `meson install` into a temporary folder, then examples/certified_error.c
# is compiled against that prefix with pkg-config alone and must print the same certified E as
# `embz error` for the same weight; examples/sizes_workspace.c (the evaluator, one workspace
# for several sizes) must give enclosures overlapping those of `embz error`. The public
# headers are installed, the private ones are not.
# The Python package is installed too: `import embz` from the installed site directory (with
# no EMBZ_LIBRARY) must find the installed libembz through embz/_paths.py and print the same
# certified E.
# $1 build dir, $2 source dir, $3 embz binary, $4 b_sanitize of the build ('fuzzer' for a
# -Dfuzz=true build, whose library is instrumented by hand), $5 the python of the build.
set -u
BUILD=$1 SRC=$2 EMBZ=$3 SAN=${4:-none} PY=${5:-python3}
if [ "$SAN" != "none" ]; then
    echo "sanitizer build: the example is not built against an instrumented library"
    exit 77
fi
command -v pkg-config >/dev/null || { echo "pkg-config absent"; exit 77; }
D=$(mktemp -d)
trap 'rm -rf "$D"' EXIT
fail=0
if ! meson install -C "$BUILD" --destdir "$D/root" --quiet >"$D/install.log" 2>&1; then
    cat "$D/install.log"; echo "FAIL meson install"; exit 1
fi
pc=$(find "$D/root" -name embz.pc | head -1)
[ -n "$pc" ] || { echo "FAIL no embz.pc installed"; exit 1; }
prefix=$(sed -n 's/^prefix=//p' "$pc")
mkdir "$D/pc"
sed "s|^prefix=.*|prefix=$D/root$prefix|" "$pc" >"$D/pc/embz.pc"
for f in include/embz.h include/embz/flint.h include/embz/measure.h include/embz/error.h \
         include/embz/compare.h include/embz/util.h; do
    [ -f "$D/root$prefix/$f" ] || { echo "FAIL $f not installed"; fail=1; }
done
# private headers stay in the source tree
for f in sum.h impl.h expr_impl.h asym_impl.h render_impl.h output.h; do
    [ -z "$(find "$D/root" -name "$f" | head -1)" ] || { echo "FAIL private header $f installed"; fail=1; }
done
[ -n "$(find "$D/root" -name 'libembz.so*' | head -1)" ] || { echo "FAIL no shared library"; fail=1; }
[ -n "$(find "$D/root" -name 'libembz.a' | head -1)" ] || { echo "FAIL no static library"; fail=1; }
[ -n "$(find "$D/root" -name 'embz.1*' | head -1)" ] || { echo "FAIL no man page"; fail=1; }
[ -n "$(find "$D/root" -path '*bash-completion/completions/embz' | head -1)" ] || { echo "FAIL no bash completion"; fail=1; }
[ -n "$(find "$D/root" -path '*embz/families/inverse.fam' | head -1)" ] || { echo "FAIL no family library"; fail=1; }
flags=$(PKG_CONFIG_PATH="$D/pc" pkg-config --cflags --libs embz) || { echo "FAIL pkg-config"; exit 1; }
case "$flags" in *"$BUILD"*|*"$SRC"*) echo "FAIL pkg-config points into the build or source tree: $flags"; fail=1;; esac
if ! cc -std=c11 -o "$D/example" "$SRC/examples/certified_error.c" $flags 2>"$D/cc.log"; then
    cat "$D/cc.log"; echo "FAIL the example does not compile against the installed prefix"; exit 1
fi
libdir=$(dirname "$(find "$D/root" -name 'libembz.so' | head -1)")
out=$(LD_LIBRARY_PATH="$libdir" "$D/example" '1/(i*log(i+1))') || { echo "FAIL example run"; exit 1; }
echo "$out"
want=$("$EMBZ" error '1/(i*log(i+1))' -n 10^30 | sed -n 's/^error *\([0-9.e-]*\) .*/\1/p')
case "$out" in
    *": $want (certified digits)") echo "ok   example agrees with embz error ($want)";;
    *) echo "FAIL example says '$out', embz error says '$want'"; fail=1;;
esac
# the evaluator with one workspace over several sizes: each enclosure overlaps the one of
# `embz error` at that size (different engines, so the balls need not be identical)
if ! cc -std=c11 -o "$D/sizes" "$SRC/examples/sizes_workspace.c" $flags 2>"$D/cc2.log"; then
    cat "$D/cc2.log"; echo "FAIL sizes_workspace.c does not compile against the installed prefix"
    fail=1
else
    LD_LIBRARY_PATH="$libdir" "$D/sizes" '1/i' ebits:2 10^100 10^30 100000 >"$D/sizes.out" \
        || { echo "FAIL sizes_workspace run"; fail=1; }
    cat "$D/sizes.out"
    while read -r n lo hi how; do
        "$EMBZ" error '1/i' -n "$n" --target ebits:2 --prec 128 --json >"$D/e.json"
        if python3 -c '
import json, sys
from fractions import Fraction as F
e = json.load(open(sys.argv[1])); lo, hi = F(sys.argv[2]), F(sys.argv[3])
sys.exit(0 if lo <= F(e["error_hi"]) and F(e["error_lo"]) <= hi and hi - lo < F(1, 10**20) else 1)
' "$D/e.json" "$lo" "$hi"; then echo "ok   n = $n: overlaps embz error ($how)"
        else echo "FAIL n = $n: [$lo, $hi] against $(cat "$D/e.json")"; fail=1; fi
    done <"$D/sizes.out"
    [ "$(wc -l <"$D/sizes.out")" = 3 ] || { echo "FAIL sizes_workspace printed $(wc -l <"$D/sizes.out") lines"; fail=1; }
fi
# the Python package against the installed prefix (below the --destdir root)
init=$(find "$D/root" -path '*/embz/__init__.py' | head -1)
if [ -z "$init" ] || [ -z "$(find "$D/root" -path '*/embz/_paths.py' | head -1)" ]; then
    echo "FAIL the python package (embz/__init__.py, embz/_paths.py) is not installed"; fail=1
else
    site=$(dirname "$(dirname "$init")")
    want=$("$EMBZ" error '1/i' -n 10^30 | sed -n 's/^error *\([0-9.e-]*\) .*/\1/p')
    pyout=$(cd "$D" && env -u EMBZ_LIBRARY PYTHONPATH="$site" PYTHONDONTWRITEBYTECODE=1 "$PY" -c \
        "import embz; print(embz.error('1/i', n=10**30)); print(embz.LIBRARY_PATH); print(embz.__file__)" 2>&1)
    echo "$pyout"
    case "$pyout" in
        *"E = $want (certified digits)"*"$D/root"*"$D/root"*)
            echo "ok   python: import embz from the installed prefix agrees with embz error";;
        *) echo "FAIL python from the installed prefix: $pyout"; fail=1;;
    esac
fi
[ "$fail" = 0 ] && echo "1 passed, 0 failed" || echo "0 passed, 1 failed"
exit $fail
