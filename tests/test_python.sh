#!/bin/bash
# The Python package (python/embz) from the build tree: pytest over python/tests, with
# EMBZ_LIBRARY pointing at the built libembz.so and EMBZ_CLI at the built tool (the tests
# compare against its JSON). Skipped (77) in sanitizer and fuzz builds: an instrumented
# library cannot be dlopen'ed into python without preloading the sanitizer runtime.
# $1 python, $2 source dir, $3 libembz.so, $4 embz binary, $5 b_sanitize ('fuzzer' for
# -Dfuzz=true), then pytest arguments (the test files, -k ...).
set -u
PY=$1 SRC=$(realpath "$2") LIB=$(realpath "$3") EMBZ=$(realpath "$4") SAN=${5:-none}
shift 5
if [ "$SAN" != "none" ]; then
    echo "sanitizer build: libembz is instrumented, python cannot load it"
    exit 77
fi
export EMBZ_LIBRARY="$LIB" EMBZ_CLI="$EMBZ" PYTHONPATH="$SRC/python${PYTHONPATH:+:$PYTHONPATH}"
export PYTHONDONTWRITEBYTECODE=1
cd "$SRC"
exec "$PY" -m pytest -q -p no:cacheprovider "$@"
