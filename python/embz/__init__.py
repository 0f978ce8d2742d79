"""embz: certified embezzlement errors of embezzling families, from Python.

A binding over libembz (cffi, ABI mode, through the flat interface include/embz/flat.h)::

    >>> import embz
    >>> print(embz.error('1/i', n=10**30))
    E = 0.00995118060022704511501427270235 (certified digits) for 1/i at n = 10^30, ...

Families (:class:`Family`) come from a library name, a family file or an expression in i
and n, with parameters as keyword arguments. Every error is a certified enclosure with
exact decimal ends (:class:`ErrorResult`); many sizes come back as an
:class:`ErrorSeries` with NumPy columns. See docs/python.md.
"""

from ._ffi import Cancel, LIBRARY_PATH
from ._errors import (EmbzError, InputError, DomainError, ComputeError, Cancelled)
from ._core import (Family, Target, Ball, ErrorResult, ErrorSeries, SizeFailure, error,
                    errors, families)
from ._analysis import (Conversion, Fit, Sweep, Verdict, ScanResult, SizeResult, SizeBracket,
                        Comparison, convert, sweep, classify, scan, size, compare)
from ._render import plot_svg, plot_errorbars, report, report_html
from ._ffi import lib as _lib, text as _text

__version__ = _text(_lib.embz_flat_version())

__all__ = ["Cancel", "EmbzError", "InputError", "DomainError", "ComputeError", "Cancelled",
           "Family", "Target", "Ball", "ErrorResult", "ErrorSeries", "SizeFailure", "error",
           "errors", "families", "Conversion", "Fit", "Sweep", "Verdict", "ScanResult",
           "SizeResult", "SizeBracket", "Comparison", "convert", "sweep", "classify", "scan",
           "size",
           "compare", "plot_svg", "plot_errorbars", "report", "report_html", "LIBRARY_PATH"]
