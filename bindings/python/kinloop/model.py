"""Model: a linkage description (links, joints, points, inputs, loops) over
the kl_model handle, with its builders, getters and model files; also the
read-only view of a model another handle owns (a study's nominal model)."""

import ctypes
import os
import weakref

from . import raw
from ._core import (Handle, AngleUnit, GrashofClass, JointKind, KinloopError,
                    LengthUnit, Status, SweepSettings, check_const,
                    encode_name, point_arg, status_str, text, xy_buffer,
                    xy_pair)

lib = raw.lib


def allocator_hook(allocator):
    """A kl_alloc_fn calling `allocator(ptr, old_size, new_size)`.

    `allocator` gets and returns addresses as ints (ptr 0 means allocate,
    new_size 0 means free); returning 0 or None, or raising, reports
    exhaustion (the library then fails with KL_ENOMEM)."""
    def hook(user, ptr, old_size, new_size):
        try:
            return allocator(ptr or 0, old_size, new_size) or None
        except Exception:
            return None
    return raw.kl_alloc_fn(hook)


def _free_model(ptr, solver_finalizers, keepalive):
    # A solver freed after its model would use freed memory: whatever order
    # the garbage collector finds them in, the solvers go first.
    for free_solver in list(solver_finalizers):
        free_solver()
    lib.kl_model_free(ptr)


def _release_view(solver_finalizers):
    # a borrowed model is not ours to free: only the solvers made from it
    for free_solver in list(solver_finalizers):
        free_solver()


def _io_error(status, err, what):
    """The error of a model-file call, from its kl_io_error."""
    return KinloopError(status, "%s: %s" % (what, text(err.message) or status_str(status)),
                        line=err.line or None, column=err.column or None)


class Model(Handle):
    """A kinloop model (kl_model). Build it, finalize it, make Solvers.

    ``with Model() as m:`` frees it (and its solvers) on leaving the block;
    otherwise it is freed when garbage-collected, exactly once either way.
    `allocator`, if given, is a callable (ptr, old_size, new_size) -> address
    used for every allocation of the model and its solvers (see
    allocator_hook). A Study's `model` is a borrowed Model (`borrowed` is
    true): it keeps the study alive, refuses changes, and is never freed
    here."""

    def __init__(self, allocator=None):
        if allocator is None:
            hook = None
            ptr = lib.kl_model_new()
        else:
            hook = allocator_hook(allocator)
            ptr = lib.kl_model_new_with_alloc(hook, None)
        if not ptr:
            raise KinloopError(Status.ENOMEM, "kl_model_new: out of memory")
        self._adopt(ptr, hook)

    @classmethod
    def _adopting(cls, ptr, hook):
        model = cls.__new__(cls)
        model._adopt(ptr, hook)
        return model

    @classmethod
    def _borrowing(cls, ptr, owner):
        """A view of a finalized model that `owner` holds and frees (a
        Study): the view keeps its owner alive, never frees the model, and
        refuses every call that would change it."""
        model = cls.__new__(cls)
        model._adopt(ptr, None, owner)
        return model

    def _adopt(self, ptr, hook, owner=None):
        self._ptr = ptr
        self._hook = hook  # a Study read against the model keeps it too
        self._sweeps = 0  # sweeps of its solvers under way
        self._solver_finalizers = set()
        self._owner = owner
        if owner is None:
            self._finalizer = weakref.finalize(self, _free_model, ptr,
                                               self._solver_finalizers, hook)
        else:
            self._finalizer = weakref.finalize(self, _release_view,
                                               self._solver_finalizers)

    # ---- lifetime ----

    @property
    def _handle(self):
        if not self._finalizer.alive:
            raise ValueError("kinloop: the model is closed")
        return self._ptr

    @property
    def _changing(self):
        """The handle for a call that changes the model (a non-const
        kl_model * in C), refused for a borrowed model: the library would
        answer KL_ESTATE (it is finalized) but write its message into a model
        that is not ours, and that its owner may be using on other threads."""
        handle = self._handle
        if self._owner is not None:
            raise KinloopError(Status.ESTATE, "the model belongs to a study and "
                               "cannot change (it is finalized)")
        return handle

    def _register_solver(self, finalizer):
        self._solver_finalizers.difference_update(
            [f for f in self._solver_finalizers if not f.alive])
        self._solver_finalizers.add(finalizer)

    def close(self):
        """Frees the model (kl_model_free) and first every solver made from
        it; later calls on them raise ValueError. Closing twice does nothing.
        For a borrowed model (Study.model) it closes the view and its solvers
        only: the model itself goes with its owner."""
        if self._sweeps:
            raise RuntimeError("kinloop: a model cannot be closed during a sweep "
                               "of one of its solvers")
        self._finalizer()

    @property
    def borrowed(self):
        """Whether this is a view of a model another handle owns (Study.model)."""
        return self._owner is not None

    def __repr__(self):
        if self.closed:
            return "<kinloop.Model (closed)>"
        return "<kinloop.Model: %d links, %d joints, %d points, %d inputs%s%s>" % (
            self.link_count, self.joint_count, self.point_count,
            self.input_count, ", finalized" if self.is_finalized else "",
            ", borrowed from a study" if self.borrowed else "")

    # ---- errors ----

    @property
    def error(self):
        """kl_model_error: the message of the last failed call."""
        return text(lib.kl_model_error(self._handle))

    def _check(self, status):
        if status < 0:
            raise KinloopError(status, self.error)
        return status

    # ---- builders ----

    def add_link(self, name=None):
        """A moving link; returns its id (>= 1)."""
        return self._check(lib.kl_add_link(self._changing, encode_name(name)))

    def add_revolute(self, a, a_point, b, b_point):
        """A pin: a_point in link a's frame coincides with b_point in b's."""
        return self._check(lib.kl_add_revolute(self._changing, a, *point_arg(a_point),
                                               b, *point_arg(b_point)))

    def add_prismatic(self, a, a_point, axis_angle, b, b_point):
        """A slider: b_point of b runs on a's line through a_point at
        axis_angle (rad, a's frame); b keeps a's angle."""
        return self._check(lib.kl_add_prismatic(self._changing, a, *point_arg(a_point),
                                                axis_angle, b, *point_arg(b_point)))

    def add_slot(self, a, a_point, axis_angle, b, b_point):
        """A pin in a slot: as add_prismatic, b may turn."""
        return self._check(lib.kl_add_slot(self._changing, a, *point_arg(a_point),
                                           axis_angle, b, *point_arg(b_point)))

    def add_prismatic_through(self, a, a_point, toward, b, b_point):
        """A slider whose line on a runs from a_point toward `toward`."""
        return self._check(lib.kl_add_prismatic_through(
            self._changing, a, *point_arg(a_point), *point_arg(toward), b,
            *point_arg(b_point)))

    def add_slot_through(self, a, a_point, toward, b, b_point):
        """A slot whose line on a runs from a_point toward `toward`."""
        return self._check(lib.kl_add_slot_through(
            self._changing, a, *point_arg(a_point), *point_arg(toward), b,
            *point_arg(b_point)))

    def add_point(self, link, xy, name=None):
        """A named point at xy in the frame of `link`; returns its id."""
        return self._check(lib.kl_add_point(self._changing, link, *point_arg(xy),
                                            encode_name(name)))

    def add_input(self, joint):
        """Makes the joint's coordinate an input; returns the input's index."""
        return self._check(lib.kl_add_input(self._changing, joint))

    def add_loop(self, joints):
        """Registers a loop: joint ids in walking order; returns its index."""
        ids = [int(j) for j in joints]
        array = (ctypes.c_int * max(len(ids), 1))(*ids)
        return self._check(lib.kl_add_loop(self._changing, len(ids), array))

    def set_joint_name(self, joint, name):
        self._check(lib.kl_model_set_joint_name(self._changing, joint, encode_name(name)))

    def set_units(self, length_unit, angle_unit):
        """Records the units (LengthUnit, AngleUnit); numbers are not converted."""
        self._check(lib.kl_model_set_units(self._changing, int(length_unit),
                                           int(angle_unit)))

    def set_sketch_angle(self, link, angle):
        """Sketch angle (rad) every new solver starts from."""
        self._check(lib.kl_model_set_sketch_angle(self._changing, link, angle))

    def set_sketch_slide(self, joint, slide):
        self._check(lib.kl_model_set_sketch_slide(self._changing, joint, slide))

    def set_sweep(self, input, start, stop, steps):
        """Records sweep settings for tools that run the model."""
        settings = raw.kl_sweep_settings(input=input, to=stop, steps=steps)
        setattr(settings, "from", start)
        self._check(lib.kl_model_set_sweep(self._changing, ctypes.byref(settings)))

    def finalize(self):
        """Checks the topology and prepares the equations; the model is
        immutable afterwards. A study's model is finalized already: for it,
        as for any finalized model, this does nothing."""
        handle = self._handle
        if self._owner is None:
            self._check(lib.kl_model_finalize(handle))

    # ---- reading the model back ----

    @property
    def is_finalized(self):
        return bool(lib.kl_model_is_finalized(self._handle))

    @property
    def dof(self):
        """Degrees of freedom by Gruebler's count (finalized models)."""
        return check_const(lib.kl_model_dof(self._handle), "dof")

    @property
    def loop_count(self):
        return check_const(lib.kl_model_loop_count(self._handle), "loop_count")

    def loop(self, loop):
        """The joint ids of loop `loop` in walking order."""
        h = self._handle
        n = check_const(lib.kl_model_loop(h, loop, None, 0), "loop(%d)" % loop)
        joints = (ctypes.c_int * max(n, 1))()
        lib.kl_model_loop(h, loop, joints, n)
        return list(joints[:n])

    @property
    def loops(self):
        return [self.loop(k) for k in range(self.loop_count)]

    @property
    def scale(self):
        """The length scale tolerances are relative to (NaN before finalize)."""
        return lib.kl_model_scale(self._handle)

    @property
    def units(self):
        """(LengthUnit, AngleUnit) as recorded."""
        length, angle = ctypes.c_int(), ctypes.c_int()
        check_const(lib.kl_model_units(self._handle, ctypes.byref(length),
                                       ctypes.byref(angle)), "units")
        return LengthUnit(length.value), AngleUnit(angle.value)

    def sketch_angle(self, link):
        """The recorded sketch angle, NaN if none."""
        return lib.kl_model_sketch_angle(self._handle, link)

    def sketch_slide(self, joint):
        return lib.kl_model_sketch_slide(self._handle, joint)

    @property
    def sweep_settings(self):
        """The recorded SweepSettings, or None if none are recorded."""
        settings = raw.kl_sweep_settings()
        st = lib.kl_model_sweep(self._handle, ctypes.byref(settings))
        if st == Status.EID:
            return None
        check_const(st, "sweep_settings")
        return SweepSettings(settings.input, getattr(settings, "from"),
                             settings.to, settings.steps)

    @property
    def link_count(self):
        """Links including ground."""
        return check_const(lib.kl_model_link_count(self._handle), "link_count")

    @property
    def joint_count(self):
        return check_const(lib.kl_model_joint_count(self._handle), "joint_count")

    @property
    def point_count(self):
        return check_const(lib.kl_model_point_count(self._handle), "point_count")

    @property
    def input_count(self):
        return check_const(lib.kl_model_input_count(self._handle), "input_count")

    def link_name(self, link):
        """The link's name; None if unnamed or unknown."""
        return text(lib.kl_model_link_name(self._handle, link))

    def joint_name(self, joint):
        return text(lib.kl_model_joint_name(self._handle, joint))

    def point_name(self, point):
        return text(lib.kl_model_point_name(self._handle, point))

    def link_find(self, name):
        """The id of the link called `name`; KinloopError (EID) if none is."""
        return check_const(lib.kl_model_find_link(self._handle, encode_name(name)),
                           "link_find(%r)" % (name,))

    def joint_find(self, name):
        return check_const(lib.kl_model_find_joint(self._handle, encode_name(name)),
                           "joint_find(%r)" % (name,))

    def point_find(self, name):
        return check_const(lib.kl_model_find_point(self._handle, encode_name(name)),
                           "point_find(%r)" % (name,))

    def point_link(self, point):
        """(link, (x, y)): the point's link and local coordinates."""
        xy = xy_buffer()
        link = check_const(lib.kl_model_point_link(self._handle, point, xy),
                           "point_link(%d)" % point)
        return link, xy_pair(xy)

    def joint_kind(self, joint):
        return JointKind(check_const(lib.kl_model_joint_kind(self._handle, joint),
                                     "joint_kind(%d)" % joint))

    def joint_links(self, joint):
        """((a, b), a_point, b_point): the joint's links and attachments."""
        links, a_xy, b_xy = (ctypes.c_int * 2)(), xy_buffer(), xy_buffer()
        check_const(lib.kl_model_joint_links(self._handle, joint, links, a_xy, b_xy),
                    "joint_links(%d)" % joint)
        return (links[0], links[1]), xy_pair(a_xy), xy_pair(b_xy)

    def joint_axis(self, joint):
        """Slide axis angle in a's frame; NaN for revolute joints."""
        return lib.kl_model_joint_axis(self._handle, joint)

    def input_joint(self, input):
        return check_const(lib.kl_model_input_joint(self._handle, input),
                           "input_joint(%d)" % input)

    def grashof(self):
        """GrashofClass of a finalized plain four-bar (kl_model_grashof)."""
        return GrashofClass(check_const(lib.kl_model_grashof(self._handle),
                                        "grashof"))

    # ---- model files ----

    @classmethod
    def read_text(cls, source, allocator=None):
        """A finalized model from model-file text (str, or bytes as they are)."""
        data = source.encode("utf-8") if isinstance(source, str) else bytes(source)
        err = raw.kl_io_error()
        if allocator is None:
            hook = None
            ptr = lib.kl_model_read(data, len(data), ctypes.byref(err))
        else:
            hook = allocator_hook(allocator)
            ptr = lib.kl_model_read_with_alloc(
                data, len(data), hook, None, ctypes.byref(err))
        if not ptr:
            raise _io_error(err.status or Status.ENOMEM, err, "read_text")
        return cls._adopting(ptr, hook)

    @classmethod
    def read_file(cls, path):
        """A finalized model from the model file at `path`."""
        err = raw.kl_io_error()
        ptr = lib.kl_model_read_file(os.fsencode(path), ctypes.byref(err))
        if not ptr:
            raise _io_error(err.status or Status.ENOMEM, err,
                            "read_file(%r)" % (os.fspath(path),))
        return cls._adopting(ptr, None)

    def to_text(self):
        """The model as model-file text."""
        write = lib.kl_model_write
        h = self._handle
        needed = ctypes.c_size_t()
        check_const(write(h, None, 0, ctypes.byref(needed)), "to_text")
        buf = ctypes.create_string_buffer(needed.value + 1)
        check_const(write(h, buf, len(buf), ctypes.byref(needed)), "to_text")
        return buf.raw[:needed.value].decode("utf-8")

    def write_file(self, path):
        """Writes the model to the file at `path`."""
        err = raw.kl_io_error()
        st = lib.kl_model_write_file(self._handle, os.fsencode(path),
                                                ctypes.byref(err))
        if st < 0:
            raise _io_error(st, err, "write_file(%r)" % (os.fspath(path),))
