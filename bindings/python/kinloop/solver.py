"""Solver: position, velocity, acceleration and kinematic coefficients of a
finalized Model, its sweeps, assembly modes and design figures, over the
kl_solver handle."""

import ctypes
import dataclasses
import math
import weakref

import numpy as np

from . import raw
from ._core import (Handle, JointKind, KinloopError, Options, Range, SolveStats,
                    Status, SweepResult, as_kernel, as_status, check_const, text,
                    values_arg,
                    xy_buffer, xy_pair)

lib = raw.lib

# Over-alignment for a solver placed in a Python buffer: the C side wants
# malloc's alignment, which no ABI sets above this.
_BLOCK_ALIGN = 64


def _free_solver(ptr, keepalive):
    lib.kl_solver_free(ptr)


class Solver(Handle):
    """A kinloop solver (kl_solver) for a finalized Model.

    Options come as an Options object and/or keyword arguments
    (tolerance=..., max_iterations=...). With in_place=True the solver lives
    in a block the bindings allocate once (kl_solver_bytes / kl_solver_new_in)
    instead of the model's allocator. The solver keeps its model alive; it is
    freed by close(), on leaving a ``with`` block, when the model is closed,
    or when garbage-collected, exactly once."""

    def __init__(self, model, options=None, *, in_place=False, **option_values):
        mh = model._handle
        block = None
        if in_place:
            size = lib.kl_solver_bytes(mh)
            block = ctypes.create_string_buffer(size + _BLOCK_ALIGN)
            address = ctypes.addressof(block)
            address += -address % _BLOCK_ALIGN
            ptr = lib.kl_solver_new_in(mh, address, size)
        else:
            ptr = lib.kl_solver_new(mh)
        if not ptr:
            if not model.is_finalized:
                raise KinloopError(Status.ESTATE, "Solver: the model is not "
                                   "finalized (call Model.finalize first)")
            raise KinloopError(Status.ENOMEM, "Solver: out of memory")
        self._ptr = ptr
        self._model = model
        self._sweeping = False
        self._finalizer = weakref.finalize(self, _free_solver, ptr, block)
        model._register_solver(self._finalizer)
        if options is not None or option_values:
            self.set_options(options, **option_values)

    @staticmethod
    def bytes_needed(model):
        """kl_solver_bytes: bytes a solver for `model` needs in place."""
        return lib.kl_solver_bytes(model._handle)

    # ---- lifetime ----

    @property
    def _handle(self):
        if not self._finalizer.alive:
            raise ValueError("kinloop: the solver is closed (or its model is)")
        return self._ptr

    @property
    def _changing(self):
        """The handle for a call that changes the solver (a non-const
        kl_solver * in C), refused inside this solver's own sweep callback."""
        if self._sweeping:
            raise RuntimeError("kinloop: a sweep callback may only read the "
                               "solver (its C type is const kl_solver *)")
        return self._handle

    def close(self):
        """Frees the solver (kl_solver_free); closing twice does nothing."""
        if self._sweeping:
            raise RuntimeError("kinloop: a solver cannot be closed inside its own sweep")
        self._finalizer()

    @property
    def model(self):
        """The Model this solver was made for."""
        return self._model

    @property
    def error(self):
        """kl_solver_error: the message of the last failed call."""
        return text(lib.kl_solver_error(self._handle))

    def _check(self, status, result=None):
        if status < 0:
            raise KinloopError(status, self.error, result=result)
        return status

    def _inputs(self, values, what):
        return values_arg(values, self._model.input_count, what)

    # ---- options and sketch ----

    @property
    def options(self):
        o = raw.kl_options()
        check_const(lib.kl_solver_options(self._handle, ctypes.byref(o)),
                    "options")
        return Options.from_struct(o)

    def set_options(self, options=None, **values):
        """Sets options: `options` (default: the current ones) with `values`
        replacing fields by name."""
        chosen = dataclasses.replace(options or self.options, **values)
        self._check(lib.kl_solver_set_options(self._changing,
                                              ctypes.byref(chosen.to_struct())))

    def set_link_angle(self, link, angle):
        """Sketch: a link angle (rad) that chooses the next solve's branch."""
        self._check(lib.kl_set_link_angle(self._changing, link, angle))

    def set_joint_slide(self, joint, slide):
        """Sketch: the slide of a prismatic or slot joint."""
        self._check(lib.kl_set_joint_slide(self._changing, joint, slide))

    # ---- stages ----

    def solve_position(self, inputs=None):
        """Solves the loops at `inputs` (one per input, or a number for one)."""
        return Status(self._check(lib.kl_solve_position(
            self._changing, self._inputs(inputs, "solve_position"))))

    def solve_velocity(self, rates=None):
        return Status(self._check(lib.kl_solve_velocity(
            self._changing, self._inputs(rates, "solve_velocity"))))

    def solve_acceleration(self, accels=None):
        return Status(self._check(lib.kl_solve_acceleration(
            self._changing, self._inputs(accels, "solve_acceleration"))))

    def solve_coefficients(self):
        """First- and second-order kinematic coefficients at the position."""
        return Status(self._check(lib.kl_solve_coefficients(self._changing)))

    @property
    def stats(self):
        """SolveStats of the last position solve attempt."""
        st = raw.kl_solve_stats()
        check_const(lib.kl_solver_stats(self._handle, ctypes.byref(st)), "stats")
        values = {f.name: getattr(st, f.name) for f in dataclasses.fields(SolveStats)}
        values.update(status=as_status(st.status), kernel=as_kernel(st.kernel))
        return SolveStats(**values)

    # ---- results (NaN where the C getters give NaN: unknown id, or a
    # stage not solved at the current position) ----

    def link_angle(self, link):
        return lib.kl_link_angle(self._handle, link)

    def link_rate(self, link):
        return lib.kl_link_rate(self._handle, link)

    def link_accel(self, link):
        return lib.kl_link_accel(self._handle, link)

    def joint_slide(self, joint):
        return lib.kl_joint_slide(self._handle, joint)

    def joint_slide_rate(self, joint):
        return lib.kl_joint_slide_rate(self._handle, joint)

    def joint_slide_accel(self, joint):
        return lib.kl_joint_slide_accel(self._handle, joint)

    def joint_angle(self, joint):
        return lib.kl_joint_angle(self._handle, joint)

    def input_value(self, input):
        return lib.kl_input_value(self._handle, input)

    def _xy(self, fn, what, *ids):
        xy = xy_buffer()
        check_const(fn(self._handle, *ids, xy),
                    "%s(%s)" % (what, ", ".join(str(i) for i in ids)))
        return xy_pair(xy)

    def link_origin(self, link):
        """Global (x, y) of the link frame's origin."""
        return self._xy(lib.kl_link_origin, "link_origin", link)

    def point_position(self, point):
        return self._xy(lib.kl_point_position, "point_position", point)

    def point_velocity(self, point):
        return self._xy(lib.kl_point_velocity, "point_velocity", point)

    def point_acceleration(self, point):
        return self._xy(lib.kl_point_acceleration, "point_acceleration", point)

    # ---- kinematic coefficients (after solve_coefficients) ----

    def link_angle_deriv(self, link, input=0):
        return lib.kl_link_angle_deriv(self._handle, link, input)

    def link_angle_deriv2(self, link, input_i=0, input_j=0):
        return lib.kl_link_angle_deriv2(self._handle, link, input_i, input_j)

    def joint_slide_deriv(self, joint, input=0):
        return lib.kl_joint_slide_deriv(self._handle, joint, input)

    def joint_slide_deriv2(self, joint, input_i=0, input_j=0):
        return lib.kl_joint_slide_deriv2(self._handle, joint, input_i, input_j)

    def point_deriv(self, point, input=0):
        return self._xy(lib.kl_point_deriv, "point_deriv", point, input)

    def point_deriv2(self, point, input_i=0, input_j=0):
        return self._xy(lib.kl_point_deriv2, "point_deriv2", point, input_i,
                        input_j)

    # ---- states and assembly modes ----

    def copy_state(self, source):
        """Copies the whole state of `source`, a solver of the same model."""
        self._check(lib.kl_solver_copy_state(self._changing, source._handle))

    def copy(self):
        """A new solver of the same model with this one's options and state."""
        twin = Solver(self._model, self.options)
        twin.copy_state(self)
        return twin

    def find_assemblies(self, inputs=None):
        """The assembly modes at `inputs`: a list of new Solvers, each at a
        solved position (with this solver's options); this one keeps its state."""
        values = self._inputs(inputs, "find_assemblies")
        options = self.options
        cap = 8
        while True:
            modes = [Solver(self._model, options) for _ in range(cap)]
            handles = (raw.solver_p * cap)(*(m._handle for m in modes))
            found = self._check(lib.kl_solver_find_assemblies(self._changing, values,
                                                       handles, cap))
            unused = modes[found:] if found <= cap else modes
            for m in unused:
                m.close()
            if found <= cap:
                return modes[:found]
            cap = found  # the search is repeated: the C call cannot grow the list

    # ---- sweeps ----

    def sweep(self, input, start, stop, steps, callback=None):
        """Sweeps input `input` from `start` to `stop` in `steps` steps.

        Returns a SweepResult (status OK, LIMIT or STOPPED) with one row per
        delivered step. `callback(solver, step, input_value)`, if given, is
        called at each step after it is recorded, may read this solver, and
        stops the sweep by returning a true value (status STOPPED); an
        exception it raises stops the sweep and is raised again. A negative
        status raises KinloopError, its `result` holding the steps delivered."""
        h = self._changing
        model = self._model
        nlinks, njoints, npoints = (model.link_count, model.joint_count,
                                    model.point_count)
        sliding = [j for j in range(njoints)
                   if model.joint_kind(j) != JointKind.REVOLUTE]
        rows = max(int(steps) + 1, 0)

        def table(columns):
            return np.full((rows, columns), math.nan)

        record = dict(input=np.full(rows, math.nan),
                      link_angle=table(nlinks), link_rate=table(nlinks),
                      link_accel=table(nlinks), slide=table(njoints),
                      slide_rate=table(njoints), slide_accel=table(njoints),
                      point_x=table(npoints), point_y=table(npoints),
                      point_vx=table(npoints), point_vy=table(npoints),
                      point_ax=table(npoints), point_ay=table(npoints))
        link_getters = [(lib.kl_link_angle, record["link_angle"]),
                        (lib.kl_link_rate, record["link_rate"]),
                        (lib.kl_link_accel, record["link_accel"])]
        slide_getters = [(lib.kl_joint_slide, record["slide"]),
                         (lib.kl_joint_slide_rate, record["slide_rate"]),
                         (lib.kl_joint_slide_accel, record["slide_accel"])]
        point_getters = [(lib.kl_point_position, record["point_x"], record["point_y"]),
                         (lib.kl_point_velocity, record["point_vx"], record["point_vy"]),
                         (lib.kl_point_acceleration, record["point_ax"], record["point_ay"])]
        raised = []
        xy = xy_buffer()

        def on_step(s, step, value, user):
            try:
                record["input"][step] = value
                for getter, out in link_getters:
                    row = out[step]
                    for link in range(nlinks):
                        row[link] = getter(s, link)
                for getter, out in slide_getters:
                    row = out[step]
                    for joint in sliding:
                        row[joint] = getter(s, joint)
                for getter, out_x, out_y in point_getters:
                    for point in range(npoints):
                        if getter(s, point, xy) == Status.OK:
                            out_x[step, point], out_y[step, point] = xy[0], xy[1]
                if callback is not None and callback(self, step, value):
                    return 1
                return 0
            except BaseException as e:  # a C caller cannot take exceptions
                raised.append(e)
                return 1

        c_callback = raw.kl_sweep_fn(on_step)
        outcome = raw.kl_sweep_result()
        self._sweeping = True
        model._sweeps += 1
        try:
            status = lib.kl_solver_sweep(h, input, start, stop, steps, c_callback, None,
                                  ctypes.byref(outcome))
        finally:
            self._sweeping = False
            model._sweeps -= 1
        if raised:
            raise raised[0]
        done = max(outcome.steps_done, 0)
        result = SweepResult(
            status=as_status(status), steps_done=done, limit_input=outcome.limit_input,
            substeps=outcome.substeps,
            # kl_solver_sweep words a limit; KL_STOPPED leaves an older message
            message=self.error if status == Status.LIMIT or status < 0 else "",
            **{name: array[:done] for name, array in record.items()})
        self._check(status, result=result)
        return result

    # ---- design figures ----

    def output_value(self, output):
        """The Output's value at the current state."""
        value = ctypes.c_double()
        check_const(lib.kl_output_value(self._handle, ctypes.byref(output.to_struct()),
                                        ctypes.byref(value)),
                    "output_value(%r)" % (output,))
        return value.value

    def output_deriv(self, output, input=0):
        """d output / d u_input at the position last solved."""
        value = ctypes.c_double()
        self._check(lib.kl_output_deriv(self._changing, ctypes.byref(output.to_struct()),
                                        input, ctypes.byref(value)))
        return value.value

    def output_range(self, input, start, stop, steps, output):
        """Range: the output's extremes while input `input` sweeps; its
        sweep_status is OK or LIMIT."""
        r = raw.kl_range()
        self._check(lib.kl_output_range(self._changing, input, start, stop, steps,
                                        ctypes.byref(output.to_struct()),
                                        ctypes.byref(r)))
        values = {f.name: getattr(r, f.name) for f in dataclasses.fields(Range)}
        values.update(sweep_status=as_status(r.sweep_status))
        return Range(**values)

    def mechanical_advantage(self, output, input=0):
        """Output effort over input effort of the ideal linkage."""
        value = ctypes.c_double()
        self._check(lib.kl_output_mechanical_advantage(
            self._changing, ctypes.byref(output.to_struct()), input,
            ctypes.byref(value)))
        return value.value

    def input_effort(self, loads):
        """The effort each input must apply against `loads` (Load objects),
        by virtual work: a numpy array, one value per input."""
        loads = list(loads)
        array = (raw.kl_load * max(len(loads), 1))(*(l.to_struct() for l in loads))
        efforts = (ctypes.c_double * max(self._model.input_count, 1))()
        self._check(lib.kl_input_effort(self._changing, len(loads), array, efforts))
        return np.array(efforts[:self._model.input_count])

    def sensitivity(self, output, dimension):
        """d output / d dimension (a Dimension) with the inputs held."""
        value = ctypes.c_double()
        self._check(lib.kl_output_sensitivity(
            self._changing, ctypes.byref(output.to_struct()),
            ctypes.byref(dimension.to_struct()), ctypes.byref(value)))
        return value.value

    def tolerance_stack(self, output, dimensions, tolerances):
        """(worst case, root-sum-square) first-order stack-up of the output."""
        dims = list(dimensions)
        tols = [float(t) for t in tolerances]
        if len(tols) != len(dims):
            raise KinloopError(Status.EINVAL, "tolerance_stack: %d dimensions but "
                               "%d tolerances" % (len(dims), len(tols)))
        n = len(dims)
        dim_array = (raw.kl_dimension * max(n, 1))(*(d.to_struct() for d in dims))
        tol_array = (ctypes.c_double * max(n, 1))(*tols)
        worst, rss = ctypes.c_double(), ctypes.c_double()
        self._check(lib.kl_output_tolerance_stack(self._changing,
                                           ctypes.byref(output.to_struct()), n,
                                           dim_array, tol_array,
                                           ctypes.byref(worst), ctypes.byref(rss)))
        return worst.value, rss.value
