"""Model: a linkage description over the kl_model handle. Its lifetime,
makers, plain builders and getters and its lists (loops, loads) are
generated (kinloop._api.ModelMethods, with the allocator forms of its
makers); this adds the allocator hook kept with the model, the row layout, and the read-only view of a model another handle owns (a study's
nominal model)."""

import ctypes
import weakref

from . import _api
from ._core import KinloopError, text
from ._header import Status


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


class Model(_api.ModelMethods):
    """A kinloop model (kl_model). Build it, finalize it, make Solvers.

    ``with Model() as m:`` lets go of it (kl_model_free) on leaving the
    block; otherwise it goes when garbage-collected, exactly once either
    way. Its Solvers and Studies keep working after it is closed: the
    library keeps the model for them.
    `allocator`, if given, is a callable (ptr, old_size, new_size) -> address
    used for every allocation of the model and its solvers (see
    kinloop._core.allocator_hook). A Study's `model` is a borrowed Model (`borrowed` is
    true): it keeps the study alive, refuses changes, and is never freed
    here."""

    def _adopt(self, ptr, hook=None, owner=None):
        """As ModelMethods._adopt, keeping the allocator `hook` (its Solvers
        and Studies keep it too); with `owner`, a view of a finalized model
        that `owner` holds and frees (a Study): the view keeps its owner
        alive, never frees the model, and refuses every call that would
        change it."""
        self._hook, self._owner = hook, owner
        if owner is None:
            return super()._adopt(ptr, hook)
        self._ptr = ptr
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

    @property
    def _model_ptr(self):
        """The model of a generated method's arrays per item (kl_model_<item>_count)."""
        return self._handle

    # ---- what a finalized model says of its rows ----

    @property
    def row_layout(self):
        """Where each quantity of a row (kl_solver_row) lies: {name: (first
        column, columns)}, in enum kl_quantity's order, names by
        kl_quantity_str. Empty before finalize."""
        return row_layout(self._handle)

    # ---- model files ----

    #: the model as model-file text (a byte that is not UTF-8, from a name
    #: given as bytes, reads as U+FFFD, as in every string from C)
    to_text = _api.ModelMethods.write
