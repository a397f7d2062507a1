"""The C layer of the kinloop bindings: finding and loading libkinloop, the
C structs and callback types as ctypes, and the prototype of every function
in include/kinloop.h.

Everything the C API offers is reachable here as ``raw.lib.kl_*``; the
classes in ``kinloop.model``, ``kinloop.solver`` and ``kinloop.study`` are
built on it.

Library lookup, first match wins:
  1. the environment variable KINLOOP_LIBRARY: a path to libkinloop.so
     (if it is set and cannot be loaded, that is an error: no fallback);
  2. the build tree: $KINLOOP_BUILD_DIR/libkinloop.so, then
     <repository>/build/libkinloop.so (bindings/python/../../build);
  3. the system path: ctypes.util.find_library("kinloop"), then
     "libkinloop.so.0".
"""

import ctypes
import ctypes.util
import os

#: The library version (major, minor) these bindings were written for.
WRITTEN_FOR = (0, 2)

_PACKAGE_DIR = os.path.dirname(os.path.abspath(__file__))
# bindings/python/kinloop -> bindings/python -> the repository root
_REPOSITORY_BUILD = os.path.normpath(
    os.path.join(_PACKAGE_DIR, os.pardir, os.pardir, os.pardir, "build"))


def _candidates():
    """(where, what to load) in lookup order, after KINLOOP_LIBRARY; lazily,
    as find_library runs external programs."""
    build_dir = os.environ.get("KINLOOP_BUILD_DIR")
    if build_dir:
        yield "KINLOOP_BUILD_DIR", os.path.join(build_dir, "libkinloop.so")
    yield "build tree", os.path.join(_REPOSITORY_BUILD, "libkinloop.so")
    system = ctypes.util.find_library("kinloop")
    if system:
        yield "system path", system
    yield "system path", "libkinloop.so.0"


def _load():
    explicit = os.environ.get("KINLOOP_LIBRARY")
    if explicit:
        try:
            return ctypes.CDLL(explicit), explicit
        except OSError as e:
            raise ImportError(
                "kinloop: KINLOOP_LIBRARY=%r cannot be loaded: %s" % (explicit, e)
            ) from None
    tried = []
    for how, path in _candidates():
        if os.path.isabs(path) and not os.path.exists(path):
            tried.append("  %s: %s (no such file)" % (how, path))
            continue
        try:
            return ctypes.CDLL(path), path
        except OSError as e:
            tried.append("  %s: %s (%s)" % (how, path, e))
    raise ImportError(
        "kinloop: libkinloop.so not found. Build it (cmake -S . -B build && "
        "cmake --build build) or point KINLOOP_LIBRARY at it. Tried:\n"
        + "\n".join(tried))


lib, library_path = _load()


def _check_version():
    """The library's version text; ImportError unless its major.minor match."""
    if not hasattr(lib, "kl_version"):
        raise ImportError("kinloop: %s has no kl_version; it is not libkinloop"
                          % library_path)
    lib.kl_version.restype = ctypes.c_char_p
    lib.kl_version.argtypes = []
    text = lib.kl_version().decode("ascii", "replace")
    try:
        major, minor = (int(p) for p in text.split(".")[:2])
    except ValueError:
        raise ImportError("kinloop: %s reports the version %r, not MAJOR.MINOR.PATCH"
                          % (library_path, text)) from None
    if (major, minor) != WRITTEN_FOR:
        raise ImportError(
            "kinloop: %s is version %s, but these bindings were written for "
            "%d.%d.x; use the bindings of the same release, or point "
            "KINLOOP_LIBRARY at a matching library"
            % (library_path, text, WRITTEN_FOR[0], WRITTEN_FOR[1]))
    return text


# The version first: a library of another release may lack symbols.
library_version = _check_version()

# ---------------------------------------------------------------------------
# Opaque handles and callback types
# ---------------------------------------------------------------------------


class kl_model(ctypes.Structure):
    """Opaque: only pointers to it exist."""
    _fields_ = []


class kl_solver(ctypes.Structure):
    """Opaque: only pointers to it exist."""
    _fields_ = []


class kl_study(ctypes.Structure):
    """Opaque: only pointers to it exist."""
    _fields_ = []


model_p = ctypes.POINTER(kl_model)
solver_p = ctypes.POINTER(kl_solver)
study_p = ctypes.POINTER(kl_study)

#: void *(*kl_alloc_fn)(void *user, void *ptr, size_t old_size, size_t new_size)
kl_alloc_fn = ctypes.CFUNCTYPE(ctypes.c_void_p, ctypes.c_void_p,
                               ctypes.c_void_p, ctypes.c_size_t,
                               ctypes.c_size_t)
#: int (*kl_sweep_fn)(const kl_solver *s, int step, double input, void *user)
kl_sweep_fn = ctypes.CFUNCTYPE(ctypes.c_int, solver_p, ctypes.c_int,
                               ctypes.c_double, ctypes.c_void_p)

# ---------------------------------------------------------------------------
# Structs, field for field as in include/kinloop.h
# ---------------------------------------------------------------------------


class _Sized(ctypes.Structure):
    """A struct whose first field `size` the caller sets to its sizeof."""

    def __init__(self, **fields):
        super().__init__(**fields)
        self.size = ctypes.sizeof(self)


class kl_io_error(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("status", ctypes.c_int),
                ("line", ctypes.c_int), ("column", ctypes.c_int),
                ("message", ctypes.c_char * 256)]


class kl_options(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("tolerance", ctypes.c_double),
                ("step_tolerance", ctypes.c_double),
                ("max_iterations", ctypes.c_int),
                ("max_backtracks", ctypes.c_int),
                ("max_step", ctypes.c_double),
                ("singular_rcond", ctypes.c_double),
                ("kernel", ctypes.c_int)]


class kl_solve_stats(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("status", ctypes.c_int),
                ("iterations", ctypes.c_int),
                ("residual_evaluations", ctypes.c_int),
                ("factorizations", ctypes.c_int),
                ("backtracks", ctypes.c_int), ("residual", ctypes.c_double),
                ("step", ctypes.c_double), ("rcond", ctypes.c_double),
                ("kernel", ctypes.c_int)]


class kl_sweep_settings(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("input", ctypes.c_int),
                ("from", ctypes.c_double), ("to", ctypes.c_double),
                ("steps", ctypes.c_int)]


class kl_sweep_result(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("status", ctypes.c_int),
                ("steps_done", ctypes.c_int), ("limit_input", ctypes.c_double),
                ("substeps", ctypes.c_int)]


class kl_range(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("min", ctypes.c_double),
                ("max", ctypes.c_double), ("input_at_min", ctypes.c_double),
                ("input_at_max", ctypes.c_double),
                ("sweep_status", ctypes.c_int),
                ("limit_input", ctypes.c_double)]


class kl_reach_result(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("status", ctypes.c_int),
                ("input", ctypes.c_int), ("from", ctypes.c_double),
                ("limit_input", ctypes.c_double), ("substeps", ctypes.c_int)]


class kl_output(ctypes.Structure):
    _fields_ = [("kind", ctypes.c_int), ("id", ctypes.c_int),
                ("line_a", ctypes.c_int), ("line_b", ctypes.c_int)]


class kl_load(ctypes.Structure):
    _fields_ = [("kind", ctypes.c_int), ("id", ctypes.c_int),
                ("fx", ctypes.c_double), ("fy", ctypes.c_double),
                ("torque", ctypes.c_double)]


class kl_dimension(ctypes.Structure):
    _fields_ = [("kind", ctypes.c_int), ("id", ctypes.c_int),
                ("axis", ctypes.c_int)]


class kl_fourbar(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("loop", ctypes.c_int),
                ("input", ctypes.c_int), ("input_joint", ctypes.c_int),
                ("output_joint", ctypes.c_int), ("input_link", ctypes.c_int),
                ("coupler_link", ctypes.c_int), ("output_link", ctypes.c_int),
                ("ground_length", ctypes.c_double),
                ("input_length", ctypes.c_double),
                ("coupler_length", ctypes.c_double),
                ("output_length", ctypes.c_double), ("grashof", ctypes.c_int)]


class kl_transmission_skip(ctypes.Structure):
    _fields_ = [("joint", ctypes.c_int), ("loop", ctypes.c_int),
                ("link", ctypes.c_int), ("reason", ctypes.c_int)]


class kl_study_summary(_Sized):
    _fields_ = [("size", ctypes.c_size_t), ("samples", ctypes.c_long),
                ("assembled", ctypes.c_long), ("within_limits", ctypes.c_long),
                ("nominal", ctypes.c_double), ("mean", ctypes.c_double),
                ("std", ctypes.c_double), ("p01", ctypes.c_double),
                ("p05", ctypes.c_double), ("p50", ctypes.c_double),
                ("p95", ctypes.c_double), ("p99", ctypes.c_double),
                ("min", ctypes.c_double), ("max", ctypes.c_double),
                ("worst", ctypes.c_double), ("worst_sample", ctypes.c_long),
                ("first_order_std", ctypes.c_double),
                ("has_limits", ctypes.c_int), ("lower", ctypes.c_double),
                ("upper", ctypes.c_double), ("limited", ctypes.c_long)]


# ---------------------------------------------------------------------------
# Prototypes
# ---------------------------------------------------------------------------

_int, _dbl, _str, _size = ctypes.c_int, ctypes.c_double, ctypes.c_char_p, ctypes.c_size_t
_long = ctypes.c_long
_voidp = ctypes.c_void_p
_dblp, _intp = ctypes.POINTER(ctypes.c_double), ctypes.POINTER(ctypes.c_int)
_P = ctypes.POINTER

#: name -> (restype, argtypes), in the header's order.
PROTOTYPES = {
    "kl_version": (_str, []),
    "kl_version_number": (_int, []),
    "kl_status_str": (_str, [_int]),
    # building a model
    "kl_model_new": (model_p, []),
    "kl_model_new_with_alloc": (model_p, [kl_alloc_fn, _voidp]),
    "kl_model_free": (None, [model_p]),
    "kl_model_error": (_str, [model_p]),
    "kl_add_link": (_int, [model_p, _str]),
    "kl_add_revolute": (_int, [model_p, _int, _dbl, _dbl, _int, _dbl, _dbl]),
    "kl_add_prismatic": (_int, [model_p, _int, _dbl, _dbl, _dbl, _int, _dbl, _dbl]),
    "kl_add_slot": (_int, [model_p, _int, _dbl, _dbl, _dbl, _int, _dbl, _dbl]),
    "kl_add_prismatic_through": (_int, [model_p, _int, _dbl, _dbl, _dbl, _dbl,
                                        _int, _dbl, _dbl]),
    "kl_add_slot_through": (_int, [model_p, _int, _dbl, _dbl, _dbl, _dbl, _int,
                                   _dbl, _dbl]),
    "kl_add_point": (_int, [model_p, _int, _dbl, _dbl, _str]),
    "kl_add_input": (_int, [model_p, _int]),
    "kl_add_loop": (_int, [model_p, _int, _intp]),
    "kl_model_finalize": (_int, [model_p]),
    "kl_model_is_finalized": (_int, [model_p]),
    "kl_model_dof": (_int, [model_p]),
    "kl_model_loop_count": (_int, [model_p]),
    "kl_model_loop": (_int, [model_p, _int, _intp, _int]),
    "kl_model_scale": (_dbl, [model_p]),
    "kl_model_set_joint_name": (_int, [model_p, _int, _str]),
    "kl_model_set_units": (_int, [model_p, _int, _int]),
    "kl_model_units": (_int, [model_p, _intp, _intp]),
    "kl_length_unit_str": (_str, [_int]),
    "kl_angle_unit_str": (_str, [_int]),
    "kl_model_set_sketch_angle": (_int, [model_p, _int, _dbl]),
    "kl_model_set_sketch_slide": (_int, [model_p, _int, _dbl]),
    "kl_model_sketch_angle": (_dbl, [model_p, _int]),
    "kl_model_sketch_slide": (_dbl, [model_p, _int]),
    "kl_model_set_sweep": (_int, [model_p, _P(kl_sweep_settings)]),
    "kl_model_sweep": (_int, [model_p, _P(kl_sweep_settings)]),
    "kl_model_link_count": (_int, [model_p]),
    "kl_model_joint_count": (_int, [model_p]),
    "kl_model_point_count": (_int, [model_p]),
    "kl_model_input_count": (_int, [model_p]),
    "kl_model_link_name": (_str, [model_p, _int]),
    "kl_model_point_name": (_str, [model_p, _int]),
    "kl_model_find_link": (_int, [model_p, _str]),
    "kl_model_joint_name": (_str, [model_p, _int]),
    "kl_model_find_joint": (_int, [model_p, _str]),
    "kl_model_find_point": (_int, [model_p, _str]),
    "kl_model_point_link": (_int, [model_p, _int, _dblp]),
    "kl_model_joint_kind": (_int, [model_p, _int]),
    "kl_model_joint_links": (_int, [model_p, _int, _intp, _dblp, _dblp]),
    "kl_model_joint_axis": (_dbl, [model_p, _int]),
    "kl_model_input_joint": (_int, [model_p, _int]),
    # the start position, the layout of a row
    "kl_model_start_inputs": (_int, [model_p, _dblp]),
    "kl_quantity_str": (_str, [_int]),
    "kl_model_row_size": (_int, [model_p]),
    "kl_model_row_offset": (_int, [model_p, _int, _intp]),
    # model files
    "kl_model_read": (model_p, [_str, _size, _P(kl_io_error)]),
    "kl_model_read_with_alloc": (model_p, [_str, _size, kl_alloc_fn, _voidp,
                                           _P(kl_io_error)]),
    "kl_model_read_file": (model_p, [_str, _P(kl_io_error)]),
    "kl_model_write": (_int, [model_p, _voidp, _size, _P(_size)]),
    "kl_model_write_file": (_int, [model_p, _str, _P(kl_io_error)]),
    # solving
    "kl_options_default": (None, [_P(kl_options)]),
    "kl_options_init": (None, [_P(kl_options), ctypes.c_size_t]),
    "kl_solver_new": (solver_p, [model_p]),
    "kl_solver_bytes": (_size, [model_p]),
    "kl_solver_new_in": (solver_p, [model_p, _voidp, _size]),
    "kl_solver_free": (None, [solver_p]),
    "kl_solver_model": (model_p, [solver_p]),
    "kl_solver_error": (_str, [solver_p]),
    "kl_solver_set_options": (_int, [solver_p, _P(kl_options)]),
    "kl_solver_options": (_int, [solver_p, _P(kl_options)]),
    "kl_set_link_angle": (_int, [solver_p, _int, _dbl]),
    "kl_set_joint_slide": (_int, [solver_p, _int, _dbl]),
    "kl_solve_position": (_int, [solver_p, _dblp]),
    "kl_solve_velocity": (_int, [solver_p, _dblp]),
    "kl_solve_acceleration": (_int, [solver_p, _dblp]),
    "kl_solver_stats": (_int, [solver_p, _P(kl_solve_stats)]),
    # results
    "kl_link_angle": (_dbl, [solver_p, _int]),
    "kl_link_rate": (_dbl, [solver_p, _int]),
    "kl_link_accel": (_dbl, [solver_p, _int]),
    "kl_joint_slide": (_dbl, [solver_p, _int]),
    "kl_joint_slide_rate": (_dbl, [solver_p, _int]),
    "kl_joint_slide_accel": (_dbl, [solver_p, _int]),
    "kl_joint_angle": (_dbl, [solver_p, _int]),
    "kl_input_value": (_dbl, [solver_p, _int]),
    "kl_link_origin": (_int, [solver_p, _int, _dblp]),
    "kl_point_position": (_int, [solver_p, _int, _dblp]),
    "kl_point_velocity": (_int, [solver_p, _int, _dblp]),
    "kl_point_acceleration": (_int, [solver_p, _int, _dblp]),
    # kinematic coefficients
    "kl_solve_coefficients": (_int, [solver_p]),
    "kl_link_angle_deriv": (_dbl, [solver_p, _int, _int]),
    "kl_link_angle_deriv2": (_dbl, [solver_p, _int, _int, _int]),
    "kl_joint_slide_deriv": (_dbl, [solver_p, _int, _int]),
    "kl_joint_slide_deriv2": (_dbl, [solver_p, _int, _int, _int]),
    "kl_point_deriv": (_int, [solver_p, _int, _int, _dblp]),
    "kl_point_deriv2": (_int, [solver_p, _int, _int, _int, _dblp]),
    # states, assembly modes, sweeps
    "kl_solver_copy_state": (_int, [solver_p, solver_p]),
    "kl_solver_find_assemblies": (_int, [solver_p, _dblp, _P(solver_p), _int]),
    "kl_solver_sweep": (_int, [solver_p, _int, _dbl, _dbl, _int, kl_sweep_fn, _voidp,
                        _P(kl_sweep_result)]),
    # going to a position, frames, rows
    "kl_solver_reset": (_int, [solver_p]),
    "kl_solver_reach": (_int, [solver_p, _dblp, _P(kl_reach_result)]),
    "kl_link_to_global": (_int, [solver_p, _int, _dblp, _dblp]),
    "kl_joint_position": (_int, [solver_p, _int, _dblp]),
    "kl_link_origin_velocity": (_int, [solver_p, _int, _dblp]),
    "kl_link_origin_accel": (_int, [solver_p, _int, _dblp]),
    "kl_solver_row": (_int, [solver_p, _dblp]),
    "kl_solver_sweep_rows": (_int, [solver_p, _int, _dbl, _dbl, _int, _dblp,
                                    _P(kl_sweep_result)]),
    # design figures
    "kl_grashof": (_int, [_dbl, _dbl, _dbl, _dbl]),
    "kl_grashof_str": (_str, [_int]),
    "kl_model_grashof": (_int, [model_p]),
    "kl_output_value": (_int, [solver_p, _P(kl_output), _dblp]),
    "kl_output_deriv": (_int, [solver_p, _P(kl_output), _int, _dblp]),
    "kl_output_range": (_int, [solver_p, _int, _dbl, _dbl, _int, _P(kl_output),
                               _P(kl_range)]),
    "kl_range_time_ratio": (_int, [_P(kl_range), _dblp]),
    "kl_output_mechanical_advantage": (_int, [solver_p, _P(kl_output), _int, _dblp]),
    "kl_input_effort": (_int, [solver_p, _int, _P(kl_load), _dblp]),
    "kl_output_sensitivity": (_int, [solver_p, _P(kl_output), _P(kl_dimension),
                                     _dblp]),
    "kl_output_tolerance_stack": (_int, [solver_p, _P(kl_output), _int,
                                  _P(kl_dimension), _dblp, _dblp, _dblp]),
    # four-bar loops, transmission sites, effort over a sweep
    "kl_model_loop_fourbar": (_int, [model_p, _int, _P(kl_fourbar)]),
    "kl_model_transmissions": (_int, [model_p, _P(kl_output), _int]),
    "kl_model_transmission_skips": (_int, [model_p, _P(kl_transmission_skip),
                                           _int]),
    "kl_input_effort_range": (_int, [solver_p, _int, _dbl, _dbl, _int, _int,
                                     _P(kl_load), _int, _P(kl_range)]),
    # design studies
    "kl_study_read": (study_p, [_str, _size, model_p, _P(kl_io_error)]),
    "kl_study_read_file": (study_p, [_str, _P(kl_io_error)]),
    "kl_study_prepare": (_int, [study_p]),
    "kl_study_error": (_str, [study_p]),
    "kl_study_free": (None, [study_p]),
    "kl_study_model_path": (_str, [study_p]),
    "kl_study_sample_count": (_long, [study_p]),
    "kl_study_output_count": (_int, [study_p]),
    "kl_study_output_name": (_str, [study_p, _int]),
    "kl_study_model": (model_p, [study_p]),
    "kl_study_dimension_count": (_int, [study_p]),
    "kl_study_dimension_name": (_str, [study_p, _int]),
    "kl_study_run": (_int, [study_p, _long, _long, _int, _dblp, _intp, _dblp]),
    "kl_study_summarize": (_int, [study_p, _int, _dblp, _intp, _long,
                                  _P(kl_study_summary)]),
}


class MissingFunctionError(NotImplementedError):
    """The loaded library lacks a function its header declares."""


def _missing_function(name):
    def call(*args):
        raise MissingFunctionError(
            "kinloop: %s does not export %s, which include/kinloop.h declares; "
            "rebuild it (cmake --build build), or the library does not "
            "implement it yet" % (library_path, name))
    call.__name__ = name
    return call


#: Functions the header declares but the loaded library does not export.
#: Each is replaced by a stand-in raising MissingFunctionError when called,
#: so the rest of the API stays usable.
missing = []
for _name, (_restype, _argtypes) in PROTOTYPES.items():
    try:
        _fn = getattr(lib, _name)
    except AttributeError:
        missing.append(_name)
        setattr(lib, _name, _missing_function(_name))
        continue
    _fn.restype = _restype
    _fn.argtypes = _argtypes
