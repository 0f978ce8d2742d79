#!/bin/bash
# Compares `embz error ... --json` with plain-definition values computed by Debian's
# python3-mpmath at 50 digits. Skips (exit 77) when mpmath is not available.
# Usage: test_reference.sh PATH_TO_EMBZ
set -u
EMBZ="${1:?usage: test_reference.sh PATH_TO_EMBZ}"
PY=/usr/bin/python3
HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
if [ ! -x "$PY" ] || ! "$PY" -c "import mpmath" >/dev/null 2>&1; then
    echo "SKIP: /usr/bin/python3 with mpmath not available"
    exit 77
fi
exec "$PY" "$HERE/reference_mpmath.py" "$EMBZ"
