"""Figures: error against size through the C renderer (SVG text or a file), and a small
matplotlib helper drawing the certified intervals as error bars."""

import html
import math
from decimal import Decimal, localcontext

from . import _ffi, _num
from ._core import ErrorSeries
from ._errors import from_err, InputError
from ._ffi import ffi, lib


def _log10_dec(s):
    """log10 of a positive decimal text (NaN for <= 0), also far below the double range."""
    if s is None:
        return math.nan
    d = Decimal(s)
    if d <= 0:
        return -math.inf
    with localcontext() as c:
        c.prec = 30
        return float(d.log10())


def _series_of(obj):
    """(label, ErrorSeries) from an ErrorSeries, a Sweep or a Verdict."""
    pts = getattr(obj, "points", obj)
    if not isinstance(pts, ErrorSeries):
        raise TypeError("an ErrorSeries, a Sweep or a Verdict expected, not %s"
                        % type(obj).__name__)
    return str(pts.family or ""), pts


def _coords(series):
    x, y, lo, hi = [], [], [], []
    for l10, r in zip(series.log10_n, series):
        if not r.ok:
            continue
        x.append(float(l10))
        y.append(_log10_dec(str(r.mid)) if r.mid > 0 else _log10_dec(r.hi))
        lo.append(_log10_dec(r.lo))
        hi.append(_log10_dec(r.hi))
    return x, y, lo, hi


def plot_svg(data, path=None, *, title=None, labels=None, format=None):
    """Error against size on log axes, drawn by libembz's renderer (the one behind
    ``embz plot``). data: an ErrorSeries, Sweep or Verdict, or a list of them. Returns the SVG
    text, or writes path (.svg, .pdf, .png; format overrides the extension) and returns
    path."""
    items = data if isinstance(data, (list, tuple)) else [data]
    labs, lens, xs, ys, los, his = [], [], [], [], [], []
    for k, it in enumerate(items):
        lab, s = _series_of(it)
        x, y, lo, hi = _coords(s)
        labs.append(labels[k] if labels else lab)
        lens.append(len(x))
        xs += x
        ys += y
        los += lo
        his += hi
    cl, keep = _ffi.cstr_array(labs)
    arrs = [ffi.new("double[]", v or [0.0]) for v in (xs, ys, los, his)]
    err = ffi.new("embz_flat_err *")
    svg = ffi.new("char **")
    ct = _ffi.cstr(title) if title else ffi.NULL
    cp = _ffi.cstr(str(path)) if path is not None else ffi.NULL
    cf = _ffi.cstr(format) if format else ffi.NULL
    st = lib.embz_flat_plot(svg if path is None else ffi.NULL, ct, b"size n",
                            b"embezzlement error E_n", 1, 1, len(labs), cl,
                            ffi.new("long[]", lens or [0]), *arrs, cp, cf, err)
    if st != _ffi.OK:
        raise from_err(err, st)
    if path is not None:
        return path
    try:
        return _ffi.text(svg[0])
    finally:
        lib.embz_flat_str_free(svg[0])


class SVG:
    """SVG text that a notebook shows as a figure."""

    def __init__(self, text):
        self.text = text

    def _repr_svg_(self):
        return self.text

    def __str__(self):
        return self.text


def plot_errorbars(data, ax=None, *, label=None, **kw):
    """Draws E_n against n on log-log axes with matplotlib: a marker at each midpoint and an
    error bar over the certified enclosure [lo, hi] (lo, hi rounded outward to doubles).
    data: an ErrorSeries, Sweep or Verdict (or a list of them). Returns the axes. Sizes beyond
    the double range are drawn at log10 n on a linear axis labelled as such."""
    import matplotlib.pyplot as plt
    if ax is None:
        ax = plt.gca()
    items = data if isinstance(data, (list, tuple)) else [data]
    huge = any(max(_series_of(it)[1].n or [1]).bit_length() > 1000 for it in items)
    for k, it in enumerate(items):
        lab, s = _series_of(it)
        ok = [r for r in s if r.ok]
        if huge:
            xs = [float(v) for v, r in zip(s.log10_n, s) if r.ok]
        else:
            xs = [float(r.n) for r in ok]
        mid = [r.mid for r in ok]
        lo = [max(m - _num.float_down(r.lo), 0.0) for m, r in zip(mid, ok)]
        hi = [max(_num.float_up(r.hi) - m, 0.0) for m, r in zip(mid, ok)]
        ax.errorbar(xs, mid, yerr=[lo, hi], fmt="o-", capsize=3, markersize=4,
                    label=(label[k] if isinstance(label, (list, tuple)) else label) or lab,
                    **kw)
    if not huge:
        ax.set_xscale("log")
    ax.set_yscale("log")
    ax.set_xlabel("log10 n" if huge else "size n")
    ax.set_ylabel("embezzlement error $E_n$ (certified intervals)")
    ax.legend()
    return ax


def _cell(x):
    return None if x is None else str(x)


def report(comparison, path=None, *, format=None, figures=(), captions=None, title=None,
           subtitle=None, intro=None, footer=None):
    """The comparison document of ``embz report``, laid out by libembz's renderer, from an
    :class:`embz.Comparison` (``embz.compare``): one row per family (verdict, fitted law and
    exponent as estimates, the certified error at each size, the size and qubits needed for
    each goal). format: 'html' (default), 'md', 'tex' (a LaTeX table for papers) or 'pdf'
    (needs path). figures: SVG texts (:func:`plot_svg`). Returns the text, or writes path
    and returns it."""
    fmt = format or (str(path).rsplit(".", 1)[-1].lower() if path is not None and "." in
                     str(path) else "html")
    sizes = [_num.show_int(n) if isinstance(n, int) else str(n) for n in comparison.sizes]
    goals = list(comparison.goals)
    cells = []
    for row in comparison.rows:
        v = row.get("verdict")
        errs = row.get("errors")
        needs = row.get("sizes") or [None] * len(goals)
        exponent = ("g = %.3g (estimate)" % v.exponent) if v is not None and v.law != "none" \
            and v.exponent == v.exponent else None
        lim = v.limit if v is not None else (None, None)
        notes = str(row["error"]) if row.get("error") is not None else None
        cells += [row["family"], row.get("weight"), v.verdict if v else None,
                  (v.law_formula if v and v.law != "none" else None), exponent,
                  ("%.6g" % lim[0]) if lim[0] is not None and lim[0] == lim[0] else None,
                  ("%.6g" % lim[1]) if lim[1] is not None and lim[1] == lim[1] else None, notes]
        for k in range(len(sizes)):
            e = errs[k] if errs is not None else None
            cells.append(e.certified if e is not None and e.ok else None)
        for s in needs:
            cells.append(None if s is None else _num.show_int(s.n) if s.status == "found"
                         else ("never" if s.never else s.status.replace("_", " ")))
        for s in needs:
            cells.append(str(s.qubits) if s is not None and s.status == "found" else None)
    keep = []

    def arr(items):
        cs = [_ffi.cstr(x) if x is not None else ffi.NULL for x in items]
        keep.extend(cs)
        return ffi.new("char *[]", cs) if cs else ffi.NULL

    def opt(x):
        return _ffi.cstr(x) if x else ffi.NULL
    title_c, sub_c = opt(title or "embz comparison"), opt(subtitle or "target: %s" % comparison.target)
    intro_c, foot_c, fmt_c = opt(intro), opt(footer), opt(fmt)
    path_c = opt(str(path)) if path is not None else ffi.NULL
    out = ffi.new("char **")
    err = ffi.new("embz_flat_err *")
    st = lib.embz_flat_report(out if path is None else ffi.NULL, title_c, sub_c, intro_c,
                              len(sizes), arr(sizes), len(goals), arr(goals),
                              len(comparison.rows), arr(cells), len(figures),
                              arr(captions or [None] * len(figures)), arr(list(figures)),
                              foot_c, fmt_c, path_c, err)
    if st != _ffi.OK:
        raise from_err(err, st)
    if path is not None:
        return path
    try:
        return _ffi.text(out[0])
    finally:
        lib.embz_flat_str_free(out[0])


def report_html(comparison, figures=(), title="embz comparison"):
    """The comparison as one HTML document (the C renderer; see :func:`report`)."""
    return report(comparison, format="html", figures=figures, title=title)
