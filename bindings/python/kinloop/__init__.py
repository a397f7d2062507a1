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
are returned. Every value given reaches C exactly or is refused
(KinloopError, Status.EINVAL): see kinloop._args. The C layer itself is
kinloop.raw (raw.lib.kl_*).
"""

from . import _api, _header, raw
from ._api import *  # noqa: F401,F403  (value types and package functions, generated)
from ._core import KinloopError
from ._header import *  # noqa: F401,F403  (the enums and GROUND, generated)
from .model import Model
from .raw import MissingFunctionError
from .solver import Solver
from .study import Study
from .values import SweepResult

__version__ = "%d.%d.%d" % raw.VERSION
library_path = raw.library_path
library_version = raw.library_version

__all__ = sorted(set(_api.__all__ + _header.__all__ + [
    "KinloopError", "MissingFunctionError", "Model", "Solver", "Study", "SweepResult",
    "library_path", "library_version"]))
