"""Conversion, sweeps with fitted laws, verdicts, scans, the size search and comparisons."""

import html
import math
from fractions import Fraction

from . import _ffi, _num
from ._core import (Ball, ErrorSeries, _html_table, as_family, as_target, call_table,
                    make_opts, errors)
from ._errors import EmbzError
from ._ffi import ffi, lib


def _opt_size(n):
    return _ffi.cstr(_num.size_text(n)) if n is not None else ffi.NULL


# ------------------------------------------------------------------ conversion

class Conversion:
    """Exact LOCC convertibility of two Schmidt vectors and how far from possible it is:
    ``convertible`` (FROM majorized by TO, Nielsen's test), ``reverse_convertible``,
    ``K_forward``/``K_backward`` (exact Fractions, the conversion distance, with
    ``argk_forward``/``argk_backward``), ``F_forward``/``F_backward`` (the optimal LOCC
    fidelity as :class:`Ball`) and ``P_forward``/``P_backward`` (the purified distance)."""

    def __init__(self, row):
        self.convertible = row["convertible"] == "1"
        self.reverse_convertible = row["reverse_convertible"] == "1"
        self.from_len = int(row["from_len"])
        self.to_len = int(row["to_len"])
        self.from_normalised = row["from_normalised"] == "1"
        self.to_normalised = row["to_normalised"] == "1"
        for d in ("forward", "backward"):
            setattr(self, "K_" + d, Fraction(row["K_" + d]))
            setattr(self, "argk_" + d, int(row["K_%s_argk" % d]))
            setattr(self, "F_" + d, Ball(row, "F_" + d))
            setattr(self, "P_" + d, Ball(row, "P_" + d))

    def __repr__(self):
        return ("Conversion(convertible=%s, K_forward=%s, K_backward=%s, F_forward=%s)"
                % (self.convertible, self.K_forward, self.K_backward, self.F_forward))

    def _repr_html_(self):
        return _html_table([
            ("FROM -> TO exactly", "possible" if self.convertible else "not possible"),
            ("TO -> FROM exactly", "possible" if self.reverse_convertible else "not possible"),
            ("K(FROM -> TO)", "%s (k = %d)" % (self.K_forward, self.argk_forward)),
            ("K(TO -> FROM)", "%s (k = %d)" % (self.K_backward, self.argk_backward)),
            ("F_max(FROM -> TO)", self.F_forward.certified),
            ("P(FROM -> TO)", self.P_forward.certified),
            ("F_max(TO -> FROM)", self.F_backward.certified),
            ("P(TO -> FROM)", self.P_backward.certified)])


def _vector_text(v):
    if isinstance(v, str):
        return v
    return ",".join(_num.number_text(x) for x in v)


def convert(p, r, *, amplitude=False):
    """Compare two pure states given by their Schmidt probabilities p and r (sequences of
    numbers or texts '0.4,0.4,0.1,0.1'; normalised to sum 1): a :class:`Conversion`."""
    a, b = _ffi.cstr(_vector_text(p)), _ffi.cstr(_vector_text(r))
    rows = call_table(lambda out, e: lib.embz_flat_convert(out, a, b, 1 if amplitude else 0, e))
    return Conversion(rows[0])


# ------------------------------------------------------------------ sweeps

class Fit:
    """One fitted decay law (an estimate, never certified): ``law`` ('power_limit', 'log',
    'loglog', 'log_limit'), ``formula``, ``ok`` and, when ok, ``L``, ``C``, ``g`` with
    jackknife intervals (``L_lo`` ...), ``rss``, ``max_rel``, ``bic``."""

    KEYS = ("L", "L_lo", "L_hi", "C", "C_lo", "C_hi", "g", "g_lo", "g_hi", "rss", "max_rel",
            "bic")

    def __init__(self, row):
        self.law = row["law"]
        self.formula = row["formula"]
        self.ok = row["ok"] == "1"
        for k in self.KEYS:
            setattr(self, k, _num.num(row.get(k)))

    def __repr__(self):
        if not self.ok:
            return "Fit(%s, not converged)" % self.law
        return "Fit(%s: %s, L=%.6g, C=%.6g, g=%.6g)" % (self.law, self.formula, self.L, self.C,
                                                      self.g)


class Sweep:
    """E_n(q) over log-spaced sizes (``points``, an :class:`ErrorSeries`) and the fitted laws
    (``fits``; ``best``, the law with the lowest BIC, or None). Fits are estimates.
    ``narrowed_to`` is None, or the largest size the sweep was cut to when the analytic engine
    cannot take the family (explicit summation's reach; ``narrowed_why`` says why)."""

    def __init__(self, rows, family, target):
        pts = [r for r in rows if r.get("kind") == "point"]
        self.points = ErrorSeries(pts, family, target)
        self.fits = [Fit(r) for r in rows if r.get("kind") == "fit"]
        summary = [r for r in rows if r.get("kind") == "summary"][0]
        self.family = family
        self.target = target
        best = summary.get("best", "none")
        self.best = next((f for f in self.fits if f.law == best and f.ok), None)
        self.fit_message = summary.get("fit_message", "")
        self.prec = int(summary.get("prec", 64))
        self.narrowed_to = int(summary["narrowed_to"]) if "narrowed_to" in summary else None
        self.narrowed_why = summary.get("narrowed_why", "")

    @property
    def n(self):
        return self.points.n

    @property
    def lo(self):
        return self.points.lo

    @property
    def hi(self):
        return self.points.hi

    @property
    def mid(self):
        return self.points.mid

    def __repr__(self):
        return "Sweep(%s, %d sizes, best law %s)" % (self.family, len(self.points),
                                                    self.best.law if self.best else "none")

    def _repr_html_(self):
        fits = "".join("<tr><td>%s</td><td>%s</td><td>%s</td></tr>" % (
            html.escape(f.law), html.escape(f.formula),
            "L = %.6g, C = %.6g, g = %.6g [%.4g, %.4g]" % (f.L, f.C, f.g, f.g_lo, f.g_hi)
            if f.ok else "not converged") for f in self.fits)
        best = self.best.law if self.best else "none"
        return (self.points._repr_html_() + "<table><caption>fitted laws (estimates), best: %s"
                "</caption>%s</table>" % (html.escape(best), fits))


def sweep(family, start=None, stop=None, points=None, target=None, *, prec=None, digits=None,
          seconds=None, cancel=None, threads=None, amplitude=False, params=None,
          **parameters):
    """E_n(q) at ``points`` log-spaced sizes from start to stop (the defaults of every sweep:
    16 sizes from 10^2 to 10^120; the sweep policy of ``embz sweep``: precision 64 bits by
    default, retried at higher precision when too few
    digits are certified) and the fitted decay laws: a :class:`Sweep`. ``threads`` sizes are
    computed at a time (default 1). A family the analytic engine cannot take is swept up to
    the reach of explicit summation instead (``Sweep.narrowed_to``). It can be stopped by
    Ctrl-C or an :class:`embz.Cancel`."""
    fam = as_family(family, params, amplitude, **parameters)
    q = as_target(target)
    a, b = _opt_size(start), _opt_size(stop)
    o = make_opts(prec=prec, digits=digits, seconds=seconds, threads=threads)
    rows = call_table(lambda out, e: lib.embz_flat_sweep(out, fam._h, a, b, int(points or 0), q._h,
                                                         o, e), o, cancel)
    return Sweep(rows, fam.label, q.label)


# ------------------------------------------------------------------ verdicts

def _verdict_fields(obj, row):
    obj.verdict = row["verdict"]
    obj.numeric_verdict = row["numeric_verdict"]
    obj.analytic_verdict = row["analytic_verdict"] or None
    obj.analytic_available = row["analytic_available"] == "1"
    obj.disagree = row["disagree"] == "1"
    obj.limit = (_num.num(row["limit_lo"]), _num.num(row["limit_hi"]))
    obj.limit_value = _num.num(row["limit_value"])
    obj.limit_by_criterion = row.get("limit_by_criterion") == "1"
    obj.law = row["law"]
    obj.law_formula = row["law_formula"]
    obj.exponent = _num.num(row["exponent"])
    obj.exponent_interval = (_num.num(row["exponent_lo"]), _num.num(row["exponent_hi"]))
    obj.coeff = _num.num(row["coeff"])
    obj.asymptotic_form = row["asymptotic_form"] or None
    obj.analytic_rate = row["analytic_rate"] or None


class Verdict:
    """Is the family a universal embezzler, and how fast does its one-ebit error fall?
    ``verdict`` ('embezzler', 'not_embezzler', 'inconclusive'), the two routes'
    ``numeric_verdict`` and ``analytic_verdict``, ``disagree``, ``limit`` (lo, hi) and
    ``limit_value``, the fitted ``law``, ``exponent`` and ``coeff`` (estimates),
    ``asymptotic_form``, ``analytic_rate``, ``reasons`` (sentences) and ``points`` (the
    sweep, an :class:`ErrorSeries`)."""

    def __init__(self, rows, family):
        self.family = family
        _verdict_fields(self, [r for r in rows if r.get("kind") == "verdict"][0])
        self.reasons = [r["text"] for r in rows if r.get("kind") == "fact"]
        self.points = ErrorSeries([r for r in rows if r.get("kind") == "point"], family, "ebit")

    def __str__(self):
        return "%s: %s" % (self.family, self.verdict)

    def __repr__(self):
        return "Verdict(%r, %s, law %s)" % (self.family, self.verdict, self.law)

    def _repr_html_(self):
        rows = [("family", self.family), ("verdict", self.verdict),
                ("numeric route", self.numeric_verdict),
                ("analytic route", self.analytic_verdict or "not applicable")]
        if self.asymptotic_form:
            rows.append(("f ~", self.asymptotic_form))
        if self.analytic_rate:
            rows.append(("rate (predicted)", self.analytic_rate))
        if self.law != "none":
            rows.append(("law (fitted estimate)", "%s, g = %.5g" % (self.law_formula,
                                                                     self.exponent)))
        rows += [("reason", r) for r in self.reasons]
        return _html_table(rows)


def classify(family, *, start=None, stop=None, points=None, prec=None, amplitude=False,
             params=None, **parameters):
    """The one-ebit verdict of ``embz classify`` (numeric route: a sweep from 10^2 to 10^120,
    16 points, and fits; analytic route: the asymptotic expansion of the weight): a
    :class:`Verdict`. Runs to its end (no cancel)."""
    fam = as_family(family, params, amplitude, **parameters)
    a, b = _opt_size(start), _opt_size(stop)
    o = make_opts(prec=prec)
    rows = call_table(lambda out, e: lib.embz_flat_classify(out, fam._h, a, b, int(points or 0),
                                                            o, e), o)
    return Verdict(rows, fam.label)


class ScanResult:
    """The verdicts over a parameter grid: ``records`` (a list of dicts: index, the
    parameters as Fractions, status, verdict, law, exponent, limit_lo, limit_hi, ...) and
    :meth:`to_numpy` (a structured array)."""

    def __init__(self, rows, names, family):
        self.family = family
        self.names = names
        self.records = []
        for r in rows:
            rec = {"index": int(r["index"])}
            for k in names:
                rec[k] = Fraction(r["param:" + k])
            rec["status"] = "ok" if r["status"] == "0" else r["message"]
            for k in ("verdict", "numeric_verdict", "analytic_verdict", "law"):
                rec[k] = r[k]
            for k in ("exponent", "exponent_lo", "exponent_hi", "limit_lo", "limit_hi",
                      "limit_value"):
                rec[k] = _num.num(r[k])
            rec["asymptotic_form"] = r["asymptotic_form"]
            self.records.append(rec)

    def __len__(self):
        return len(self.records)

    def __iter__(self):
        return iter(self.records)

    def __getitem__(self, k):
        return self.records[k]

    def to_numpy(self):
        """A NumPy structured array (parameters and numbers as float64, texts as str)."""
        np = _num.numpy
        if np is None:
            raise ImportError("to_numpy needs NumPy")
        fields = ([("index", "i8")] + [(k, "f8") for k in self.names]
                  + [("verdict", "U16"), ("law", "U16"), ("exponent", "f8"),
                     ("limit_lo", "f8"), ("limit_hi", "f8"), ("status", "U64")])
        return np.array([tuple([r["index"]] + [float(r[k]) for k in self.names]
                               + [r["verdict"], r["law"], r["exponent"], r["limit_lo"],
                                  r["limit_hi"], r["status"][:64]]) for r in self.records],
                        dtype=fields)

    def _repr_html_(self):
        head = "".join("<th>%s</th>" % html.escape(k) for k in
                       ["index"] + self.names + ["verdict", "law", "exponent"])
        body = "".join("<tr>%s</tr>" % "".join(
            "<td>%s</td>" % html.escape(str(v)) for v in
            [r["index"]] + [r[k] for k in self.names]
            + [r["verdict"], r["law"], "%.4g" % r["exponent"]]) for r in self.records)
        return "<table><tr>%s</tr>%s</table>" % (head, body)


def _axis_text(name, spec):
    if isinstance(spec, str):
        return "%s=%s" % (name, spec)
    lo, hi, count = spec
    return "%s=%s..%s,count=%d" % (name, _num.number_text(lo), _num.number_text(hi), int(count))


def scan(family, grid, *, start=None, stop=None, points=None, prec=None, threads=None,
         amplitude=False, params=None, **parameters):
    """Verdicts over a parameter grid (``embz scan``). grid: a dict {name: (lo, hi, count)}
    or {name: 'lo..hi,count=N'}, or a list of 'name=lo..hi,count=N' texts (count values
    from lo to hi, both ends included). A :class:`ScanResult`; runs to its end."""
    fam = as_family(family, params, amplitude, **parameters)
    if isinstance(grid, dict):
        axes = [_axis_text(k, v) for k, v in grid.items()]
    elif isinstance(grid, str):
        axes = [grid]
    else:
        axes = list(grid)
    names = [a.split("=", 1)[0].strip() for a in axes]
    ca, keep = _ffi.cstr_array(axes)
    a, b = _opt_size(start), _opt_size(stop)
    o = make_opts(prec=prec, threads=threads)
    rows = call_table(lambda out, e: lib.embz_flat_scan(out, fam._h, ca, len(axes), a, b,
                                                        int(points or 0), o, e), o)
    return ScanResult(rows, names, fam.label)


# ------------------------------------------------------------------ sizes

class SizeResult:
    """The smallest size whose error reaches the goal (``embz size``): ``status`` ('found',
    'not_reached', 'undecided'); when found ``n``, ``qubits`` (ceil(log2 n) per side),
    ``n_low`` (a size certified above the goal), ``exhaustive`` (n proven smallest),
    ``error_at_n`` and ``error_below`` (:class:`Ball`); when not reached ``largest``,
    ``error_at_largest`` and ``never`` (the derived one-ebit limit lies above the goal).
    ``explicit_only`` is True when the analytic engine cannot take the family: the search
    stayed within ``reach`` (what explicit summation reaches; ``why`` says why)."""

    def __init__(self, row, family, target):
        self.family = family
        self.target = target
        self.status = row["status"]
        self.eps = row["eps"]
        self.evaluations = int(row["evaluations"])
        self.qubits_only = row["qubits_only"] == "1"
        self.explicit_only = row.get("explicit_only") == "1"
        self.reach = int(row["reach"]) if self.explicit_only else None
        self.why = row.get("why", "")
        # the measure searched: 'k', or 'purified' decided on enclosures of P ('direct') or
        # one side of the bracket from K ('lower', 'upper'; see SizeBracket)
        self.measure = row.get("measure", "k")
        self.route = row.get("route", "k")
        self.bounds_seen = row.get("bounds_seen") == "1"
        self.n = self.qubits = self.n_low = None
        self.never = False
        self.exhaustive = False
        if self.status == "found":
            self.n = _num.big_int(row["n"], row["n_hex"])
            self.qubits = int(row["qubits"])
            self.n_low = _num.big_int(row["n_low"], row["n_low_hex"])
            self.exhaustive = row["exhaustive"] == "1"
            self.checked_below = int(row["checked_below"])
            self.stay_checked_to = _num.big_int(row["stay_checked_to"],
                                                row["stay_checked_to_hex"])
            self.again_above = _num.big_int(row["again_above"], row["again_above_hex"]) or None
            self.error_at_n = Ball(row, "err")
            self.error_below = Ball(row, "prev")
        elif self.status == "not_reached":
            self.largest = _num.big_int(row["largest"], row["largest_hex"])
            self.error_at_largest = Ball(row, "largest")
            self.never = row.get("never") == "1"
            self.limit = Ball(row, "limit") if row.get("limit_lo") else None
        else:
            self.undecided = _num.big_int(row["undecided_lo"], row["undecided_lo_hex"])
            # a certified bracket (n_low, n] of a crossing, and the qubits when all agree
            if row.get("bracket") == "1":
                self.n_low = _num.big_int(row["n_low"], row["n_low_hex"])
                self.n = _num.big_int(row["n"], row["n_hex"])
                self.qubits = int(row["qubits"]) if int(row["qubits"]) >= 0 else None

    def __str__(self):
        if self.status == "found":
            return "n = %s (%d qubits per side) reaches E <= %s for %s, target %s" % (
                _num.show_int(self.n), self.qubits, self.eps, self.family, self.target)
        if self.status == "not_reached":
            return "%s: E <= %s %s" % (self.family, self.eps,
                                       "never reached" if self.never else
                                       "not reached up to n = " + _num.show_int(self.largest))
        return "%s: undecided at n = %s" % (self.family, _num.show_int(self.undecided))

    def __repr__(self):
        return "SizeResult(%s, n=%s)" % (self.status, self.n)

    def _repr_html_(self):
        return _html_table([("goal", "E <= %s" % self.eps), ("result", str(self))])


class SizeBracket:
    """The smallest n with P_n <= eps bracketed between two searches on K (``embz size
    --measure purified`` where P has certified bounds only at the size that matters):
    ``status`` is 'bracket', ``lower`` the :class:`SizeResult` for K <= eps (P >= K, so P needs
    at least that size) and ``upper`` the one for K <= 1 - sqrt(1 - eps^2) (P <= sqrt(K (2 -
    K)), so that size suffices; its goal in ``upper_goal``, a :class:`Ball`). ``n_min`` and
    ``n_max`` are the two sizes where found, else None."""

    def __init__(self, lower, upper, upper_goal, family, target, eps):
        self.status = "bracket"
        self.measure = "purified"
        self.route = "bracket"
        self.family = family
        self.target = target
        self.eps = eps
        self.lower = lower
        self.upper = upper
        self.upper_goal = upper_goal
        self.n_min = lower.n if lower.status == "found" else None
        self.n_max = upper.n if upper.status == "found" else None

    def __str__(self):
        lo = _num.show_int(self.n_min) if self.n_min is not None else "?"
        hi = _num.show_int(self.n_max) if self.n_max is not None else "?"
        return "P <= %s for %s, target %s: the smallest n lies in [%s, %s] (from K)" % (
            self.eps, self.family, self.target, lo, hi)

    def __repr__(self):
        return "SizeBracket(n_min=%s, n_max=%s)" % (self.n_min, self.n_max)

    def _repr_html_(self):
        return _html_table([("goal", "P <= %s" % self.eps), ("result", str(self))])


def size(family, eps, target=None, *, qubits=False, prec=None, amplitude=False, params=None,
         measure="k", **parameters):
    """The smallest n with E_n(q) <= eps (eps an exact number: 0.01, '1e-3', Fraction(1, 100)):
    a :class:`SizeResult`. qubits=True stops once the qubits per side are decided.
    measure='purified' searches P_n <= eps instead (as ``embz size --measure purified``): a
    :class:`SizeResult` decided on certified enclosures of P (``route`` 'direct'), or, where P
    has bounds only at the size left open, a :class:`SizeBracket` from two searches on K."""
    fam = as_family(family, params, amplitude, **parameters)
    q = as_target(target)
    ce = _ffi.cstr(_num.number_text(eps))
    o = make_opts(prec=prec, measure="k" if measure is None else measure)
    rows = call_table(lambda out, e: lib.embz_flat_size(out, fam._h, ce, q._h,
                                                        1 if qubits else 0, o, e), o)
    if rows[0].get("route", "direct") == "direct":
        return SizeResult(rows[0], fam.label, q.label)
    lower = SizeResult(rows[0], fam.label, q.label)
    upper = SizeResult(rows[1], fam.label, q.label)
    return SizeBracket(lower, upper, Ball(rows[1], "goal"), fam.label, q.label,
                       rows[0]["eps"])


# ------------------------------------------------------------------ comparisons

class Comparison:
    """Several families side by side: ``rows``, one dict per family with ``family``,
    ``verdict`` (a :class:`Verdict`), ``errors`` (an :class:`ErrorSeries` at the chosen
    sizes) and ``sizes`` (a :class:`SizeResult` per goal); a failure keeps its ``error``."""

    def __init__(self, rows, sizes, goals, target):
        self.rows = rows
        self.sizes = sizes
        self.goals = goals
        self.target = target

    def __iter__(self):
        return iter(self.rows)

    def __len__(self):
        return len(self.rows)

    def to_records(self):
        """A flat list of dicts (family, verdict, law, E at each size, n for each goal)."""
        out = []
        for r in self.rows:
            rec = {"family": r["family"], "status": "ok" if r.get("error") is None
                   else str(r["error"])}
            v = r.get("verdict")
            rec["verdict"] = v.verdict if v else None
            rec["law"] = v.law if v else None
            for n, e in zip(self.sizes, (r.get("errors") or [None] * len(self.sizes))):
                rec["E(%s)" % _size_label(n)] = e.certified if e is not None and e.ok \
                    else None
            for g, s in zip(self.goals, (r.get("sizes") or [None] * len(self.goals))):
                rec["n(E<=%s)" % g] = (s.n if s is not None and s.status == "found" else
                                       ("never" if s is not None and s.never else None))
            out.append(rec)
        return out

    def _repr_html_(self):
        recs = self.to_records()
        if not recs:
            return "<table></table>"
        keys = list(recs[0])
        head = "".join("<th>%s</th>" % html.escape(k) for k in keys)
        body = "".join("<tr>%s</tr>" % "".join(
            "<td>%s</td>" % html.escape("" if r[k] is None else
                                        (_num.show_int(r[k]) if isinstance(r[k], int)
                                         else str(r[k]))) for k in keys) for r in recs)
        return "<table><caption>target %s</caption><tr>%s</tr>%s</table>" % (
            html.escape(self.target), head, body)


def _size_label(n):
    return _num.show_int(n) if isinstance(n, int) else str(n)


def compare(families, *, sizes=(), eps=(), target=None, classify_families=True):
    """The comparison table of several families (as ``embz report``): for each, the verdict
    (one ebit), the certified E at the given sizes for the target, and the smallest size
    (qubit resolution) for each error goal in eps. A :class:`Comparison`."""
    q = as_target(target)
    rows = []
    for f in families:
        fam = as_family(f)
        row = {"family": fam.label, "weight": ("(%s)^2" % fam.weight_text) if fam.amplitude
               else fam.weight_text}
        try:
            if classify_families:
                row["verdict"] = classify(fam)
            if sizes:
                row["errors"] = errors(fam, list(sizes), q)
            row["sizes"] = [size(fam, g, q, qubits=True) for g in eps]
        except EmbzError as e:
            row["error"] = e
        rows.append(row)
    return Comparison(rows, list(sizes), [_num.number_text(g) for g in eps], q.label)
