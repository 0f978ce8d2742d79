"""Families, targets and the certified error E_n(q) at one or many sizes."""

import html
import math
import os
from fractions import Fraction

from . import _ffi, _num
from ._errors import InputError, from_err, from_row
from ._ffi import ffi, lib

METHODS = {"auto": 0, "explicit": 1, "analytic": 2}
MEASURES = {"k": 0, "K": 0, "fidelity": 1, "purified": 2, "overlap": 3}


def make_opts(method="auto", measure="k", prec=None, digits=None, seconds=None,
              threads=None):
    """An embz_flat_opts from keyword values (checked here, with Python messages)."""
    o = ffi.new("embz_flat_opts *")
    lib.embz_flat_opts_init(o)
    if method not in METHODS:
        raise InputError("bad method %r (auto, explicit or analytic)" % (method,))
    if measure not in MEASURES:
        raise InputError("bad measure %r (k, fidelity, purified or overlap)" % (measure,))
    o.method = METHODS[method]
    o.measure = MEASURES[measure]
    if prec is not None:
        if isinstance(prec, bool) or not isinstance(prec, int) or not 16 <= prec <= 1 << 20:
            raise InputError("bad precision %r (bits, an int from 16 to %d)" % (prec, 1 << 20))
        o.prec = prec
    if digits is not None:
        if isinstance(digits, bool) or not isinstance(digits, int) or not 1 <= digits <= 100000:
            raise InputError("bad number of digits %r (1 to 100000)" % (digits,))
        o.digits = digits
    if seconds is not None:
        if not seconds > 0:
            raise InputError("bad time limit %r (seconds > 0)" % (seconds,))
        o.seconds = float(seconds)
    if threads is not None:
        if isinstance(threads, bool) or not isinstance(threads, int) or threads < 1:
            raise InputError("bad number of threads %r (an int >= 1)" % (threads,))
        o.threads = threads
    return o


def call_table(cfunc, opts=None, cancel=None, partial=False):
    """Runs cfunc(out, err) (opts.cancel set to the call's flag) and returns the table's rows
    as dicts; raises the library's failure. partial: returns (status, rows, exception) instead
    of raising when some rows came back."""
    token = cancel if cancel is not None else _ffi.Cancel()
    if opts is not None:
        opts.cancel = token._flag

    def go(flag):
        out = ffi.new("embz_flat_table **")
        err = ffi.new("embz_flat_err *")
        st = cfunc(out, err)
        try:
            rows = _ffi.table_rows(out[0]) if out[0] != ffi.NULL else None
        finally:
            lib.embz_flat_table_free(out[0])
        exc = from_err(err, st, cancelled=flag[0] != 0) if st != _ffi.OK else None
        return st, rows, exc

    st, rows, exc = _ffi.run(go, token)
    if partial:
        return st, rows, exc
    if exc is not None:
        raise exc
    return rows


# ------------------------------------------------------------------ families

def _settings(params, kwparams):
    merged = {}
    if params:
        merged.update(params)
    for k, v in kwparams.items():
        if k in merged:
            raise InputError("parameter '%s' is given twice" % k)
        merged[k] = v
    names = [str(k) for k in merged]
    values = [_num.number_text(v) for v in merged.values()]
    return names, values


class Family:
    """An embezzling family: the weights w(i, n) of its n-th state's Schmidt coefficients.

    ``Family(spec, params=None, *, amplitude=False, **parameters)``

    spec is a library name (``embz.families()``), the path of a family file, or an
    expression in i (and n) such as ``'1/(i*log(i+1)^b)'``. Parameters are given as keyword
    arguments (``Family('power', a=-0.7)``) or as a dict ``params`` (for names that clash
    with Python keywords); values are exact: ints, Fractions, Decimals, texts such as
    ``'-7/10'``, or floats read by their shortest repr (``-0.7`` means -7/10). amplitude=True
    reads the expression as amplitudes (the weights are their squares).

    A family is immutable and may be shared between threads.
    """

    def __init__(self, spec, params=None, *, amplitude=False, **parameters):
        if isinstance(spec, Family):
            spec = spec.spec
        if isinstance(spec, os.PathLike):
            spec = os.fspath(spec)
        if not isinstance(spec, str):
            raise TypeError("a family is a library name, a file or an expression (str)")
        names, values = _settings(params, parameters)
        self.spec = spec
        self.amplitude = bool(amplitude)
        cn, keep1 = _ffi.cstr_array(names)
        cv, keep2 = _ffi.cstr_array(values)
        out = ffi.new("embz_flat_family **")
        err = ffi.new("embz_flat_err *")
        st = lib.embz_flat_family_new(out, spec.encode("utf-8"), cn, cv, len(names),
                                      1 if amplitude else 0, err)
        if st != _ffi.OK:
            raise from_err(err, st)
        self._h = ffi.gc(out[0], lib.embz_flat_family_free)
        info = call_table(lambda o, e: lib.embz_flat_family_info(o, self._h, e))[0]
        self.name = info["name"]
        self.label = info["label"]
        self.description = info["description"]
        self.weight_text = info["weight_text"]
        self.weight = info["weight"]
        self.origin = info["origin"]
        self.depends_on_n = info["depends_on_n"] == "1"
        self.params = {k[6:]: Fraction(v) for k, v in info.items() if k.startswith("param:")}

    def __repr__(self):
        return "Family(%r%s)" % (self.name, "".join(", %s=Fraction(%r)" % (k, str(v))
                                                    for k, v in self.params.items()))

    def __str__(self):
        return self.label

    def _repr_html_(self):
        rows = [("family", self.label), ("weight", ("(%s)^2" % self.weight_text)
                                         if self.amplitude else self.weight_text),
                ("bound weight", self.weight), ("origin", self.origin),
                ("depends on n", "yes" if self.depends_on_n else "no")]
        if self.description:
            rows.insert(1, ("description", self.description))
        return _html_table(rows)

    def weights(self, i, n=None, *, prec=None, digits=None):
        """The weights w(i, n) at the indices i (an int or a sequence; 1-based) for the size n
        (needed when the weight uses n). Each is a :class:`Ball` (certified enclosure) whose
        ``exact`` is the Fraction when the weight is rational there."""
        single = not isinstance(i, (list, tuple, range)) and not (
            _num.numpy is not None and isinstance(i, _num.numpy.ndarray))
        idx = [i] if single else list(i)
        ci, keep = _ffi.cstr_array([_num.size_text(k) for k in idx])
        cn = _ffi.cstr(_num.size_text(n)) if n is not None else ffi.NULL
        o = make_opts(prec=prec, digits=digits)
        rows = call_table(lambda out, e: lib.embz_flat_family_weights(out, self._h, ci, len(idx),
                                                                      cn, o, e))
        vals = [Ball(r, exact=r.get("exact")) for r in rows]
        return vals[0] if single else vals

    def error(self, n, target=None, **kw):
        """The certified error E_n(q): see :func:`embz.error`."""
        return error(self, n, target, **kw)

    def errors(self, sizes, target=None, **kw):
        """E_n(q) at many sizes: see :func:`embz.errors`."""
        return errors(self, sizes, target, **kw)


def as_family(family, params=None, amplitude=False, **parameters):
    if isinstance(family, Family):
        if params or parameters or amplitude:
            return Family(family.spec, {**family.params, **(params or {}), **parameters},
                          amplitude=amplitude or family.amplitude)
        return family
    return Family(family, params, amplitude=amplitude, **parameters)


def families():
    """The shipped family library: a list of dicts (name, label, description, weight_text,
    weight, path, params, ...)."""
    rows = call_table(lambda o, e: lib.embz_flat_family_list(o, e))
    for r in rows:
        r["params"] = {k[6:]: Fraction(v) for k, v in r.items() if k.startswith("param:")}
        for k in [k for k in r if k.startswith("param:")]:
            del r[k]
    return rows


# ------------------------------------------------------------------ targets

class Target:
    """A target state q: ``'ebit'`` (default), ``'ebits:J'``, ``'uniform:D'``, a text of
    numbers ``'0.7,0.3'``, or a sequence of numbers (floats by their repr, Fractions,
    texts), normalised to sum 1. amplitude=True squares the numbers."""

    def __init__(self, spec="ebit", *, amplitude=False):
        if isinstance(spec, Target):
            spec = spec.spec
        if spec is None:
            spec = "ebit"
        if not isinstance(spec, str):
            try:
                items = list(spec)
            except TypeError:
                raise TypeError("a target is 'ebit', 'ebits:J', 'uniform:D' or a sequence of "
                                "numbers") from None
            spec = ",".join(_num.number_text(x) for x in items)
        self.spec = spec
        out = ffi.new("embz_flat_target **")
        err = ffi.new("embz_flat_err *")
        st = lib.embz_flat_target_new(out, spec.encode("utf-8"), 1 if amplitude else 0, err)
        if st != _ffi.OK:
            e = from_err(err, st)
            e.args = ("bad target %r: %s" % (spec, e.message),)
            e.message = e.args[0]
            raise e
        self._h = ffi.gc(out[0], lib.embz_flat_target_free)
        self.label = _ffi.text(lib.embz_flat_target_label(self._h))

    def __repr__(self):
        return "Target(%r)" % self.label

    def __str__(self):
        return self.label


def as_target(target):
    if isinstance(target, Target):
        return target
    return Target(target)


# ------------------------------------------------------------------ values

def _html_table(rows):
    cells = "".join("<tr><th style='text-align:left'>%s</th><td style='text-align:left'>%s"
                    "</td></tr>" % (html.escape(str(k)), html.escape(str(v))) for k, v in rows)
    return "<table>%s</table>" % cells


class Ball:
    """A certified enclosure lo <= x <= hi: ``lo``, ``hi`` (decimal texts rounded outward),
    ``certified`` (the digits both ends share), ``mid`` (a double, an estimate),
    ``interval`` (mpmath's iv interval when mpmath is present), ``exact`` (a Fraction when
    known exactly, else None)."""

    def __init__(self, row, prefix="", exact=None):
        p = prefix + "_" if prefix else ""
        self.lo = row.get(p + "lo")
        self.hi = row.get(p + "hi")
        self.certified = row.get(p + "certified") or (
            "[%s, %s]" % (self.lo, self.hi) if self.lo is not None else None)
        self.mid = _num.num(row.get(p + "mid")) if row.get(p + "mid") else (
            (float(self.lo) + float(self.hi)) / 2 if self.lo is not None else math.nan)
        self.exact = Fraction(exact) if exact else None

    @property
    def interval(self):
        """mpmath.iv.mpf([lo, hi]), or None when mpmath is absent."""
        return _num.interval(self.lo, self.hi)

    @property
    def bounds(self):
        """(lo, hi) as exact Fractions."""
        return Fraction(self.lo), Fraction(self.hi)

    @property
    def float_bounds(self):
        """(lo, hi) as doubles rounded outward (still a certified enclosure)."""
        return _num.float_down(self.lo), _num.float_up(self.hi)

    def contains(self, x):
        """lo <= x <= hi for an exact number x (int, Fraction, decimal text)."""
        lo, hi = self.bounds
        return lo <= Fraction(x) <= hi

    def __float__(self):
        return self.mid

    def __str__(self):
        if self.exact is not None:
            return str(self.exact)
        return self.certified

    def __repr__(self):
        return "Ball(%s, [%s, %s])" % (self.certified, self.lo, self.hi)


class ErrorResult(Ball):
    """E_n(q) of a family at one size: the certified enclosure (``lo``, ``hi``,
    ``certified``, ``interval``), the double ``estimate`` (not certified), ``method``
    (explicit or analytic), ``argmax`` (the Ky Fan index of the maximum), ``how`` (how it was
    computed), ``n``, ``target``, ``measure`` and, for one ebit, the block-mass ``bound_lo``
    and ``bound_hi``. For fidelity-type measures beyond explicit sizes ``bounds_only`` is
    True: [lo, hi] then holds certified bounds only."""

    def __init__(self, row, family=None, target="ebit"):
        super().__init__(row)
        self.n = _num.big_int(row["n"], row.get("n_hex"))
        self.family = family
        self.target = target
        self.measure = row.get("measure", "k")
        self.bounds_only = row.get("bounds_only") == "1"
        self.estimate = _num.num(row.get("estimate"))
        self.radius = _num.num(row.get("radius"))
        self.argmax = _num.big_int(row["argmax"], row.get("argmax_hex")) if row.get("argmax") else None
        self.method = row.get("method")
        self.how = row.get("how", "")
        self.seconds = _num.num(row.get("seconds"))
        self.bound_lo = row.get("bound_lo")
        self.bound_hi = row.get("bound_hi")
        self.extra = {k: v for k, v in row.items()
                      if k.split("_")[0] in ("fidelity", "purified", "overlap", "K")}

    @property
    def value(self):
        """The midpoint as a double (an estimate of the certified value)."""
        return self.mid

    def __str__(self):
        what = "E" if self.measure == "k" else self.measure
        val = ("in [%s, %s] (certified bounds)" % (self.lo, self.hi) if self.bounds_only
               else "= %s (certified digits)" % self.certified)
        fam = (" for %s" % self.family) if self.family else ""
        return "%s %s%s at n = %s, target %s [%s]" % (what, val, fam, _num.show_int(self.n),
                                                     self.target, self.method)

    def __repr__(self):
        return "ErrorResult(n=%s, target=%r, certified=%r, lo=%r, hi=%r, method=%r)" % (
            _num.show_int(self.n), self.target, self.certified, self.lo, self.hi, self.method)

    def _repr_html_(self):
        rows = []
        if self.family:
            rows.append(("family", self.family))
        rows += [("n", _num.show_int(self.n)), ("target", self.target),
                 ("measure", self.measure)]
        if self.bounds_only:
            rows.append(("bounds (certified)", "[%s, %s]" % (self.lo, self.hi)))
        else:
            rows += [("value (certified digits)", self.certified),
                     ("enclosure", "[%s, %s]" % (self.lo, self.hi))]
        if self.argmax:
            rows.append(("argmax k", _num.show_int(self.argmax)))
        if self.estimate == self.estimate:
            rows.append(("estimate (not certified)", "%.10g" % self.estimate))
        rows += [("method", self.method), ("how", self.how)]
        return _html_table(rows)


class SizeFailure:
    """A size of a many-size call that could not be computed: ``n``, ``status``, ``message``
    and the exception ``error`` it would raise."""

    ok = False

    def __init__(self, row):
        self.n = _num.big_int(row["n"], row.get("n_hex"))
        self.status = _ffi.STATUS_NAMES.get(int(row.get("status", 7)), row.get("status"))
        self.message = row.get("message") or row.get("how") or ""
        self.error = from_row(row)

    def __repr__(self):
        return "SizeFailure(n=%s, %s: %s)" % (_num.show_int(self.n), self.status, self.message)


ErrorResult.ok = True


class ErrorSeries:
    """E_n(q) at many sizes: a sequence of :class:`ErrorResult` (or :class:`SizeFailure` for
    a size nothing could compute), with the columns ``n`` (ints), ``lo``, ``hi``, ``mid``
    (NumPy arrays of doubles when NumPy is present, lo/hi rounded outward; NaN where a size
    failed) and ``ok``."""

    def __init__(self, rows, family=None, target="ebit"):
        self.family = family
        self.target = target
        self.results = [ErrorResult(r, family, target) if r.get("status") in ("0", None)
                        and r.get("lo") is not None else SizeFailure(r) for r in rows]

    def __len__(self):
        return len(self.results)

    def __getitem__(self, k):
        return self.results[k]

    def __iter__(self):
        return iter(self.results)

    def _col(self, f):
        vals = [f(r) if r.ok else math.nan for r in self.results]
        if _num.numpy is not None:
            return _num.numpy.array(vals, dtype=float)
        return vals

    @property
    def n(self):
        return [r.n for r in self.results]

    @property
    def lo(self):
        return self._col(lambda r: _num.float_down(r.lo))

    @property
    def hi(self):
        return self._col(lambda r: _num.float_up(r.hi))

    @property
    def mid(self):
        return self._col(lambda r: r.mid)

    @property
    def ok(self):
        vals = [r.ok for r in self.results]
        return _num.numpy.array(vals, dtype=bool) if _num.numpy is not None else vals

    @property
    def log10_n(self):
        """log10 n as doubles (also beyond the double range of n)."""
        def l10(n):
            b = n.bit_length()
            if b < 1000:
                return math.log10(n)
            return math.log10(n >> (b - 60)) + (b - 60) * math.log10(2)
        vals = [l10(r.n) for r in self.results]
        return _num.numpy.array(vals, dtype=float) if _num.numpy is not None else vals

    def to_records(self):
        """A list of dicts (n, lo, hi, certified, mid, estimate, method, status)."""
        out = []
        for r in self.results:
            if r.ok:
                out.append({"n": r.n, "lo": r.lo, "hi": r.hi, "certified": r.certified,
                            "mid": r.mid, "estimate": r.estimate, "method": r.method,
                            "status": "ok"})
            else:
                out.append({"n": r.n, "lo": None, "hi": None, "certified": None,
                            "mid": math.nan, "estimate": math.nan, "method": None,
                            "status": r.status})
        return out

    def __repr__(self):
        return "ErrorSeries(%d sizes, target %s%s)" % (
            len(self), self.target, ", %d failed" % sum(1 for r in self if not r.ok)
            if any(not r.ok for r in self) else "")

    def _repr_html_(self):
        head = "<tr><th>n</th><th>certified</th><th>enclosure</th><th>method</th></tr>"
        body = "".join(
            "<tr><td>%s</td><td>%s</td><td>[%s, %s]</td><td>%s</td></tr>" % (
                html.escape(_num.show_int(r.n)), html.escape(r.certified), html.escape(r.lo),
                html.escape(r.hi), html.escape(r.method or ""))
            if r.ok else "<tr><td>%s</td><td colspan=3>%s</td></tr>" % (
                html.escape(_num.show_int(r.n)), html.escape(r.message))
            for r in self.results)
        cap = "<caption>E_n for %s, target %s</caption>" % (html.escape(str(self.family or "")),
                                                            html.escape(str(self.target)))
        return "<table>%s%s%s</table>" % (cap, head, body)


# ------------------------------------------------------------------ the error

def _sizes_list(sizes):
    if isinstance(sizes, (int, str)):
        return [sizes]
    return list(sizes)


def errors(family, sizes, target=None, *, measure="k", method="auto", prec=None, digits=None,
           seconds=None, cancel=None, amplitude=False, params=None, **parameters):
    """E_n(q) at every size in ``sizes`` (ints of any size, or texts such as '10^30'),
    through one evaluator and one workspace: an :class:`ErrorSeries`. A size that fails keeps
    its reason (a :class:`SizeFailure`); an invalid weight raises :class:`DomainError`.

    family is a :class:`Family` or anything :class:`Family` takes (with ``params``,
    ``amplitude`` and parameters as keyword arguments). target: see :class:`Target`.
    measure: 'k' (the distance K, default), 'fidelity', 'purified' or 'overlap'. method:
    'auto', 'explicit' or 'analytic'. prec: working bits (default 128). digits: digits of
    the enclosure's ends (default 45, more above 128 bits). seconds: a time limit per size
    for the analytic searches. cancel: an :class:`embz.Cancel`.
    """
    fam = as_family(family, params, amplitude, **parameters)
    q = as_target(target)
    texts = [_num.size_text(n) for n in _sizes_list(sizes)]
    cs, keep = _ffi.cstr_array(texts)
    o = make_opts(method, measure, prec, digits, seconds)
    st, rows, exc = call_table(
        lambda out, e: lib.embz_flat_errors(out, fam._h, cs, len(texts), q._h, o, e),
        o, cancel, partial=True)
    if exc is not None:
        raise exc
    return ErrorSeries(rows, fam.label, q.label)


def error(family, n=None, target=None, **kw):
    """The certified embezzlement error E_n(q) of the family's state of size n for the
    target q (default one ebit): an :class:`ErrorResult`.

    ``embz.error('1/i', n=10**30)``, ``embz.error('power', n='10^100', a=-0.7,
    target='ebits:2')``, ``embz.error(fam, 1000, target=[0.7, 0.3], measure='fidelity')``.
    Keywords as for :func:`errors`; failures raise :class:`InputError`,
    :class:`DomainError` or :class:`ComputeError`.
    """
    if n is None:
        raise InputError("the size is required: error(family, n=...)")
    if not isinstance(n, (int, str)) or isinstance(n, bool):
        n = _num.size_text(n)
    s = errors(family, [n], target, **kw)
    r = s[0]
    if not r.ok:
        raise r.error
    return r
