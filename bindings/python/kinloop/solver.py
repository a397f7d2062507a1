"""Solver: position, velocity, acceleration and kinematic coefficients of a
finalized Model over the kl_solver handle. The plain functions are
generated (kinloop._api.SolverMethods: getters, setters, stages, design
figures); this adds lifetime, options by keyword, the count of input
arrays, copies, assembly modes, sweeps with their recorder and callback,
and the forces over a cycle sample by sample (its table)."""

import ctypes

import numpy as np

from . import _api, raw
from ._args import array_of, refuse, to_double, to_int, with_fields
from ._core import KinloopError, as_enum
from ._header import MAX_STEPS, Status
from .model import row_layout
from .values import SweepResult, cycle_table_dtype

# Over-alignment for a solver placed in a Python buffer: the C side wants
# malloc's alignment, which no ABI sets above this.
_BLOCK_ALIGN = 64


class Solver(_api.SolverMethods):
    """A kinloop solver (kl_solver) for a finalized Model.

    Options come as an Options object and/or keyword arguments
    (tolerance=..., max_iterations=...). With in_place=True the solver lives
    in a block the bindings allocate once (kl_solver_bytes / kl_solver_new_in)
    instead of the model's allocator. The library keeps the model for the
    solver: closing the Model leaves the solver working. The solver is freed
    by close(), on leaving a ``with`` block, or when garbage-collected,
    exactly once."""

    def __init__(self, model, options=None, *, in_place=False, **option_values):
        self._open(model, model._handle, in_place)
        if options is not None or option_values:
            self.set_options(options, **option_values)

    def _open(self, model, mh, in_place=False):
        """A solver of the C model `mh`, which `model` (maybe closed) stands for."""
        block = None
        if in_place:
            size = raw.lib.kl_solver_bytes(mh)
            block = ctypes.create_string_buffer(size + _BLOCK_ALIGN)
            address = ctypes.addressof(block)
            address += -address % _BLOCK_ALIGN
            ptr = raw.lib.kl_solver_new_in(mh, address, size)
        else:
            ptr = raw.lib.kl_solver_new(mh)
        if not ptr:
            if not _api.kl_model_is_finalized(mh):
                raise KinloopError(Status.ESTATE, "Solver: the model is not "
                                   "finalized (call Model.finalize first)")
            raise KinloopError(Status.ENOMEM, "Solver: out of memory")
        # the model's allocator hook lives as long as a holder of the model
        self._adopt(ptr, block, model._hook)
        self._model, self._model_ptr = model, mh
        # a finalized model never changes: what the methods need of it, read once
        self._layout, self._row_size = row_layout(mh), _api.kl_model_row_size(mh)
        self._input_count = _api.kl_model_input_count(mh)
        self._sweeping = False

    # ---- lifetime ----

    @property
    def _changing(self):
        """Refused inside this solver's own sweep callback (its C type there
        is const kl_solver *)."""
        if self._sweeping:
            raise RuntimeError("kinloop: a sweep callback may only read the "
                               "solver (its C type is const kl_solver *)")
        return self._handle

    def close(self):
        """As SolverMethods.close; refused inside the solver's own sweep."""
        if self._sweeping:
            raise RuntimeError("kinloop: a solver cannot be closed inside its own sweep")
        super().close()

    @property
    def model(self):
        """The Model this solver was made for, the one kl_solver_model gives
        (closed or not: the solver keeps working either way)."""
        return self._model

    # ---- what the generated methods of arrays per input ask of a solver ----

    def _inputs(self, values, function, argument):
        """One double per input as a C array (None for a model without
        inputs; a number stands for one): the C functions take no count,
        so the bindings check it."""
        count = self._input_count
        given = [] if values is None else list(np.asarray(values, dtype=object).ravel())
        if len(given) != count:
            refuse(function, argument, "must hold one value per input (%d); got %d"
                   % (count, len(given)))
        values, _ = array_of(given, ctypes.c_double, to_double, function, argument)
        return values if count else None

    # ---- states and assembly modes ----

    def copy(self):
        """A new solver of the same model with this one's options and state."""
        twin = self._sibling(self.options)
        twin.copy_state(self)
        return twin

    def _sibling(self, options):
        """A new solver of this one's model, whether its Model is closed or not."""
        twin = Solver.__new__(Solver)
        twin._open(self._model, self._model_ptr)
        twin.set_options(options)
        return twin

    def find_assemblies(self, inputs=None):
        """The assembly modes at `inputs`: a list of new Solvers, each at a
        solved position (with this solver's options); this one keeps its state."""
        values = self._inputs(inputs, "kl_solver_find_assemblies", "inputs")
        options, cap = self.options, 8
        while True:
            modes = [self._sibling(options) for _ in range(cap)]
            handles = (raw.solver_p * cap)(*(m._handle for m in modes))
            found = self._check(_api.kl_solver_find_assemblies(self._changing, values,
                                                               handles, cap))
            for m in modes[found:] if found <= cap else modes:
                m.close()
            if found <= cap:
                return modes[:found]
            cap = found  # the search is repeated: the C call cannot grow the list

    # ---- sweeps ----

    def sweep(self, input, from_, to, steps, callback=None):
        """Sweeps input `input` from `from_` to `to` in `steps` steps.

        Returns a SweepResult (status OK, LIMIT or STOPPED) with one row per
        delivered step: every quantity of kl_solver_row, as arrays named by
        kl_quantity_str. `callback(solver, step, input_value)`, if given, is
        called at each step after it is recorded, may read this solver, and
        stops the sweep by returning a true value (status STOPPED); an
        exception it raises stops the sweep and is raised again. Without a
        callback the library records the rows itself, at C speed
        (kl_solver_sweep_rows). A negative status raises KinloopError, its
        `result` holding the steps delivered."""
        h = self._changing
        steps = to_int(steps, "kl_solver_sweep", "steps")
        if callback is not None and not callable(callback):
            refuse("kl_solver_sweep", "callback", "must be callable or None; got %s"
                   % type(callback).__name__)
        # sized for a count the library takes: it refuses the others itself
        # (KL_EINVAL, KL_ETOOLARGE) and then writes no row; every row kept
        # (table[:steps_done]) is written, so none is cleared first
        rows = steps + 1 if 1 <= steps <= MAX_STEPS else 1
        table = np.empty((rows, self._row_size))
        outcome, raised = raw.kl_sweep_result(), []
        if callback is None:
            status = _api.kl_solver_sweep_rows(h, input, from_, to, steps,
                                               table.ctypes.data_as(_api.DOUBLES),
                                               ctypes.byref(outcome))
        else:
            def on_step(s, step, value, user):
                try:
                    raw.lib.kl_solver_row(s, table[step].ctypes.data_as(_api.DOUBLES))
                    return 1 if callback(self, step, value) else 0
                except BaseException as e:  # a C caller cannot take exceptions
                    raised.append(e)
                    return 1

            c_callback = raw.kl_sweep_fn(on_step)
            self._sweeping = True
            try:
                status = _api.kl_solver_sweep(h, input, from_, to, steps, c_callback,
                                              None, ctypes.byref(outcome))
            finally:
                self._sweeping = False
        if raised:
            raise raised[0]
        done = max(outcome.steps_done, 0)
        result = SweepResult(
            status=as_enum(Status, status), steps_done=done,
            limit_input=outcome.limit_input, substeps=outcome.substeps,
            passages=outcome.passages, passage_input=outcome.passage_input,
            # kl_solver_sweep words a limit; KL_STOPPED leaves an older message
            message=self.error if status == Status.LIMIT or status < 0 else "",
            rows=table[:done], layout=dict(self._layout), input_index=input)
        self._check(status, result=result)
        return result

    # ---- force figures over a cycle ----

    def cycle_table(self, loads=(), cycle=None, **fields):
        """The forces over a cycle sample by sample (kl_cycle_table), the
        cycle and loads as for cycle_summarize: a numpy structured array,
        one element per sample, whose named columns are the C row's:
        input (the driven input's value), effort[:, i] (every input's
        effort), joint[:, j] with fields fx, fy, moment (kl_joint_force and
        kl_joint_moment of joint j), ground with fields fx, fy, moment
        (kl_ground_force), kinetic_energy, work (the driven input's work
        since the first sample): t["joint"]["fx"][:, j]. A cycle stopped
        by a motion limit gives the samples it reached (fewer than
        steps + 1). A negative status raises KinloopError."""
        function = "kl_cycle_table"
        c = _api.to_kl_cycle(with_fields(cycle if cycle is not None else _api.Cycle(), "Cycle",
                                         fields, function, "cycle"), function, "cycle")
        loads, count = array_of(loads, raw.kl_load, _api.to_kl_load, function, "loads")
        mh = self._model_ptr
        dtype = cycle_table_dtype(self._input_count, _api.kl_model_joint_count(mh))
        columns = _api.kl_cycle_columns(mh)
        if dtype.itemsize != columns * ctypes.sizeof(ctypes.c_double):
            raise RuntimeError("kinloop: kl_cycle_table's row has %d numbers; the "
                               "bindings expect %d" % (columns, dtype.itemsize // 8))
        steps = c.steps
        table = np.zeros(steps + 1 if 1 <= steps <= MAX_STEPS else 1, dtype=dtype)
        done = ctypes.c_int()
        self._check(_api.kl_cycle_table(self._changing, c, count, loads,
                                        table.ctypes.data_as(_api.DOUBLES),
                                        table.size * columns, ctypes.byref(done)))
        return table[:done.value]
