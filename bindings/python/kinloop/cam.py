"""Cam: a cam (kl_cam) from a follower and a motion program. The plain
calls are generated (kinloop._api.CamMethods: set_follower, set_program,
motion, sample, check, error); this adds the lifetime and the outline as
numpy arrays."""

import ctypes
import weakref

import numpy as np

from . import _api, raw
from ._args import to_int
from ._core import Handle, KinloopError
from ._header import Status


class Cam(_api.CamMethods, Handle):
    """A kinloop cam (kl_cam): a follower and a motion program.

    ``with Cam() as c:`` frees it (kl_cam_free) on leaving the block;
    otherwise it is freed when garbage-collected, exactly once either
    way."""

    def __init__(self):
        ptr = raw.lib.kl_cam_new()
        if not ptr:
            raise KinloopError(Status.ENOMEM, "kinloop.Cam: out of memory")
        self._ptr = ptr
        self._finalizer = weakref.finalize(self, raw.lib.kl_cam_free, ptr)

    def close(self):
        """Frees the cam now (kl_cam_free); later calls do nothing."""
        self._finalizer()

    def outline(self, n):
        """The pitch curve and the cam surface at the cam angles 2 pi k / n,
        k = 0 .. n - 1 (kl_cam_outline): two (n, 2) arrays of (x, y) rows in
        the cam's frame, the first ready for Model.add_curve_slot."""
        n = to_int(n, "outline", "n")
        pitch = np.zeros((max(n, 0), 2))
        surface = np.zeros((max(n, 0), 2))
        self._check(raw.lib.kl_cam_outline(
            self._handle, n, pitch.ctypes.data_as(ctypes.POINTER(ctypes.c_double)),
            surface.ctypes.data_as(ctypes.POINTER(ctypes.c_double))))
        return pitch, surface
