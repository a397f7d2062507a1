"""kinloop: planar multi-loop linkage kinematics, a thin ctypes layer over
libkinloop (include/kinloop.h).

    import kinloop
    with kinloop.Model() as m:
        crank = m.add_link("crank")
        ...
        m.finalize()
        s = kinloop.Solver(m)
        s.solve_position(1.0)

    with kinloop.Study.read_file("examples/models/flap-tucker.study") as st:
        values, status, dims = st.run(count=200)
        print(st.summarize("stroke", values, status).std)

Angles are radians, points are (x, y) tuples, ids are ints as in C. Negative
statuses raise KinloopError; positive ones (Status.LIMIT, Status.STOPPED)
are returned. The C layer itself is kinloop.raw (raw.lib.kl_*).
"""

from . import raw
from ._core import (GROUND, AngleUnit, Dimension, DimensionKind, GrashofClass,
                    JointKind, Kernel, KinloopError, LengthUnit, Load, LoadKind,
                    Options, Output, OutputKind, Quantity, Range, SampleStatus,
                    SolveStats, Status, StudyRun, StudySummary, SweepResult,
                    SweepSettings, TransmissionSkipReason, angle_unit_str,
                    grashof_str, length_unit_str, status_str)
from ._core import check_const as _check_const
from .model import Model
from .raw import MissingFunctionError
from .solver import Solver
from .study import Study

__version__ = "%d.%d" % raw.WRITTEN_FOR
library_path = raw.library_path
library_version = raw.library_version


def version():
    """kl_version: the loaded library's "MAJOR.MINOR.PATCH"."""
    return raw.lib.kl_version().decode("ascii")


def version_number():
    """kl_version_number: MAJOR * 10000 + MINOR * 100 + PATCH."""
    return raw.lib.kl_version_number()


def grashof(ground, input, coupler, output):
    """kl_grashof: the GrashofClass of a four-bar from its link lengths."""
    return GrashofClass(_check_const(raw.lib.kl_grashof(ground, input, coupler, output),
                                    "grashof(%r, %r, %r, %r)"
                                    % (ground, input, coupler, output)))


__all__ = [
    "GROUND", "AngleUnit", "Dimension", "DimensionKind", "GrashofClass",
    "JointKind", "Kernel", "KinloopError", "LengthUnit", "Load", "LoadKind",
    "MissingFunctionError", "Model", "Options", "Output", "OutputKind",
    "Quantity", "Range", "SampleStatus", "SolveStats", "Solver", "Status",
    "Study", "StudyRun", "StudySummary", "SweepResult", "SweepSettings",
    "TransmissionSkipReason",
    "angle_unit_str", "grashof", "grashof_str", "length_unit_str",
    "library_path", "library_version", "status_str", "version",
    "version_number",
]
