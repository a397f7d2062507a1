"""What the Model, Solver and Study wrappers share: the enums of include/kinloop.h,
the exception, the small value types, and argument conversions."""

import ctypes
import dataclasses
import enum
from typing import NamedTuple

import numpy as np

from . import raw

lib = raw.lib

GROUND = 0
"""Link id of ground (KL_GROUND)."""


class Status(enum.IntEnum):
    """enum kl_status: 0 success, positive success with a remark, negative errors."""
    OK = 0
    LIMIT = 1
    STOPPED = 2
    ENOMEM = -1
    EINVAL = -2
    ENONFINITE = -3
    EID = -4
    EKIND = -5
    ESTATE = -6
    ESELFJOINT = -7
    EDUPLICATE = -8
    EDISCONNECTED = -9
    EZEROLENGTH = -10
    ELOOP = -11
    ELOOPSET = -12
    EOVERCONSTRAINED = -13
    EDOF = -14
    EUNDETERMINED = -15
    EMAXITER = -16
    ENOASSEMBLY = -17
    ESINGULAR = -18
    ESTAGE = -19
    ESYNTAX = -20
    EIO = -21
    ETRUNCATED = -22
    ETOOLARGE = -23


class JointKind(enum.IntEnum):
    """enum kl_joint_kind."""
    REVOLUTE = 0
    PRISMATIC = 1
    SLOT = 2


class Kernel(enum.IntEnum):
    """enum kl_kernel: how a solver factors its linear systems."""
    AUTO = 0
    SMALL = 1
    DENSE = 2
    BANDED = 3


class LengthUnit(enum.IntEnum):
    """enum kl_length_unit: recorded, never converted."""
    UNSTATED = 0
    MM = 1
    M = 2
    IN = 3


class AngleUnit(enum.IntEnum):
    """enum kl_angle_unit: the unit model files write angles in."""
    RAD = 0
    DEG = 1


class GrashofClass(enum.IntEnum):
    """enum kl_grashof_class."""
    CRANK_ROCKER = 1
    ROCKER_CRANK = 2
    DOUBLE_CRANK = 3
    DOUBLE_ROCKER = 4
    CHANGE_POINT = 5
    TRIPLE_ROCKER = 6

    def __str__(self):
        return grashof_str(self)


class OutputKind(enum.IntEnum):
    """enum kl_output_kind."""
    LINK_ANGLE = 0
    SLIDE = 1
    JOINT_ANGLE = 2
    POINT_X = 3
    POINT_Y = 4
    TRANSMISSION = 5


class LoadKind(enum.IntEnum):
    """enum kl_load_kind."""
    FORCE = 0
    TORQUE = 1


class DimensionKind(enum.IntEnum):
    """enum kl_dimension_kind."""
    JOINT_A = 0
    JOINT_B = 1
    POINT = 2


class SampleStatus(enum.IntEnum):
    """enum kl_sample_status: the outcome of one sample of a study."""
    OK = 0
    NO_ASSEMBLY = 1
    LIMITED = 2


class Quantity(enum.IntEnum):
    """enum kl_quantity: the blocks of a row (kl_solver_row)."""
    INPUT_VALUE = 0
    INPUT_RATE = 1
    INPUT_ACCEL = 2
    LINK_ANGLE = 3
    LINK_RATE = 4
    LINK_ACCEL = 5
    JOINT_ANGLE = 6
    JOINT_SLIDE = 7
    JOINT_SLIDE_RATE = 8
    JOINT_SLIDE_ACCEL = 9
    POINT_X = 10
    POINT_Y = 11
    POINT_VX = 12
    POINT_VY = 13
    POINT_AX = 14
    POINT_AY = 15
    TRANSMISSION = 16
    RCOND = 17


class TransmissionSkipReason(enum.IntEnum):
    """enum kl_transmission_skip_reason: why a joint has no
    transmission-angle site."""
    INPUT_CRANK = 1
    NO_LINE = 2


def text(value):
    """A C string result as str (None stays None)."""
    return None if value is None else value.decode("utf-8", "replace")


def status_str(status):
    """kl_status_str: the library's short text for a status."""
    return text(lib.kl_status_str(int(status)))


def grashof_str(cls):
    """kl_grashof_str: "crank-rocker", ... for a GrashofClass."""
    return text(lib.kl_grashof_str(int(cls)))


def length_unit_str(unit):
    """kl_length_unit_str: "mm", "m", "in", or "" when unstated."""
    return text(lib.kl_length_unit_str(int(unit)))


def angle_unit_str(unit):
    """kl_angle_unit_str: "rad" or "deg"."""
    return text(lib.kl_angle_unit_str(int(unit)))


class Handle:
    """What every class holding a C handle shares: `closed`, and `with`
    blocks that close it on leaving. The class keeps a weakref.finalize as
    _finalizer (which frees the handle once) and defines close()."""

    @property
    def closed(self):
        return not self._finalizer.alive

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()


class KinloopError(Exception):
    """A negative kinloop status.

    status       the int status (compare with Status members)
    status_name  kl_status_str(status)
    message      the failing handle's message (kl_model_error /
                 kl_solver_error), or, for calls that have no handle to
                 write to, a message the bindings compose
    line, column where a model file failed (None otherwise)
    result       for a failed sweep, the SweepResult of the steps delivered
    """

    def __init__(self, status, message, line=None, column=None, result=None):
        super().__init__(int(status), message)
        self.status = int(status)
        self.status_name = status_str(status)
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


def as_status(value):
    """A Status member where the value is one, else the int."""
    try:
        return Status(value)
    except ValueError:
        return value


def as_kernel(value):
    try:
        return Kernel(value)
    except ValueError:
        return value


def fail(status, message):
    raise KinloopError(status, message)


def check_const(status, what):
    """For calls on a const handle, which leave no message: `what` names the call."""
    if status < 0:
        fail(status, "%s: %s" % (what, status_str(status)))
    return status


def encode_name(name):
    if name is None:
        return None
    return name.encode("utf-8") if isinstance(name, str) else bytes(name)


def point_arg(p):
    """An (x, y) pair as two floats."""
    x, y = p
    return float(x), float(y)


def xy_buffer():
    return (ctypes.c_double * 2)()


def xy_pair(buf):
    return (buf[0], buf[1])


def values_arg(values, count, what):
    """One double per input as a C array (None for a model without inputs).

    The C functions take no count, so the bindings check it here."""
    if values is None:
        if count == 0:
            return None
        fail(Status.EINVAL, "%s: no values given; the model has %d input%s"
             % (what, count, "" if count == 1 else "s"))
    array = np.asarray(values, dtype=float).ravel()
    if array.size != count:
        fail(Status.EINVAL, "%s: %d value%s given; the model has %d input%s"
             % (what, array.size, "" if array.size == 1 else "s", count,
                "" if count == 1 else "s"))
    if count == 0:
        return None
    return (ctypes.c_double * count)(*array.tolist())


def axis_arg(axis):
    if axis in ("x", "X"):
        return 0
    if axis in ("y", "Y"):
        return 1
    return int(axis)


# ---------------------------------------------------------------------------
# Value types
# ---------------------------------------------------------------------------

def _default_options():
    o = raw.kl_options()
    # as far as this mirror of the struct reaches, whatever the library's
    lib.kl_options_init(ctypes.byref(o), ctypes.sizeof(o))
    return o


_DEFAULTS = _default_options()


@dataclasses.dataclass
class Options:
    """kl_options; the defaults are read from kl_options_default."""
    tolerance: float = _DEFAULTS.tolerance
    step_tolerance: float = _DEFAULTS.step_tolerance
    max_iterations: int = _DEFAULTS.max_iterations
    max_backtracks: int = _DEFAULTS.max_backtracks
    max_step: float = _DEFAULTS.max_step
    singular_rcond: float = _DEFAULTS.singular_rcond
    kernel: Kernel = Kernel(_DEFAULTS.kernel)

    def to_struct(self):
        o = _default_options()
        for f in dataclasses.fields(self):
            setattr(o, f.name, getattr(self, f.name))
        return o

    @classmethod
    def from_struct(cls, o):
        options = cls(**{f.name: getattr(o, f.name) for f in dataclasses.fields(cls)})
        options.kernel = as_kernel(options.kernel)
        return options


@dataclasses.dataclass(frozen=True)
class SolveStats:
    """kl_solve_stats: the last position solve attempt."""
    status: int
    iterations: int
    residual_evaluations: int
    factorizations: int
    backtracks: int
    residual: float
    step: float
    rcond: float
    kernel: int


class SweepSettings(NamedTuple):
    """kl_sweep_settings (C's `from` and `to` are `start` and `stop`)."""
    input: int
    start: float
    stop: float
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

    def to_struct(self):
        return raw.kl_output(int(self.kind), int(self.id), int(self.line_a),
                             int(self.line_b))


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
        fx, fy = point_arg(force)
        return cls(LoadKind.FORCE, point, fx=fx, fy=fy)

    @classmethod
    def torque_on(cls, link, torque):
        return cls(LoadKind.TORQUE, link, torque=float(torque))

    def to_struct(self):
        return raw.kl_load(int(self.kind), int(self.id), self.fx, self.fy,
                           self.torque)


@dataclasses.dataclass(frozen=True)
class Dimension:
    """kl_dimension: one local coordinate (axis 0/"x" or 1/"y") of a joint's
    attachment point on its link a or b, or of a point."""
    kind: DimensionKind
    id: int
    axis: int

    @classmethod
    def joint_a(cls, joint, axis):
        return cls(DimensionKind.JOINT_A, joint, axis_arg(axis))

    @classmethod
    def joint_b(cls, joint, axis):
        return cls(DimensionKind.JOINT_B, joint, axis_arg(axis))

    @classmethod
    def point(cls, point, axis):
        return cls(DimensionKind.POINT, point, axis_arg(axis))

    def to_struct(self):
        return raw.kl_dimension(int(self.kind), int(self.id), int(self.axis))


@dataclasses.dataclass(frozen=True)
class Range:
    """kl_range: extremes of an output over a sweep."""
    min: float
    max: float
    input_at_min: float
    input_at_max: float
    sweep_status: int
    limit_input: float

    def to_struct(self):
        return raw.kl_range(**dataclasses.asdict(self))

    def time_ratio(self):
        """kl_range_time_ratio: crank angle from minimum to maximum over the angle back."""
        ratio = ctypes.c_double()
        st = lib.kl_range_time_ratio(ctypes.byref(self.to_struct()), ctypes.byref(ratio))
        check_const(st, "time_ratio(input_at_min %r, input_at_max %r)"
                    % (self.input_at_min, self.input_at_max))
        return ratio.value


@dataclasses.dataclass
class SweepResult:
    """What Solver.sweep recorded, one row per delivered step.

    Columns are ids: link_angle[:, link], slide[:, joint] (NaN for revolute
    joints), point_x[:, point]. The rates and accelerations are those the C
    sweep delivers: a unit rate and zero acceleration of the swept input, so
    they read as the first- and second-order kinematic coefficients
    (d/du and d^2/du^2 of the swept input u). `message` is the solver's
    message for a limit or a failure, "" otherwise."""
    status: int
    steps_done: int
    limit_input: float
    substeps: int
    message: str
    input: np.ndarray
    link_angle: np.ndarray
    link_rate: np.ndarray
    link_accel: np.ndarray
    slide: np.ndarray
    slide_rate: np.ndarray
    slide_accel: np.ndarray
    point_x: np.ndarray
    point_y: np.ndarray
    point_vx: np.ndarray
    point_vy: np.ndarray
    point_ax: np.ndarray
    point_ay: np.ndarray

    @property
    def status_name(self):
        return status_str(self.status)

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
