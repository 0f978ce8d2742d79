"""Loading libembz (cffi, ABI mode) and calling its flat interface (include/embz/flat.h).

Where the library is looked for, first hit wins:

1. ``$EMBZ_LIBRARY``: the path of ``libembz.so`` (the build tree: ``build/libembz.so``);
2. the library directory recorded at ``meson install`` (``embz/_paths.py``), also below a
   ``--destdir`` root;
3. the system's search (``ctypes.util.find_library('embz')``, then ``libembz.so.0``).

Every call into the library releases the GIL (cffi does so for ABI calls), so several
threads can compute at once. A call made from the main thread runs in a helper thread
while the main thread waits: Ctrl-C then raises KeyboardInterrupt at once, the call is told
to stop through its cancel flag and the library is left ready for the next call.
"""

import ctypes.util
import os
import threading

import cffi

from ._cdef import CDEF

ffi = cffi.FFI()
ffi.cdef(CDEF)

# status codes of include/embz/err.h
OK, ERR_INPUT, ERR_DOMAIN, ERR_NONSMOOTH, ERR_PREC, ERR_LIMIT, ERR_UNSUPPORTED, ERR_IO, \
    ERR_NOMEM = 0, 2, 3, 4, 5, 6, 7, 8, 9
STATUS_NAMES = {OK: "ok", ERR_INPUT: "input", ERR_DOMAIN: "domain", ERR_NONSMOOTH: "nonsmooth",
                ERR_PREC: "precision", ERR_LIMIT: "limit", ERR_UNSUPPORTED: "unsupported",
                ERR_IO: "io", ERR_NOMEM: "memory"}


def _candidates():
    env = os.environ.get("EMBZ_LIBRARY")
    if env:
        yield env
        return
    try:
        from . import _paths
    except ImportError:
        _paths = None
    if _paths is not None:
        here = os.path.dirname(os.path.abspath(__file__))
        pkg = os.path.join(os.path.normpath(_paths.PYTHON_DIR), "embz")
        roots = [""]
        if here.endswith(pkg) and len(here) > len(pkg):   # installed below a --destdir root
            roots.insert(0, here[: len(here) - len(pkg)])
        for root in roots:
            for name in ("libembz.so.0", "libembz.so"):
                yield root + os.path.join(_paths.LIBDIR, name)
    found = ctypes.util.find_library("embz")
    if found:
        yield found
    yield "libembz.so.0"


def _load():
    tried = []
    for path in _candidates():
        if os.path.isabs(path) and not os.path.exists(path):
            tried.append(path + " (absent)")
            continue
        try:
            return ffi.dlopen(path), path
        except OSError as e:
            tried.append("%s (%s)" % (path, e))
    raise ImportError("embz: libembz not found; set EMBZ_LIBRARY to the path of libembz.so. "
                      "Tried: " + "; ".join(tried))


lib, LIBRARY_PATH = _load()


def text(p):
    """A C string (NULL: None) as a Python str."""
    if p == ffi.NULL:
        return None
    return ffi.string(p).decode("utf-8", "replace")


def cstr(s):
    """A Python str as a C string kept alive by the returned object."""
    return ffi.new("char[]", s.encode("utf-8"))


def cstr_array(items):
    """A (char *[]) of the texts, and the objects that keep them alive."""
    keep = [cstr(s) for s in items]
    arr = ffi.new("char *[]", keep) if keep else ffi.NULL
    return arr, keep


def table_rows(t):
    """The rows of an embz_flat_table as a list of dicts of str (and frees nothing)."""
    rows = []
    for r in range(lib.embz_flat_rows(t)):
        n = lib.embz_flat_nkeys(t, r)
        rows.append({text(lib.embz_flat_key(t, r, j)): text(lib.embz_flat_value(t, r, j))
                     for j in range(n)})
    return rows


class Cancel:
    """A cancel flag for long calls: pass it as ``cancel=`` and call :meth:`set` from another
    thread; the call then raises :class:`embz.Cancelled` and the library stays usable."""

    def __init__(self):
        self._flag = ffi.new("int *", 0)

    def set(self):
        self._flag[0] = 1

    def clear(self):
        self._flag[0] = 0

    @property
    def is_set(self):
        return self._flag[0] != 0


def run(fn, cancel=None):
    """Runs fn(flag) where flag is the C int * cancel flag of the call. From the main thread
    the call goes to a helper thread, so that Ctrl-C (KeyboardInterrupt) reaches Python at
    once; it then sets the flag, waits for the call to stop and re-raises."""
    token = cancel if cancel is not None else Cancel()
    flag = token._flag
    if threading.current_thread() is not threading.main_thread():
        return fn(flag)
    box = {}

    def work():
        try:
            box["value"] = fn(flag)
        except BaseException as e:          # handed to the caller below
            box["error"] = e
        finally:
            lib.embz_flat_thread_cleanup()  # FLINT's caches of this thread, before it ends

    th = threading.Thread(target=work, name="embz-call", daemon=True)
    th.start()
    try:
        while th.is_alive():
            th.join(0.25)
    except KeyboardInterrupt:
        flag[0] = 1
        while th.is_alive():
            try:
                th.join(0.25)
            except KeyboardInterrupt:   # a second Ctrl-C while stopping: keep waiting
                pass
        raise
    if "error" in box:
        raise box["error"]
    return box["value"]
