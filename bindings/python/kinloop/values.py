"""The value types: one frozen dataclass per struct of the header, generated
(kinloop._api: its fields, the library's defaults where it has a defaults
function, its constructors per kind, its kl_<struct>_<verb> methods), and
what the bindings add to them: what sweeps return, a cycle table's row."""

import dataclasses

import numpy as np

from . import _api
from ._core import status_text


@dataclasses.dataclass(frozen=True, eq=False, kw_only=True)
class SweepResult(_api.SweepResult):
    """What Solver.sweep recorded: the fields of kl_sweep_result, a `message`
    (the solver's, for a limit or a failure; "" otherwise), and one row per
    delivered step of the library's row (kl_solver_row): `rows` whole, and
    each quantity as an attribute named by kl_quantity_str with a column per
    item: link_angle[:, link], joint_angle[:, joint], joint_slide[:, joint]
    (NaN for revolute joints), point_x[:, point], transmission[:, site],
    rcond[:, 0], ... `input` is the swept input's value at each step. The
    rates and accelerations are those the C sweep delivers: a unit rate and
    zero acceleration of the swept input, so they read as the first- and
    second-order kinematic coefficients (d/du and d^2/du^2 of the swept
    input u)."""
    message: str
    rows: np.ndarray
    layout: dict  # quantity name -> (first column, columns)
    input_index: int

    def __getattr__(self, name):
        layout = object.__getattribute__(self, "layout")
        if name not in layout:
            raise AttributeError("SweepResult has no quantity %r (it has %s)"
                                 % (name, ", ".join(layout)))
        first, count = layout[name]
        return self.rows[:, first:first + count]

    @property
    def input(self):
        """The swept input's value at each step."""
        return self.input_value[:, self.input_index]

    @property
    def status_name(self):
        return status_text(self.status)

    def __len__(self):
        return self.steps_done


#: the fields of a force, moment pair in kl_cycle_table's rows
_FORCE_FIELDS = [("fx", np.float64), ("fy", np.float64), ("moment", np.float64)]


def cycle_table_dtype(ninputs, njoints):
    """The numpy dtype of one row of kl_cycle_table for a model with
    `ninputs` inputs and `njoints` joints: named fields laid out exactly
    as the C row (1 + ninputs + 3 njoints + 5 doubles)."""
    return np.dtype([("input", np.float64), ("effort", np.float64, (ninputs,)),
                     ("joint", _FORCE_FIELDS, (njoints,)), ("ground", _FORCE_FIELDS),
                     ("kinetic_energy", np.float64), ("work", np.float64)])
