"""The exceptions of embz."""

from . import _ffi


class EmbzError(Exception):
    """Any failure reported by libembz. ``code`` is the library's status (``status`` its name),
    ``text`` the message alone, ``message`` the complete message (location, caret line)."""

    def __init__(self, message, code=_ffi.ERR_INPUT, text=None):
        super().__init__(message)
        self.message = message
        self.code = code
        self.status = _ffi.STATUS_NAMES.get(code, str(code))
        self.text = text if text is not None else message


class InputError(EmbzError, ValueError):
    """Bad input: an expression (``column``, ``source`` and ``caret`` say where), a family
    file (``file``, ``line``), a vector, a size, a target or an option value."""

    def __init__(self, message, code=_ffi.ERR_INPUT, text=None, column=0, source="", file="",
                 line=0):
        super().__init__(message, code, text)
        self.column = column
        self.source = source
        self.file = file
        self.line = line

    @property
    def caret(self):
        """The offending line with a caret under the column ("" when not known)."""
        if not self.column or not self.source:
            return ""
        return self.source + "\n" + " " * (self.column - 1) + "^"


class DomainError(InputError):
    """The weight is negative, undefined or infinite at some index (or its sign cannot be
    decided at this precision)."""


class ComputeError(EmbzError, RuntimeError):
    """A computation that could not finish: precision, a limit or budget, a method that does
    not apply, a file system failure, memory."""


class Cancelled(ComputeError):
    """The call was stopped through its cancel flag (:class:`embz.Cancel`)."""


def from_err(err, status, cancelled=False):
    """The exception for a failed call, from its embz_flat_err."""
    code = err.code or status
    message = _ffi.text(err.message) or _ffi.text(err.text) or "failed (status %d)" % code
    text = _ffi.text(err.text) or message
    if cancelled and code == _ffi.ERR_LIMIT:
        return Cancelled("cancelled", code, text)
    if code in (_ffi.ERR_INPUT, _ffi.ERR_DOMAIN):
        cls = DomainError if code == _ffi.ERR_DOMAIN else InputError
        return cls(message, code, text, column=err.col, source=_ffi.text(err.source),
                   file=_ffi.text(err.file), line=err.line)
    return ComputeError(message, code, text)


def from_row(row):
    """The exception for one failed size of a many-size result (its status and message)."""
    code = int(row.get("status", _ffi.ERR_UNSUPPORTED))
    msg = row.get("message") or _ffi.STATUS_NAMES.get(code, "failed")
    if code in (_ffi.ERR_INPUT, _ffi.ERR_DOMAIN):
        cls = DomainError if code == _ffi.ERR_DOMAIN else InputError
        return cls(msg, code)
    return ComputeError(msg, code)
