"""Study: a design study (kl_study) read from a study file, tolerance Monte
Carlo or a design grid over a nominal model, run on threads into numpy
arrays and summarized output by output."""

import ctypes
import dataclasses
import os
import weakref

import numpy as np

from . import raw
from ._core import (Handle, KinloopError, Status, StudyRun, StudySummary, check_const,
                    text)
from .model import Model, _io_error

lib = raw.lib


def _free_study(ptr, view_finalizers, hook):
    # the view of the study's model, and every solver made from it, before
    # the model itself goes with the study; `hook`, the model's allocator
    # (if the caller gave one), is kept alive until here, since the study
    # may be the model's last holder
    for close_view in list(view_finalizers):
        close_view()
    lib.kl_study_free(ptr)


def _doubles(array):
    return array.ctypes.data_as(ctypes.POINTER(ctypes.c_double))


def _ints(array):
    return array.ctypes.data_as(ctypes.POINTER(ctypes.c_int))


class Study(Handle):
    """A kinloop design study (kl_study): a nominal model, the dimensions
    that vary and how, the outputs judged and their limits. Make one with
    Study.read_text or Study.read_file, then prepare() it once (the nominal
    solved) before run and summarize.

    ``with Study.read_file(path) as st:`` frees it (kl_study_free) on
    leaving the block; otherwise it is freed when garbage-collected, exactly
    once either way. Its `model` is a borrowed view: it keeps the study
    alive, and closing it never frees the study's model."""

    def __init__(self, *args, **kwargs):
        raise TypeError("kinloop.Study: use Study.read_text(text, model) or "
                        "Study.read_file(path)")

    @classmethod
    def _adopting(cls, ptr, hook=None):
        study = cls.__new__(cls)
        study._ptr = ptr
        study._runs = 0  # runs under way (on other Python threads)
        study._view = None  # a weak reference to the model view handed out
        study._view_finalizers = set()
        study._finalizer = weakref.finalize(study, _free_study, ptr,
                                            study._view_finalizers, hook)
        return study

    # ---- reading ----

    @classmethod
    def read_text(cls, source, model):
        """A study from study-file text (str, or bytes as they are), read
        against `model`, a finalized Model whose links, joints and points it
        names (kl_study_read). The text's `model` statement, if any, is only
        recorded (model_path). The study holds the model: closing `model`
        afterwards is safe. Errors raise KinloopError with line and column
        where the text has them. Solves nothing: see prepare."""
        data = source.encode("utf-8") if isinstance(source, str) else bytes(source)
        err = raw.kl_io_error()
        ptr = lib.kl_study_read(data, len(data), model._handle, ctypes.byref(err))
        if not ptr:
            raise _io_error(err.status or Status.ENOMEM, err, "read_text")
        return cls._adopting(ptr, model._hook)

    @classmethod
    def read_file(cls, path):
        """A study from the study file at `path` and the model file its
        `model` statement names, relative to the study file
        (kl_study_read_file). Solves nothing: see prepare."""
        err = raw.kl_io_error()
        ptr = lib.kl_study_read_file(os.fsencode(path), ctypes.byref(err))
        if not ptr:
            raise _io_error(err.status or Status.ENOMEM, err,
                            "read_file(%r)" % (os.fspath(path),))
        return cls._adopting(ptr)

    # ---- lifetime ----

    @property
    def _handle(self):
        if not self._finalizer.alive:
            raise ValueError("kinloop: the study is closed")
        return self._ptr

    def _live_view(self):
        view = self._view() if self._view is not None else None
        return None if view is None or view.closed else view

    def close(self):
        """Frees the study (kl_study_free), first closing its model view and
        the solvers made from it; later calls on them raise ValueError.
        Closing twice does nothing."""
        view = self._live_view()
        if self._runs or (view is not None and view._sweeps):
            raise RuntimeError("kinloop: a study cannot be closed while it runs "
                               "or a solver of its model sweeps")
        self._finalizer()

    def __repr__(self):
        if self.closed:
            return "<kinloop.Study (closed)>"
        return "<kinloop.Study: %d samples, %d outputs, %d dimensions>" % (
            self.sample_count, len(self.outputs), len(self.dimensions))

    # ---- preparing ----

    @property
    def error(self):
        """kl_study_error: the message of the study's last failed call."""
        return text(lib.kl_study_error(self._handle))

    def prepare(self):
        """kl_study_prepare: solves the nominal design at the start of the
        sweep, its outputs and their first-order estimates, which run and
        summarize need (they raise ESTAGE before). A second call does
        nothing. A nominal that cannot be judged raises KinloopError with its
        status (ENOASSEMBLY, ESINGULAR) and the study's message; the study
        stays as it was. Returns the study."""
        h = self._handle
        status = lib.kl_study_prepare(h)
        if status < 0:
            raise KinloopError(status, self.error)
        return self

    # ---- what the study holds ----

    @property
    def model_path(self):
        """kl_study_model_path: the path the text's `model` statement gives,
        as written, or None if it has none."""
        return text(lib.kl_study_model_path(self._handle))

    @property
    def sample_count(self):
        """kl_study_sample_count: `samples` of a tolerance study, every grid
        point of a grid study."""
        return check_const(lib.kl_study_sample_count(self._handle), "sample_count")

    @property
    def outputs(self):
        """The names of the outputs judged, in column order."""
        h = self._handle
        n = check_const(lib.kl_study_output_count(h), "outputs")
        return [text(lib.kl_study_output_name(h, k)) for k in range(n)]

    @property
    def dimensions(self):
        """Short texts naming the dimensions that vary ("rocker_pin b x"),
        in column order."""
        h = self._handle
        n = check_const(lib.kl_study_dimension_count(h), "dimensions")
        return [text(lib.kl_study_dimension_name(h, k)) for k in range(n)]

    @property
    def model(self):
        """The nominal model (kl_study_model) as a borrowed, read-only Model:
        Solvers can be made from it; calls that would change it raise
        KinloopError (ESTATE); closing it closes its solvers, not the model.
        The view keeps the study alive; closing the study closes the view."""
        view = self._live_view()
        if view is None:
            view = Model._borrowing(lib.kl_study_model(self._handle), self)
            self._view_finalizers.clear()  # the earlier view's are dead
            self._view_finalizers.add(view._finalizer)
            self._view = weakref.ref(view)
        return view

    def _output_index(self, output):
        if isinstance(output, str):
            names = self.outputs
            if output not in names:
                raise KinloopError(Status.EID, "the study has no output %r "
                                   "(outputs: %s)" % (output, ", ".join(names)))
            return names.index(output)
        return int(output)

    # ---- running and summarizing ----

    def run(self, first=0, count=None, threads=0):
        """Runs samples first .. first + count - 1 (count None: to the last)
        on `threads` threads (0: all the cores). Returns a StudyRun of numpy
        arrays: values (count, outputs), status (count,), dims (count,
        dimensions). A sample's numbers depend on the seed and its index
        alone, whichever threads or runs compute it."""
        h = self._handle
        nout = check_const(lib.kl_study_output_count(h), "run")
        ndim = check_const(lib.kl_study_dimension_count(h), "run")
        total = self.sample_count
        first = int(first)
        count = total - first if count is None else int(count)
        # sized for a valid range: the library judges the range itself
        rows = min(max(count, 0), total)
        values = np.full((rows, nout), np.nan)
        status = np.zeros(rows, dtype=np.intc)
        dims = np.full((rows, ndim), np.nan)
        self._runs += 1
        try:
            st = lib.kl_study_run(h, first, count, int(threads), _doubles(values),
                                  _ints(status), _doubles(dims))
        finally:
            self._runs -= 1
        check_const(st, "run(first=%d, count=%d) of samples 0 .. %d"
                    % (first, count, total - 1))
        return StudyRun(values, status, dims)

    def summarize(self, output, values, status):
        """kl_study_summarize: the StudySummary of `output` (its index or
        name) over the rows of `values` and `status` as run returned them,
        read as samples 0 .. n - 1 (worst_sample counts from the first row)."""
        h = self._handle
        k = self._output_index(output)
        nout = check_const(lib.kl_study_output_count(h), "summarize")
        values = np.ascontiguousarray(values, dtype=float)
        status = np.ascontiguousarray(status, dtype=np.intc)
        if values.ndim != 2 or values.shape[1] != nout or \
                status.shape != (values.shape[0],):
            raise KinloopError(Status.EINVAL, "summarize: values must be (n, %d) "
                               "and status (n,), as run gives them; got %s and %s"
                               % (nout, values.shape, status.shape))
        summary = raw.kl_study_summary()
        check_const(lib.kl_study_summarize(h, k, _doubles(values), _ints(status),
                                           values.shape[0], ctypes.byref(summary)),
                    "summarize(%r)" % (output,))
        fields = {f.name: getattr(summary, f.name)
                  for f in dataclasses.fields(StudySummary)}
        fields["has_limits"] = bool(summary.has_limits)
        return StudySummary(**fields)
