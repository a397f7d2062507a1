"""The value types of the bindings: the C structs as dataclasses (read from
C by kinloop._core.value_of, written by kinloop._args.to_struct under the
argument rule), with the constructors and figures that make them handy, and
what sweeps and studies return."""

import ctypes
import dataclasses
from typing import NamedTuple

import numpy as np

from . import _api, raw
from ._core import VALUE_TYPES, check_const, status_text
from ._header import DimensionKind, Kernel, LoadKind, OutputKind, Status


def _defaults():
    o = raw.kl_options()
    # as far as this mirror of the struct reaches, whatever the library's
    raw.lib.kl_options_init(ctypes.byref(o), ctypes.sizeof(o))
    return o


_DEFAULTS = _defaults()


@dataclasses.dataclass
class Options:
    """kl_options; the defaults are the library's (kl_options_init)."""
    tolerance: float = _DEFAULTS.tolerance
    step_tolerance: float = _DEFAULTS.step_tolerance
    max_iterations: int = _DEFAULTS.max_iterations
    max_backtracks: int = _DEFAULTS.max_backtracks
    max_step: float = _DEFAULTS.max_step
    singular_rcond: float = _DEFAULTS.singular_rcond
    kernel: Kernel = Kernel(_DEFAULTS.kernel)


@dataclasses.dataclass(frozen=True)
class SolveStats:
    """kl_solve_stats: the last position solve attempt."""
    status: Status
    iterations: int
    residual_evaluations: int
    factorizations: int
    backtracks: int
    residual: float
    step: float
    rcond: float
    kernel: Kernel


@dataclasses.dataclass(frozen=True)
class SweepSettings:
    """kl_sweep_settings (C's `from` is from_, as Python spells keywords)."""
    input: int
    from_: float
    to: float
    steps: int


@dataclasses.dataclass(frozen=True)
class Output:
    """kl_output: a scalar output; build it with the class methods."""
    kind: OutputKind
    id: int
    line_a: int = -1
    line_b: int = -1

    @classmethod
    def link_angle(cls, link):
        return cls(OutputKind.LINK_ANGLE, link)

    @classmethod
    def slide(cls, joint):
        return cls(OutputKind.SLIDE, joint)

    @classmethod
    def joint_angle(cls, joint):
        return cls(OutputKind.JOINT_ANGLE, joint)

    @classmethod
    def point_x(cls, point):
        return cls(OutputKind.POINT_X, point)

    @classmethod
    def point_y(cls, point):
        return cls(OutputKind.POINT_Y, point)

    @classmethod
    def transmission(cls, joint, line_a, line_b):
        """Angle at revolute `joint` between the line on its link a to joint
        `line_a` and the line on its link b to joint `line_b`."""
        return cls(OutputKind.TRANSMISSION, joint, line_a, line_b)


@dataclasses.dataclass(frozen=True)
class Load:
    """kl_load: a force at a point or a torque on a link."""
    kind: LoadKind
    id: int
    fx: float = 0.0
    fy: float = 0.0
    torque: float = 0.0

    @classmethod
    def force_at(cls, point, force):
        fx, fy = force
        return cls(LoadKind.FORCE, point, fx=fx, fy=fy)

    @classmethod
    def torque_on(cls, link, torque):
        return cls(LoadKind.TORQUE, link, torque=torque)


@dataclasses.dataclass(frozen=True)
class Dimension:
    """kl_dimension: one local coordinate (axis 0 or "x", 1 or "y") of a
    joint's attachment point on its link a or b, or of a point."""
    kind: DimensionKind
    id: int
    axis: int

    def __post_init__(self):
        if self.axis in ("x", "y"):
            object.__setattr__(self, "axis", "xy".index(self.axis))

    @classmethod
    def joint_a(cls, joint, axis):
        return cls(DimensionKind.JOINT_A, joint, axis)

    @classmethod
    def joint_b(cls, joint, axis):
        return cls(DimensionKind.JOINT_B, joint, axis)

    @classmethod
    def point(cls, point, axis):
        return cls(DimensionKind.POINT, point, axis)


@dataclasses.dataclass(frozen=True)
class Range:
    """kl_range: extremes of an output over a sweep."""
    min: float
    max: float
    input_at_min: float
    input_at_max: float
    sweep_status: Status
    limit_input: float

    def time_ratio(self):
        """kl_range_time_ratio: crank angle from minimum to maximum over the angle back."""
        ratio = ctypes.c_double()
        check_const(_api.kl_range_time_ratio(self, ctypes.byref(ratio)), "time_ratio", self)
        return ratio.value


@dataclasses.dataclass(frozen=True)
class StudySummary:
    """kl_study_summary: one output over the samples, in the study file's
    units. The statistics are over the samples that assembled and have a
    value (a LIMITED sample has none for an input beyond its reach);
    worst_sample counts from the first row summarized (-1 if there is none);
    lower and upper are NaN without limits, first_order_std where no estimate
    exists."""
    samples: int
    assembled: int
    within_limits: int
    nominal: float
    mean: float
    std: float
    p01: float
    p05: float
    p50: float
    p95: float
    p99: float
    min: float
    max: float
    worst: float
    worst_sample: int
    first_order_std: float
    has_limits: bool
    lower: float
    upper: float
    limited: int


VALUE_TYPES.update({raw.kl_options: Options, raw.kl_solve_stats: SolveStats,
                    raw.kl_sweep_settings: SweepSettings, raw.kl_output: Output,
                    raw.kl_load: Load, raw.kl_dimension: Dimension, raw.kl_range: Range,
                    raw.kl_study_summary: StudySummary})


@dataclasses.dataclass
class SweepResult:
    """What Solver.sweep recorded, one row per delivered step, with the
    fields of kl_sweep_result and a `message` (the solver's, for a limit or
    a failure; "" otherwise).

    Columns are ids, and each array is named after the C getter that filled
    it: link_angle[:, link], joint_angle[:, joint], joint_slide[:, joint]
    (NaN for revolute joints), point_x[:, point], ... The rates and
    accelerations are those the C sweep delivers: a unit rate and zero
    acceleration of the swept input, so they read as the first- and
    second-order kinematic coefficients (d/du and d^2/du^2 of the swept
    input u)."""
    status: Status
    steps_done: int
    limit_input: float
    substeps: int
    message: str
    input: np.ndarray
    link_angle: np.ndarray
    link_rate: np.ndarray
    link_accel: np.ndarray
    joint_angle: np.ndarray
    joint_slide: np.ndarray
    joint_slide_rate: np.ndarray
    joint_slide_accel: np.ndarray
    point_x: np.ndarray
    point_y: np.ndarray
    point_vx: np.ndarray
    point_vy: np.ndarray
    point_ax: np.ndarray
    point_ay: np.ndarray

    @property
    def status_name(self):
        return status_text(self.status)

    def __len__(self):
        return self.steps_done


class StudyRun(NamedTuple):
    """What Study.run computed, one row per sample (first .. first + count - 1):
    values[i, k] is output k (NaN where the sample has none: it did not
    assemble, or its motion stopped short of the output), status[i] its
    SampleStatus code (numpy.intc), dims[i, d] the value dimension d took."""
    values: np.ndarray
    status: np.ndarray
    dims: np.ndarray
