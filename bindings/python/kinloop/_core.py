"""What the generated and hand-written parts of the bindings share: the
exception, the base of every class holding a C handle, the allocator hook,
and conversions of C results (texts, statuses, enums) to Python values."""

from ._header import kl_alloc_fn
from .raw import lib


def text(value):
    """A C string result as str (None stays None)."""
    return None if value is None else value.decode("utf-8", "replace")


def status_text(status):
    return text(lib.kl_status_str(int(status)))


class KinloopError(Exception):
    """A negative kinloop status, or an argument the bindings refused
    (Status.EINVAL) before it reached C.

    status       the int status (compare with Status members)
    status_name  kl_status_str(status)
    message      the failing handle's message (kl_model_error,
                 kl_solver_error, ...), or, for calls that have no handle to
                 write to, a message the bindings compose
    line, column where a model or study file failed (None otherwise)
    result       for a failed sweep, the SweepResult of the steps delivered
    """

    def __init__(self, status, message, line=None, column=None, result=None):
        super().__init__(int(status), message)
        self.status = int(status)
        self.status_name = status_text(status)
        self.message = message or self.status_name
        self.line = line
        self.column = column
        self.result = result

    def __str__(self):
        where = ""
        if self.line:
            where = " (line %d, column %d)" % (self.line, self.column or 0)
        return "%s%s [%s, status %d]" % (self.message, where, self.status_name,
                                          self.status)


def check_const(status, call, *args):
    """The status of a call that leaves no message (a getter on a const
    handle, or a call without one): a failure names the call and its
    arguments."""
    if status < 0:
        raise KinloopError(status, "%s(%s): %s" % (call, ", ".join(map(repr, args)),
                                                   status_text(status)))
    return status


def check_report(status, report, call, *args):
    """The status of a call that reports a failure in a kl_io_error: it
    raises with the report's message, line and column."""
    if status < 0:
        shown = "(%s)" % ", ".join(map(repr, args)) if args else ""
        raise KinloopError(status, "%s%s: %s" % (call, shown, text(report.message) or ""),
                           line=report.line or None, column=report.column or None)
    return status


def as_enum(kind, value):
    """A member of the IntEnum `kind` where the value is one, else the int."""
    try:
        return kind(value)
    except ValueError:
        return value


def allocator_hook(allocator):
    """A kl_alloc_fn calling `allocator(ptr, old_size, new_size)`.

    `allocator` gets and returns addresses as ints (ptr 0 means allocate,
    new_size 0 means free); returning 0 or None, or raising, reports
    exhaustion (the library then fails with KL_ENOMEM)."""
    def hook(user, ptr, old_size, new_size):
        try:
            return allocator(ptr or 0, old_size, new_size) or None
        except Exception:
            return None
    return kl_alloc_fn(hook)


class Handle:
    """The base of every class holding a C handle: `closed`, ``with`` blocks
    that close it on leaving, and the handle checks the generated methods
    use. The generated part of each class (kinloop._api.<H>Methods) holds
    the pointer as _ptr and frees it once through _finalizer (_adopt, close)."""

    @classmethod
    def _adopting(cls, ptr, *keep):
        """An object for a handle a maker made, holding `keep` as _adopt does."""
        obj = cls.__new__(cls)
        obj._adopt(ptr, *keep)
        return obj

    @property
    def closed(self):
        return not self._finalizer.alive

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    @property
    def _handle(self):
        """The pointer for a call that reads (a const handle in C)."""
        if not self._finalizer.alive:
            raise ValueError("kinloop: the %s is closed" % type(self).__name__.lower())
        return self._ptr

    @property
    def _changing(self):
        """The pointer for a call that may change the handle."""
        return self._handle

    def _check(self, status, result=None):
        """A failure raises with the handle's message (kl_<handle>_error)."""
        if status < 0:
            message = self.error if hasattr(type(self), "error") else ""
            raise KinloopError(status, message, result=result)
        return status
