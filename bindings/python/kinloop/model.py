"""Model: a linkage description over the kl_model handle. The plain
builders and getters are generated (kinloop._api.ModelMethods); this adds
lifetime and allocators, the loops' joint lists, model files, and the
read-only view of a model another handle owns (a study's nominal model)."""

import ctypes
import weakref

from . import _api, raw
from ._args import refuse
from ._core import Handle, KinloopError, check_report, text
from ._header import Status


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
    return raw.kl_alloc_fn(hook)


def _free_model(ptr, hook):
    # The library keeps the model for the solvers and studies made from it
    # (kl_model_free); they keep `hook`, its allocator, alive as long.
    raw.lib.kl_model_free(ptr)


def _release_view():
    """A borrowed model is not ours to free: closing the view only ends it."""


def row_layout(mh):
    """Model.row_layout of the C model `mh`."""
    layout, count, quantity = {}, ctypes.c_int(), 0
    while True:
        first = _api.kl_model_row_offset(mh, quantity, ctypes.byref(count))
        if first < 0:  # past the last quantity (or not finalized)
            return layout
        layout[text(_api.kl_quantity_str(quantity))] = (first, count.value)
        quantity += 1


def read_handle(reader, what, *args):
    """The handle a reader (kl_model_read, kl_study_read_file, ...) makes
    from `args` and a kl_io_error, or the error it reports."""
    err = raw.kl_io_error()
    ptr = reader(*args, ctypes.byref(err))
    if not ptr:
        check_report(err.status or Status.ENOMEM, err, what)
    return ptr


def data_of(source, function):
    """Model or study file text: str as UTF-8, or bytes as they are; any
    other value is refused (bytes(5) would be five NUL bytes)."""
    if isinstance(source, str):
        try:
            return source.encode("utf-8")
        except UnicodeEncodeError as e:
            refuse(function, "text", "cannot be encoded as UTF-8: %s" % e.reason)
    if isinstance(source, (bytes, bytearray, memoryview)):
        return bytes(source)
    refuse(function, "text", "must be a str or bytes; got %s" % type(source).__name__)


class Model(_api.ModelMethods, Handle):
    """A kinloop model (kl_model). Build it, finalize it, make Solvers.

    ``with Model() as m:`` lets go of it (kl_model_free) on leaving the
    block; otherwise it goes when garbage-collected, exactly once either
    way. Its Solvers and Studies keep working after it is closed: the
    library keeps the model for them.
    `allocator`, if given, is a callable (ptr, old_size, new_size) -> address
    used for every allocation of the model and its solvers (see
    allocator_hook). A Study's `model` is a borrowed Model (`borrowed` is
    true): it keeps the study alive, refuses changes, and is never freed
    here."""

    def __init__(self, allocator=None):
        if allocator is None:
            hook, ptr = None, raw.lib.kl_model_new()
        else:
            hook = allocator_hook(allocator)
            ptr = raw.lib.kl_model_new_with_alloc(hook, None)
        if not ptr:
            raise KinloopError(Status.ENOMEM, "kl_model_new: out of memory")
        self._adopt(ptr, hook)

    @classmethod
    def _adopting(cls, ptr, hook=None, owner=None):
        """A Model for a handle made elsewhere; with `owner`, a view of a
        finalized model that `owner` holds and frees (a Study): the view
        keeps its owner alive, never frees the model, and refuses every
        call that would change it."""
        model = cls.__new__(cls)
        model._adopt(ptr, hook, owner)
        return model

    def _adopt(self, ptr, hook, owner=None):
        self._ptr = ptr
        self._hook = hook  # its Solvers and Studies keep it too
        self._owner = owner
        if owner is None:
            self._finalizer = weakref.finalize(self, _free_model, ptr, hook)
        else:
            self._finalizer = weakref.finalize(self, _release_view)

    # ---- lifetime ----

    @property
    def _changing(self):
        """Refused for a borrowed model: the library would answer KL_ESTATE
        (it is finalized) but write its message into a model that is not
        ours, and that its owner may be using on other threads."""
        handle = self._handle
        if self._owner is not None:
            raise KinloopError(Status.ESTATE, "the model belongs to a study and "
                               "cannot change (it is finalized)")
        return handle

    def close(self):
        """Lets go of the model (kl_model_free); later calls of its methods
        raise ValueError, closing twice does nothing. Solvers and studies
        made from it keep working (the library frees the model after the
        last of them). For a borrowed model (Study.model) it closes the
        view only."""
        self._finalizer()

    def finalize(self):
        """Checks the topology and prepares the equations; the model is
        immutable afterwards. A study's model is finalized already: for it,
        as for any finalized model, this does nothing."""
        if self._owner is None:
            super().finalize()

    @property
    def borrowed(self):
        """Whether this is a view of a model another handle owns (Study.model)."""
        return self._owner is not None

    def __repr__(self):
        if self.closed:
            return "<kinloop.Model (closed)>"
        return "<kinloop.Model: %d links, %d joints, %d points, %d inputs%s%s>" % (
            self.link_count, self.joint_count, self.point_count,
            self.input_count, ", finalized" if self.is_finalized else "",
            ", borrowed from a study" if self.borrowed else "")

    # ---- the joints of loops, the loads ----

    @property
    def loops(self):
        return [self.loop(k) for k in range(self.loop_count)]

    @property
    def _model_ptr(self):
        """The model of a generated method's arrays per item (kl_model_<item>_count)."""
        return self._handle

    @property
    def loads(self):
        """The loads the model records (kl_model_load), as Load values in
        order: what Solver.cycle_summarize(m.loads, m.cycle) takes."""
        return [self.load(k) for k in range(self.load_count)]

    # ---- what a finalized model says of its rows ----

    @property
    def row_layout(self):
        """Where each quantity of a row (kl_solver_row) lies: {name: (first
        column, columns)}, in enum kl_quantity's order, names by
        kl_quantity_str. Empty before finalize."""
        return row_layout(self._handle)

    # ---- model files ----

    @classmethod
    def read_text(cls, source, allocator=None):
        """A finalized model from model-file text (str, or bytes as they are)."""
        data = data_of(source, "kl_model_read")
        if allocator is None:
            return cls._adopting(read_handle(_api.kl_model_read, "read_text", data, len(data)))
        hook = allocator_hook(allocator)
        return cls._adopting(read_handle(_api.kl_model_read_with_alloc, "read_text", data,
                                         len(data), hook, None), hook)

    @classmethod
    def read_file(cls, path):
        """A finalized model from the model file at `path`."""
        return cls._adopting(read_handle(_api.kl_model_read_file, "read_file(%r)" % (path,),
                                         path))

    #: the model as model-file text (a byte that is not UTF-8, from a name
    #: given as bytes, reads as U+FFFD, as in every string from C)
    to_text = _api.ModelMethods.write
