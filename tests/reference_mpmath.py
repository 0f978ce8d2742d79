"""Reference values of the embezzlement error E_n(q) = K(p -> p (x) q) by the plain definition,
computed with mpmath at 50 digits, compared with the certified interval printed by
`embz error FAMILY -n N --target T --json` (fields error_lo and error_hi).

Plain definition: p_i = w(i) / sum w, sorted non-increasing; r = all products p_i q_j, sorted
non-increasing; with p padded by zeros, K = max over k of (sum of the k largest p) - (sum of the
k largest r), k = 0 .. len(r).

Second part: the inverse-index family w_i = 1/i at astronomically large n (10^5 .. 10^1000) for
target vectors, from exact harmonic numbers (mpmath's digamma) at the breakpoints of the threshold
form next to the smallest weight (see corner_reference); that shortcut is itself checked against
the plain definition at n = 3000; and `embz size` for that family and a target vector must
return an n with E_(n-1) > eps >= E_n by these values. Third part: increasing weights i^a
(a > 0) at n = 10^60 .. 10^300 against their large-n limit (increasing_limit). Fourth part:
the local-unitary overlap O of the inverse-index family with u_d at n = 10^30 .. 10^1000
(`--measure overlap`, field overlap_lo/hi) against an exact series (overlap_inverse), and the
published lower bound O >= 1 - ln d / ln n.

Usage: reference_mpmath.py EMBZ_BINARY
Exit status: 0 all inside, 1 a mismatch or a failing run.
"""
import json
import subprocess
import sys
from fractions import Fraction

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


def harmonic(N):
    """H_N = digamma(N + 1) + Euler's constant (N an exact integer)."""
    return mpmath.digamma(mpf(N) + 1) + mpmath.euler if N > 0 else mpf(0)


def run_interval(cmd):
    """Runs `embz ... --json`; (error_lo, error_hi) as mpf, or None after printing why."""
    run = subprocess.run(cmd, capture_output=True, text=True)
    if run.returncode != 0:
        print("FAIL (exit %d): %s\n%s" % (run.returncode, " ".join(cmd), run.stderr))
        return None
    data = json.loads(run.stdout)
    return mpf(data["error_lo"]), mpf(data["error_hi"])


def corner_reference(n, q):
    """E_n(q) for w_i = 1/i by the threshold form [derived, see docs/engine.md]:
    E = max_t F(t), F(t) = Phi(t) - sum_j q_j Phi(t/q_j), Phi(t) = sum_i (p_i - t)_+. In weight
    units (V = t W, W = H_n) W Phi(T) = H_N - N T with N = N(T) = min(n, ceil(1/T) - 1), the
    number of weights above T. F is piecewise linear with local maxima at V = q_j / i. Right of
    the smallest weight 1/n its slope is about -(m - 1)/2 (F rises towards V = 1/n), left of it
    the slope is -n + sum_j N(V/q_j) ~ 1/V - n - O(m), so the maximum is at a breakpoint
    V = q_j / i with i / q_j within a few units of n. Counts and N T are exact (fractions)."""
    q = [Fraction(x) for x in q]
    W = harmonic(n)

    def phi_w(T):
        N = min(n, max(0, -(-1 // T) - 1))      # ceil(1/T) - 1, exactly
        return harmonic(N) - mpf(N * T.numerator) / T.denominator

    best = mpf(0)
    for qb in q + [Fraction(1)]:
        start = (qb * n).__floor__() - 8
        for i in range(max(1, start), start + 40):
            V = qb / i
            f = phi_w(V) - mpmath.fsum(mpf(qj.numerator) / qj.denominator * phi_w(V / qj)
                                       for qj in q)
            best = max(best, f)
    return best / W


def corner_checks(embz):
    """(checks, failures) of the large-n inverse-family part."""
    failures = 0
    checks = 0
    # the shortcut against the plain definition
    n = 3000
    weights = [1 / mpf(i) for i in range(1, n + 1)]
    for q in (["0.7", "0.3"], ["0.5", "0.3", "0.2"]):
        plain = reference(weights, [mpf(x) for x in q])
        short = corner_reference(n, q)
        checks += 1
        if abs(plain - short) > TOL:
            print("FAIL: corner shortcut %s vs plain definition %s at n=%d, q=%s"
                  % (mpmath.nstr(short, 40), mpmath.nstr(plain, 40), n, ",".join(q)))
            failures += 1
    cases = [(10 ** 5, ["0.7", "0.3"]), (10 ** 30, ["0.7", "0.3"]),
             (10 ** 30, ["0.5", "0.3", "0.2"]), (10 ** 30, ["0.5", "0.4999", "0.0001"]),
             (10 ** 100, ["0.6", "0.25", "0.15"]),
             (10 ** 1000, ["0.7", "0.3"])]
    for n, q in cases:
        ref = corner_reference(n, q)
        exp = len(str(n)) - 1
        got = run_interval([embz, "error", "1/i", "-n", "1e%d" % exp, "--target", ",".join(q),
                            "--json"])
        checks += 1
        wide = got is not None and got[1] - got[0] > mpf("1e-30")
        if got is None or not (got[0] - TOL <= ref <= got[1] + TOL) or wide:
            print("FAIL: 1/i n=1e%d target=%s reference %s, engine %s"
                  % (exp, ",".join(q), mpmath.nstr(ref, 45), got))
            failures += 1
    # a size search across the error goal: E_(n-1) > eps >= E_n by the reference too
    cmd = [embz, "size", "1/i", "--eps", "0.01", "--target", "0.7,0.3", "--json"]
    run = subprocess.run(cmd, capture_output=True, text=True)
    checks += 1
    try:
        n = int(json.loads(run.stdout)["goals"][0]["n"])
        above = corner_reference(n - 1, ["0.7", "0.3"]) > mpf("0.01")
        below = corner_reference(n, ["0.7", "0.3"]) <= mpf("0.01")
    except (ValueError, KeyError, IndexError) as exc:
        print("FAIL (%s): %s\n%s%s" % (exc, " ".join(cmd), run.stdout, run.stderr))
        failures += 1
    else:
        if not (above and below):
            print("FAIL: size n=%d for 1/i, eps 0.01, target 0.7,0.3: reference E_(n-1) > eps "
                  "%s, E_n <= eps %s" % (n, above, below))
            failures += 1
    return checks, failures


def increasing_limit(a):
    """[derived] For w_i = i^a, a > 0, the sorted probabilities at size n are
    p_k ~ (b/n) (1 - k/n)^a (b = a + 1), so P_k -> 1 - (1 - t)^b with t = k/n, and one ebit
    gives E_n -> max_t (1 - t/2)^b - (1 - t)^b (the Ky Fan form P_k - P_(k/2)); the maximum
    is where (1 - t)^a = (1 - t/2)^a / 2, i.e. (1 - t) / (1 - t/2) = 2^(-1/a)."""
    b = mpf(a) + 1
    r = mpf(2) ** (-1 / mpf(a))
    t = (1 - r) / (1 - r / 2)
    return (1 - t / 2) ** b - (1 - t) ** b


def increasing_checks(embz):
    """(checks, failures): non-decreasing weights at huge n against their limit; the
    finite-size corrections are far below 1e-30 there (they fall like a power of 1/n)."""
    failures = 0
    checks = 0
    for a, exp in (("0.3", 100), ("0.5", 300), ("2", 60)):
        ref = increasing_limit(a)
        got = run_interval([embz, "error", "i^%s" % a, "-n", "1e%d" % exp, "--json"])
        checks += 1
        eps = mpf("1e-30")
        if got is None or not (got[0] - eps <= ref <= got[1] + eps) or got[1] - got[0] > eps:
            print("FAIL: i^%s n=1e%d limit %s, engine %s" % (a, exp, mpmath.nstr(ref, 40), got))
            failures += 1
    # one ebit: a 60-digit size whose neighbours differ in E by about 1e-63; the search
    # used to call a size exact that was 6e13 too large (E_(n-1) 2.6e-54 below the goal)
    cmd = [embz, "size", "1/i", "--eps", "0.005", "--json"]
    run = subprocess.run(cmd, capture_output=True, text=True)
    checks += 1
    try:
        goal = json.loads(run.stdout)["goals"][0]
        n = int(goal["n"])
        exact = goal["resolution"] == "exact" and int(goal["n_low"]) == n - 1
        with mp.workdps(200):
            above = ebit_inverse(n - 1) > mpf("0.005")
            below = ebit_inverse(n) <= mpf("0.005")
    except (ValueError, KeyError, IndexError) as exc:
        print("FAIL (%s): %s\n%s%s" % (exc, " ".join(cmd), run.stdout, run.stderr))
        failures += 1
    else:
        if not (exact and above and below):
            print("FAIL: size n=%d for 1/i, eps 0.005: exact %s, reference E_(n-1) > eps %s, "
                  "E_n <= eps %s" % (n, exact, above, below))
            failures += 1
    # a higher precision shows the digits it buys (at 1000 bits the tail remainder limits the
    # enclosure to about 1e-115; the default showed the same 30 digits as at 128 bits)
    cmd = [embz, "error", "1/i", "-n", "10^30", "--prec", "1000", "--json"]
    run = subprocess.run(cmd, capture_output=True, text=True)
    checks += 1
    try:
        data = json.loads(run.stdout)
        cert = data["error_certified"]
        with mp.workdps(160):
            ref = ebit_inverse(10 ** 30)
            ok = (len(cert) > 100 and mpf(data["error_lo"]) <= ref <= mpf(data["error_hi"])
                  and abs(mpf(cert) - ref) < mpf(10) ** (2 - len(cert)))
    except (ValueError, KeyError) as exc:
        print("FAIL (%s): %s\n%s%s" % (exc, " ".join(cmd), run.stdout, run.stderr))
        failures += 1
    else:
        if not ok:
            print("FAIL: 1/i at 10^30, 1000 bits: certified %s" % cert)
            failures += 1
    return checks, failures


def ebit_inverse(n):
    """[derived, notes section 6] E_n(ebit) of 1/i = 1 - (H_s + r/(2 (s+1))) / H_n, n = 2s + r."""
    s, r = divmod(n, 2)
    return 1 - (harmonic(s) + mpf(r) / (2 * (s + 1))) / harmonic(n)


def overlap_inverse(n, d):
    """[derived here] The overlap O = d^(-1/2) sum_(j <= n) sqrt(p_j p_ceil(j/d)) of p_i = 1/(i H_n)
    with u_d: sqrt(p_j p_m / d) = (1/(j H_n)) sqrt(j / (d m)), so
        O = 1 - C_d(n) / H_n,   C_d(n) = sum_(j <= n) (1/j) (1 - sqrt(j / (d ceil(j/d)))),
    a convergent series (terms O(1/j^2)), summed over blocks m = ceil(j/d) with
    1 - sqrt(x) = (1 - x) / (1 + sqrt(x)) (no cancellation): C_d(n) = C_d(inf) - (the blocks
    beyond n), the first by mpmath's nsum, the second (n >= 10^30) by the Euler-Maclaurin
    formula to first order, integral + f(a)/2 (the next term is smaller by a factor of the
    order of 1/a^2 < 10^-58)."""
    def term(j, m):
        return (d * m - j) / (d * m) / (1 + mpmath.sqrt(j / (d * m))) / j

    def block(m):
        m = mpf(m)
        return mpmath.fsum(term(d * (m - 1) + s, m) for s in range(1, d + 1))
    full = mpmath.nsum(block, [1, mpmath.inf])
    mlast = -(-n // d)                    # the block of j = n
    a = mpf(mlast + 1)
    beyond = mpmath.quad(block, [a, mpmath.inf]) + block(a) / 2
    for j in range(n + 1, d * mlast + 1):
        beyond += term(mpf(j), mpf(mlast))
    return 1 - (full - beyond) / harmonic(n)


def overlap_checks(embz):
    """The inverse family's overlap at large n against overlap_inverse, and the lower bound of
    van Dam and Hayden, Phys. Rev. A 67, 060302 (2003), 1 - log d / log n, which holds (as
    measured: docs/measures.md) for the unsquared overlap O."""
    checks = failures = 0
    for n, ntext in ((10 ** 30, "1e30"), (10 ** 300, "1e300"), (10 ** 1000, "1e1000")):
        for d, tname in ((2, "ebit"), (3, "uniform:3"), (8, "ebits:3")):
            cmd = [embz, "error", "1/i", "-n", ntext, "--target", tname, "--measure",
                   "overlap", "--json"]
            run = subprocess.run(cmd, capture_output=True, text=True)
            checks += 1
            if run.returncode != 0:
                print("FAIL (exit %d): %s\n%s" % (run.returncode, " ".join(cmd), run.stderr))
                failures += 1
                continue
            data = json.loads(run.stdout)
            lo, hi = mpf(data["overlap_lo"]), mpf(data["overlap_hi"])
            ref = overlap_inverse(n, d)
            bound = 1 - mpmath.log(d) / mpmath.log(n)
            if not (lo - TOL <= ref <= hi + TOL) or hi - lo > mpf("1e-30"):
                print("FAIL: overlap of 1/i at n=%s d=%d: reference %s, [%s, %s]"
                      % (ntext, d, mpmath.nstr(ref, 45), data["overlap_lo"], data["overlap_hi"]))
                failures += 1
            elif not lo > bound:
                print("FAIL: overlap of 1/i at n=%s d=%d below 1 - log d/log n = %s"
                      % (ntext, d, mpmath.nstr(bound, 20)))
                failures += 1
    return checks, failures


def classify_law_checks(embz):
    """classify --measure overlap|purified of 1/i: the certified enclosure of the limit C_2 of
    C_2(n) = (1 - O) H_n (docs/measures.md) against the full series by mpmath's nsum, and the
    derived bound P <= sqrt(2 C_2 / H_n) at every size of the sweep."""
    checks = failures = 0
    d = 2

    def block(m):
        m = mpf(m)
        return mpmath.fsum((d * m - j) / (d * m) / (1 + mpmath.sqrt(j / (d * m))) / j
                           for j in (d * (m - 1) + s for s in range(1, d + 1)))
    c2 = mpmath.nsum(block, [1, mpmath.inf])
    for measure in ("overlap", "purified"):
        cmd = [embz, "classify", "inverse", "--measure", measure, "--to", "1e60", "--points",
               "8", "--json"]
        run = subprocess.run(cmd, capture_output=True, text=True)
        checks += 1
        if run.returncode != 0:
            print("FAIL (exit %d): %s\n%s" % (run.returncode, " ".join(cmd), run.stderr))
            failures += 1
            continue
        data = json.loads(run.stdout)
        law = data["harmonic_law"]
        lo, hi = mpf(law["limit_c_lo"]), mpf(law["limit_c_hi"])
        if not (lo - TOL <= c2 <= hi + TOL) or data["verdict"] != "converges":
            print("FAIL: classify --measure %s of 1/i: C_2 = %s not in [%s, %s] or verdict %s"
                  % (measure, mpmath.nstr(c2, 30), law["limit_c_lo"], law["limit_c_hi"],
                     data["verdict"]))
            failures += 1
        if measure == "purified":
            for p in data["points"]:
                checks += 1
                bound = mpmath.sqrt(2 * c2 / harmonic(int(p["n"])))
                if not mpf(p["distance_lo"]) <= bound:
                    print("FAIL: P of 1/i at n=%s above sqrt(2 C_2 / H_n) = %s"
                          % (p["n"], mpmath.nstr(bound, 20)))
                    failures += 1
    return checks, failures


def main():
    embz = sys.argv[1]
    mp.dps = 80
    checks, failures = corner_checks(embz)
    c3, f3 = overlap_checks(embz)
    checks += c3
    failures += f3
    c4, f4 = classify_law_checks(embz)
    checks += c4
    failures += f4
    c2, f2 = increasing_checks(embz)
    checks += c2
    failures += f2
    mp.dps = 50
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
