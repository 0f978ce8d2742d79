"""embz.size(..., measure='purified') against `embz size --measure purified --json`: the same
route, status, sizes and enclosures (the CLI is the reference: both decide on the certified
enclosures of P, or bracket the answer between two searches on K)."""

from fractions import Fraction

import pytest

import embz


def test_direct_route_matches_cli(cli):
    """1/i and one ebit at eps = 0.2: decided on enclosures of P, n exhaustive at small n."""
    r = embz.size("inverse", "0.2", measure="purified")
    c = cli("size", "inverse", "--eps", "0.2", "--measure", "purified")["goals"]
    assert len(c) == 1 and c[0]["route"] == "enclosures of P"
    assert isinstance(r, embz.SizeResult)
    assert r.measure == "purified" and r.route == "direct"
    assert r.status == c[0]["status"] == "found"
    assert str(r.n) == c[0]["n"] and r.qubits == c[0]["qubits"]
    # P_n <= 0.2 < P_(n-1), certified by the two enclosures
    assert Fraction(r.error_at_n.hi) <= Fraction(1, 5) < Fraction(r.error_below.lo)
    lo, hi = (Fraction(x) for x in c[0]["error_at_n"])
    assert Fraction(r.error_at_n.lo) <= hi and lo <= Fraction(r.error_at_n.hi)


def test_direct_route_large_n_bracket(cli):
    """1/i at eps = 0.1: n near 4.4e33, left undecided between two certified sizes whose ends
    agree to 12 digits; the library and the CLI give the same bracket."""
    r = embz.size("inverse", "0.1", measure="purified")
    c = cli("size", "inverse", "--eps", "0.1", "--measure", "purified")["goals"][0]
    assert r.route == "direct" and r.status == c["status"]
    if r.status == "undecided":
        assert [str(r.n_low), str(r.n)] == c["bracket"]
        assert abs(r.n - r.n_low) < r.n // 10 ** 11
    else:
        assert str(r.n) == c["n"]


def test_bracket_route_matches_cli(cli):
    """logpower at eps = 0.1: P has bounds only beyond 2^20, so the answer is bracketed by K:
    at least the size for K <= eps, at most the one for K <= 1 - sqrt(1 - eps^2)."""
    r = embz.size("logpower", "0.1", measure="purified")
    c = cli("size", "logpower", "--eps", "0.1", "--measure", "purified")["goals"]
    assert isinstance(r, embz.SizeBracket) and len(c) == 2
    assert r.lower.route == "lower" and r.upper.route == "upper"
    for part, j in ((r.lower, c[0]), (r.upper, c[1])):
        assert part.status == j["status"]
        if part.status == "found":
            assert str(part.n) == j["n"]
        elif part.status == "not_reached":
            assert Fraction(part.error_at_largest.lo) <= Fraction(j["error_at_largest"][1])
    assert r.n_min == (r.lower.n if r.lower.status == "found" else None)
    # the upper goal lies below 1 - sqrt(1 - eps^2), so that K below it gives P <= eps
    g = Fraction(r.upper_goal.lo)
    assert g * (2 - g) <= Fraction(1, 100) and abs(float(g) - 0.005012562893380) < 1e-12


def test_measure_k_and_refusals():
    """measure='k' is the plain search; fidelity and overlap are no goals (InputError)."""
    a = embz.size("inverse", "0.1")
    b = embz.size("inverse", "0.1", measure="k")
    assert a.n == b.n == 570 and a.route == b.route == "k" and b.measure == "k"
    for m in ("fidelity", "overlap", "bogus"):
        with pytest.raises(embz.InputError):
            embz.size("inverse", "0.1", measure=m)
