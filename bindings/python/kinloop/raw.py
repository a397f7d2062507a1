"""The C layer of the kinloop bindings: finding and loading libkinloop, and
setting the prototype of every function of include/kinloop.h on it.

``raw.lib.kl_*`` are the library's functions as ctypes sees them, with
nothing checked; the structs, enums and callback types are those of
kinloop._header (re-exported here). The classes of kinloop are built on the
checked calls of kinloop._api instead.

Library lookup, first match wins:
  1. the environment variable KINLOOP_LIBRARY: a path to libkinloop.so
     (if it is set and cannot be loaded, that is an error: no fallback);
  2. the library this package was built or installed with, as recorded in
     kinloop/_location.py (a path relative to the package when installed);
  3. the system path: ctypes.util.find_library("kinloop"), then
     "libkinloop.so.0".
"""

import ctypes
import ctypes.util
import os

from . import _header
from ._header import PROTOTYPES, VERSION
from ._location import LIBRARY

# every declaration of the header: raw.kl_options, raw.solver_p, raw.kl_sweep_fn, ...
globals().update({k: v for k, v in vars(_header).items() if not k.startswith("_")})

#: The library version (major, minor) these bindings were generated for.
WRITTEN_FOR = VERSION[:2]


def _candidates():
    """(where, what to load) in lookup order, after KINLOOP_LIBRARY; lazily,
    as find_library runs external programs."""
    here = os.path.dirname(os.path.abspath(__file__))
    yield "recorded in kinloop/_location.py", os.path.normpath(os.path.join(here, LIBRARY))
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
            raise ImportError("kinloop: KINLOOP_LIBRARY=%r cannot be loaded: %s"
                              % (explicit, e)) from None
    tried = []
    for how, path in _candidates():
        if os.path.isabs(path) and not os.path.exists(path):
            tried.append("  %s: %s (no such file)" % (how, path))
            continue
        try:
            return ctypes.CDLL(path), path
        except OSError as e:
            tried.append("  %s: %s (%s)" % (how, path, e))
    raise ImportError("kinloop: libkinloop.so not found. Point KINLOOP_LIBRARY at it, or "
                      "use the package the build assembled (build/bindings/python) or "
                      "installed. Tried:\n" + "\n".join(tried))


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
            "kinloop: %s is version %s, but these bindings were generated for %d.%d.x; "
            "use the bindings of the same release, or point KINLOOP_LIBRARY at a "
            "matching library" % (library_path, text, WRITTEN_FOR[0], WRITTEN_FOR[1]))
    return text


# The version first: a library of another release may lack symbols.
library_version = _check_version()


class MissingFunctionError(NotImplementedError):
    """The loaded library lacks a function its header declares."""


def _missing_function(name):
    def call(*args):
        raise MissingFunctionError(
            "kinloop: %s does not export %s, which include/kinloop.h declares; "
            "rebuild it, or the library does not implement it yet" % (library_path, name))
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
