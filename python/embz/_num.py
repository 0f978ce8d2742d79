"""Numbers between Python and the flat interface: sizes, exact values, outward-rounded floats."""

import math
import numbers
from decimal import Decimal
from fractions import Fraction

try:
    import mpmath
except ImportError:       # optional
    mpmath = None

try:
    import numpy
except ImportError:       # optional
    numpy = None


def size_text(n):
    """A size for the library: a Python int (any size, sent as hexadecimal, so no decimal
    conversion limit applies) or a text the CLI takes ("10^30", "1e6", "2^20")."""
    if isinstance(n, bool):
        raise TypeError("a size must be an int or a text such as '10^30', not a bool")
    if isinstance(n, numbers.Integral):
        return hex(int(n))
    if isinstance(n, float):
        if not n.is_integer():
            raise ValueError("a size must be a whole number, got %r" % n)
        return hex(int(n))
    if isinstance(n, str):
        return n.strip()
    raise TypeError("a size must be an int or a text such as '10^30', not %s" % type(n).__name__)


def number_text(x):
    """An exact number for the library (parameter values, vector entries, goals): ints,
    Fractions and Decimals exactly; floats by their shortest repr (0.7 means 7/10, as typed);
    texts as they are ("-7/10", "1e-3")."""
    if isinstance(x, bool):
        raise TypeError("a number expected, not a bool")
    if isinstance(x, numbers.Integral):
        return str(int(x))
    if isinstance(x, Fraction):
        return "%d/%d" % (x.numerator, x.denominator)
    if isinstance(x, float):
        if not math.isfinite(x):
            raise ValueError("a finite number expected, got %r" % x)
        return repr(x)
    if isinstance(x, Decimal):
        return str(x)
    if isinstance(x, numbers.Rational):
        return "%d/%d" % (x.numerator, x.denominator)
    if isinstance(x, str):
        return x.strip()
    if numpy is not None and isinstance(x, numpy.floating):
        return repr(float(x))
    raise TypeError("a number expected, not %s" % type(x).__name__)


def big_int(dec, hexa=None):
    """An int from the table's decimal (and, for big ones, hexadecimal) text."""
    if hexa:
        return int(hexa, 16)
    return int(dec)


def show_int(n):
    """Short text of a size: all digits up to 30 of them, 10^k for powers of ten, else
    d.ddddde+K."""
    if n < 10 ** 30:
        return str(n)
    k = _log10_floor(n)
    if n == 10 ** k:
        return "10^%d" % k
    lead = n // 10 ** (k - 9)
    return "%d.%09de+%d" % (lead // 10 ** 9, lead % 10 ** 9, k)


def _log10_floor(n):
    k = int((n.bit_length() - 1) * 0.30102999566398119521)
    while 10 ** (k + 1) <= n:
        k += 1
    while 10 ** k > n:
        k -= 1
    return k


def fraction(s):
    """The exact value of a decimal or p/q text (None for None/empty)."""
    if s is None or s == "":
        return None
    return Fraction(s)


def float_down(s):
    """The largest double <= the decimal s (an outward-rounded lower end stays a bound)."""
    f = float(s)
    if math.isfinite(f) and Fraction(f) > Fraction(s):
        f = math.nextafter(f, -math.inf)
    return f


def float_up(s):
    """The smallest double >= the decimal s."""
    f = float(s)
    if math.isfinite(f) and Fraction(f) < Fraction(s):
        f = math.nextafter(f, math.inf)
    return f


def num(s):
    """A double from the table's %.17g text (NaN for absent or nan)."""
    if s is None or s == "":
        return math.nan
    return float(s)


def interval(lo, hi):
    """mpmath's interval [lo, hi] (outward from the decimal ends), or None without mpmath."""
    if mpmath is None or lo is None or hi is None:
        return None
    return mpmath.iv.mpf([lo, hi])
