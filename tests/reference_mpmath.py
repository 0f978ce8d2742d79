"""Reference values of the embezzlement error E_n(q) = K(p -> p (x) q) by the plain definition,
computed with mpmath at 50 digits, compared with the certified interval printed by
`embz error FAMILY -n N --target T --json` (fields error_lo and error_hi).

Plain definition: p_i = w(i) / sum w, sorted non-increasing; r = all products p_i q_j, sorted
non-increasing; with p padded by zeros, K = max over k of (sum of the k largest p) - (sum of the
k largest r), k = 0 .. len(r).

Usage: reference_mpmath.py EMBZ_BINARY
Exit status: 0 all inside, 1 a mismatch or a failing run.
"""
import json
import subprocess
import sys

import mpmath
from mpmath import mp, mpf

mp.dps = 50
TOL = mpf("1e-40")

FAMILIES = [
    ("1/i", lambda i: 1 / mpf(i)),
    ("i^-0.5", lambda i: mpf(i) ** mpf("-0.5")),
    ("1/(i*log(i+1)^2)", lambda i: 1 / (mpf(i) * mpmath.log(i + 1) ** 2)),
    ("1+sin(i)^2", lambda i: 1 + mpmath.sin(i) ** 2),
    ("i^0.5", lambda i: mpmath.sqrt(i)),
]
TARGETS = [
    ("ebit", [mpf(1) / 2] * 2),
    ("ebits:2", [mpf(1) / 4] * 4),
    ("uniform:3", [mpf(1) / 3] * 3),
    ("0.7,0.2,0.1", [mpf("0.7"), mpf("0.2"), mpf("0.1")]),
]
SIZES = [1, 2, 7, 100, 1500]


def reference(weights, q):
    total = mpmath.fsum(weights)
    p = sorted((w / total for w in weights), reverse=True)
    r = sorted((pi * qj for pi in p for qj in q), reverse=True)
    best = mpf(0)
    sp = mpf(0)
    sr = mpf(0)
    for k in range(len(r)):
        if k < len(p):
            sp += p[k]
        sr += r[k]
        best = max(best, sp - sr)
    return best


def main():
    embz = sys.argv[1]
    failures = 0
    checks = 0
    for fname, fn in FAMILIES:
        for n in SIZES:
            weights = [fn(i) for i in range(1, n + 1)]
            for tname, q in TARGETS:
                ref = reference(weights, q)
                cmd = [embz, "error", fname, "-n", str(n), "--target", tname, "--json"]
                run = subprocess.run(cmd, capture_output=True, text=True)
                if run.returncode != 0:
                    print("FAIL (exit %d): %s\n%s" % (run.returncode, " ".join(cmd), run.stderr))
                    failures += 1
                    continue
                try:
                    data = json.loads(run.stdout)
                    lo = mpf(data["error_lo"])
                    hi = mpf(data["error_hi"])
                except (ValueError, KeyError) as exc:
                    print("FAIL (bad JSON: %s): %s\n%s" % (exc, " ".join(cmd), run.stdout))
                    failures += 1
                    continue
                checks += 1
                if not (lo - TOL <= ref <= hi + TOL):
                    print("FAIL: %s n=%d target=%s reference %s not in [%s, %s]"
                          % (fname, n, tname, mpmath.nstr(ref, 45), data["error_lo"],
                             data["error_hi"]))
                    failures += 1
                elif hi - lo > mpf("1e-20"):
                    print("FAIL: %s n=%d target=%s interval too wide: [%s, %s]"
                          % (fname, n, tname, data["error_lo"], data["error_hi"]))
                    failures += 1
    print("reference_mpmath: %d comparisons, %d failures" % (checks, failures))
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
