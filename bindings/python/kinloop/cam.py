"""Cam: a cam (kl_cam) from a follower and a motion program. The plain
calls are generated (kinloop._api.CamMethods: set_follower, set_program,
motion, sample, outline, check, error); this adds the lifetime."""

import weakref

from . import _api, raw
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
