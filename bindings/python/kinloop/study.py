"""Study: a design study (kl_study) read from a study file, tolerance Monte
Carlo or a design grid over a nominal model, run on threads into numpy
arrays and summarized output by output. Its lifetime, readers, plain
getters and name lists are generated (kinloop._api.StudyMethods); this adds
the model view, runs and summaries by output name."""

import weakref

import numpy as np

from . import _api
from ._args import to_long
from ._core import KinloopError, status_text
from ._header import Status
from .model import Model
from .values import StudyRun


class Study(_api.StudyMethods):
    """A kinloop design study (kl_study): a nominal model, the dimensions
    that vary and how, the outputs judged and their limits. Make one with
    Study.read_text or Study.read_file, then prepare() it once (the nominal
    solved) before run and summarize.

    ``with Study.read_file(path) as st:`` frees it (kl_study_free) on
    leaving the block; otherwise it is freed when garbage-collected, exactly
    once either way. Its `model` is a borrowed view: it keeps the study
    alive, and closing it never frees the study's model. Solvers made from
    the view keep working after the study is closed (the library keeps the
    model for them)."""

    def _adopt(self, ptr, model=None):
        """As StudyMethods._adopt, keeping the allocator of `model`, the
        Model read against (solvers of the view use it; the study may be
        the model's last holder)."""
        self._hook = model._hook if model is not None else None
        self._runs = 0  # runs under way (on other Python threads)
        self._view = None  # a weak reference to the model view handed out
        super()._adopt(ptr, self._hook)

    def prepare(self):
        """kl_study_prepare (see StudyMethods.prepare); returns the study, so
        that reading and preparing chain: Study.read_file(path).prepare()."""
        super().prepare()
        return self

    # ---- lifetime ----

    def close(self):
        """Frees the study (kl_study_free) and closes its model view; later
        calls on them raise ValueError, closing twice does nothing. Solvers
        made from the view keep working. A study running on another thread
        cannot be closed (RuntimeError)."""
        if self._runs:
            raise RuntimeError("kinloop: a study cannot be closed while it runs")
        view = self._view() if self._view is not None else None
        if view is not None:
            view.close()
        super().close()

    def __repr__(self):
        if self.closed:
            return "<kinloop.Study (closed)>"
        return "<kinloop.Study: %d samples, %d outputs, %d dimensions>" % (
            self.sample_count, self.output_count, self.dimension_count)

    # ---- what the study holds ----

    @property
    def model(self):
        """The nominal model (kl_study_model) as a borrowed, read-only Model:
        Solvers can be made from it; calls that would change it raise
        KinloopError (ESTATE); closing it frees nothing. The view keeps the
        study alive; closing the study closes the view, not its solvers."""
        view = self._view() if self._view is not None else None
        if view is None or view.closed:
            view = Model._adopting(_api.kl_study_model(self._handle), self._hook, self)
            self._view = weakref.ref(view)
        return view

    def _output_index(self, output):
        if isinstance(output, str):
            names = self.output_names
            if output not in names:
                raise KinloopError(Status.EID, "the study has no output %r "
                                   "(outputs: %s)" % (output, ", ".join(names)))
            return names.index(output)
        return output

    # ---- running and summarizing ----

    def run(self, first=0, count=None, threads=0):
        """Runs samples first .. first + count - 1 (count None: to the last)
        on `threads` threads (0: all the cores). Returns a StudyRun of numpy
        arrays: values (count, outputs), status (count,), dims (count,
        dimensions). A sample's numbers depend on the seed and its index
        alone, whichever threads or runs compute it."""
        h, total = self._handle, self.sample_count
        first = to_long(first, "kl_study_run", "first")
        count = total - first if count is None else to_long(count, "kl_study_run", "count")
        # sized for a valid range: the library judges the range itself
        rows = min(max(count, 0), total)
        values = np.full((rows, self.output_count), np.nan)
        status = np.zeros(rows, dtype=np.intc)
        dims = np.full((rows, self.dimension_count), np.nan)
        self._runs += 1
        try:
            st = _api.kl_study_run(h, first, count, threads, values.ctypes.data_as(_api.DOUBLES),
                                   status.ctypes.data_as(_api.INTS),
                                   dims.ctypes.data_as(_api.DOUBLES))
        finally:
            self._runs -= 1
        if st < 0:
            raise KinloopError(st, "run(first=%d, count=%d): %s; the study has samples "
                               "0 .. %d" % (first, count, status_text(st), total - 1))
        return StudyRun(values, status, dims)

    def summarize(self, output, values, status):
        """kl_study_summarize: the StudySummary of `output` (its index or
        name) over the rows of `values` and `status` as run returned them,
        read as samples 0 .. n - 1 (worst_sample counts from the first row)."""
        return super().summarize(self._output_index(output), values, status)
