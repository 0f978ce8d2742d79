"""The API against mpmath: the closed form of 1/i for one ebit at explicit huge sizes, and
the plain definition at small n, with the reference functions of tests/reference_mpmath.py
(the CLI's mpmath reference)."""

import os
import sys

import pytest

import embz

mpmath = pytest.importorskip("mpmath")
mpf = mpmath.mpf
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "tests"))
from reference_mpmath import ebit_inverse, reference  # noqa: E402

TOL = mpf(10) ** -60


@pytest.mark.parametrize("n", [10 ** 30, 10 ** 100 + 1, 3 ** 200])
def test_inverse_closed_form(n):
    with mpmath.workdps(80):
        want = ebit_inverse(n)
        r = embz.error("1/i", n=n)
        assert mpf(r.lo) <= want <= mpf(r.hi)
        assert mpf(r.hi) - mpf(r.lo) < mpf(10) ** -30


@pytest.mark.parametrize("n,target", [(1, "ebit"), (7, "ebit"), (60, "ebits:2"),
                                      (45, "0.7,0.2,0.1"), (300, "uniform:3")])
def test_inverse_small(n, target):
    with mpmath.workdps(80):
        q = {"ebit": [mpf(1) / 2] * 2, "ebits:2": [mpf(1) / 4] * 4,
             "uniform:3": [mpf(1) / 3] * 3}.get(target) or [mpf(x) for x in target.split(",")]
        want = reference([mpf(1) / i for i in range(1, n + 1)], q)
        r = embz.error("1/i", n=n, target=target)
        assert mpf(r.lo) - TOL <= want <= mpf(r.hi) + TOL


@pytest.mark.parametrize("n", [5, 64, 400])
def test_power_mpmath_small(n):
    with mpmath.workdps(60):
        want = reference([mpf(i) ** mpf("-0.7") for i in range(1, n + 1)], [mpf(1) / 2] * 2)
        r = embz.error("i^a", n=n, a="-0.7")
        assert mpf(r.lo) - mpf(10) ** -50 <= want <= mpf(r.hi) + mpf(10) ** -50


def test_weights_mpmath():
    with mpmath.workdps(60):
        f = embz.Family("1/(i*log(i+1)^b)", b="1/2")
        ws = f.weights([1, 10, 12345])
        for i, ball in zip([1, 10, 12345], ws):
            want = 1 / (mpf(i) * mpmath.sqrt(mpmath.log(i + 1)))
            assert mpf(ball.lo) <= want <= mpf(ball.hi)
