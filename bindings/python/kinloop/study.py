"""Study: a design study (kl_study) read from a study file, tolerance Monte
Carlo or a design grid over a nominal model, run on threads into numpy
arrays and summarized output by output. Its lifetime, readers, plain
getters and name lists are generated (kinloop._api.StudyMethods); this adds
the model view, runs and summaries by output name."""

import weakref

from . import _api
from ._args import to_long
from ._core import KinloopError
from ._header import Status
from .model import Model


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
        """StudyMethods.run with `count` None for every sample from `first`
        on and `threads` 0 for all the cores: a StudyRun of numpy arrays,
        values (count, outputs), sample_status (count,), dims (count,
        dimensions). At most MAX_STEPS samples a call (split larger runs: a
        sample's numbers depend on the seed and its index alone)."""
        if count is None:
            count = self.sample_count - to_long(first, "kl_study_run", "first")
        self._runs += 1  # close() waits for no thread: it refuses meanwhile
        try:
            return super().run(first, count, threads)
        finally:
            self._runs -= 1

    def summarize(self, output, values, status):
        """kl_study_summarize: the StudySummary of `output` (its index or
        name) over the rows of `values` and `status` as run returned them,
        read as samples 0 .. n - 1 (worst_sample counts from the first row)."""
        return super().summarize(self._output_index(output), values, status)
