"""The bindings and include/kinloop.h agree. Every function the header
declares has its prototype, is exported by the library, and is bound: by a
generated method, or by the hand-written one its name calls for. Every
struct's size and field offsets are those the compiler laid out (the layout
probe, bindings/kinloop_layout, built from the same header by CMake, prints
them), every enum's values are the compiled ones, and every value type has
the fields of its struct. A header change the bindings have not followed
fails here rather than corrupting memory at run time."""

import ctypes
import dataclasses
import enum
import inspect
import keyword
import os
import re
import subprocess

import pytest

import kinloop as kl
from kinloop import _api, raw

HEADER = os.environ.get("KINLOOP_HEADER") or pytest.skip(
    "KINLOOP_HEADER is not set (ctest sets it)", allow_module_level=True)
LAYOUT = os.environ.get("KINLOOP_LAYOUT") or pytest.skip(
    "KINLOOP_LAYOUT is not set (ctest sets it)", allow_module_level=True)

with open(HEADER, encoding="utf-8") as f:
    TEXT = re.sub(r"/\*.*?\*/", " ", f.read(), flags=re.S)
DECLARED = re.findall(r"^KL_API\s+[^;(#]*?\b(kl_\w+)\s*\(([^)]*)\)\s*;", TEXT, re.M)
CLASSES = {"kl_model": kl.Model, "kl_solver": kl.Solver, "kl_study": kl.Study,
           "kl_range": kl.Range, "kl_cam": kl.Cam}

# Bound where the naming grammar does not say: lifetimes and files.
ELSEWHERE = {
    "kl_model_new": (kl.Model, "__init__"),
    "kl_model_new_with_alloc": (kl.Model, "__init__"),  # Model(allocator=...)
    "kl_model_free": (kl.Model, "close"),
    "kl_model_read": (kl.Model, "read_text"),
    "kl_model_read_with_alloc": (kl.Model, "read_text"),  # read_text(allocator=...)
    "kl_model_read_file": (kl.Model, "read_file"),
    "kl_solver_new": (kl.Solver, "__init__"),
    "kl_solver_new_in": (kl.Solver, "__init__"),  # Solver(..., in_place=True)
    "kl_solver_free": (kl.Solver, "close"),
    "kl_study_read": (kl.Study, "read_text"),
    "kl_study_read_file": (kl.Study, "read_file"),
    "kl_study_free": (kl.Study, "close"),
    "kl_cam_new": (kl.Cam, "__init__"),
    "kl_cam_free": (kl.Cam, "close"),
    # a sweep without a callback is recorded by the library itself
    "kl_solver_sweep_rows": (kl.Solver, "sweep"),
}


def expected_home(name, params):
    """Where the grammar binds a function: on the class of its first
    parameter (the handle, or a value struct), named without kl_ and
    without that class's prefix; a function without one in the package."""
    first = params.split(",")[0].replace("const", "").replace("*", " ").split()
    base = first[0] if first else ""
    if base in CLASSES:
        method = name[3:]
        prefix = base[3:] + "_"
        return CLASSES[base], method[len(prefix):] if method.startswith(prefix) else method
    return kl, name[3:]


def source_of(home):
    parts = inspect.getmro(home) if inspect.isclass(home) else [home]
    return "".join(inspect.getsource(p) for p in parts
                   if p is not object and inspect.getmodule(p) is not _api)


def test_the_header_declares_what_the_prototypes_hold():
    assert len(DECLARED) > 90
    assert [n for n, _ in DECLARED] == list(raw.PROTOTYPES)
    assert raw.missing == [], "the library lacks functions the header declares"


# Not bound, and why: kl_options_init serves a struct mirror older than the
# library; the bindings' structs are generated from the header the library
# was built with (the import checks the version), so kl_options_default,
# which Options' defaults come from, serves them.
NOT_BOUND = {"kl_options_init"}


@pytest.mark.parametrize("name,params", DECLARED, ids=[n for n, _ in DECLARED])
def test_every_function_is_bound(name, params):
    generated = _api.GENERATED[name]
    if name in NOT_BOUND:
        assert generated is None and not re.search(r"\b%s\b" % name, source_of(kl.Options))
        return
    if name in ELSEWHERE:
        home, attribute = ELSEWHERE[name]
    else:
        home, attribute = expected_home(name, params)
    if generated is not None:
        # the generated method is where the grammar says, and reachable
        assert generated.split(".")[-1] == attribute, generated
        assert hasattr(home, attribute)
        return
    member = getattr(home, attribute)
    where = member if inspect.ismodule(member) else home
    assert re.search(r"\b%s\b" % name, source_of(where)), \
        "%s.%s does not call %s" % (getattr(home, "__name__", home), attribute, name)


def layout():
    out = subprocess.run([LAYOUT], capture_output=True, text=True, check=True).stdout
    structs, fields, enums = {}, {}, {}
    for line in out.splitlines():
        w = line.split()
        if w[0] == "struct":
            structs[w[1]] = int(w[2])
            fields[w[1]] = []
        elif w[0] == "field":
            fields[w[1]].append((w[2], int(w[3]), int(w[4])))
        else:
            enums.setdefault(w[1], {})[w[2]] = int(w[3])
    return structs, fields, enums


STRUCTS, FIELDS, ENUMS = layout()


def test_the_probe_covers_every_struct_and_enum():
    assert set(STRUCTS) == set(re.findall(r"typedef\s+struct\s+(\w+)\s*\{", TEXT))
    assert set(ENUMS) == set(re.findall(r"\benum\s+(\w+)\s*\{", TEXT))


@pytest.mark.parametrize("name", sorted(STRUCTS))
def test_struct_layout_is_the_compilers(name):
    mirror = getattr(raw, name)
    assert ctypes.sizeof(mirror) == STRUCTS[name]
    assert [f for f, _ in mirror._fields_] == [f for f, _, _ in FIELDS[name]]
    for field, offset, size in FIELDS[name]:
        assert (getattr(mirror, field).offset, getattr(mirror, field).size) == (offset, size), \
            field


@pytest.mark.parametrize("name", sorted(_api.VALUE_TYPES, key=lambda t: t.__name__))
def test_value_types_have_the_fields_of_their_struct(name):
    value = _api.VALUE_TYPES[name]
    c_fields = [f for f, _, _ in FIELDS[name.__name__] if f != "size" or not
                issubclass(name, raw.Sized)]
    python = [f + "_" if keyword.iskeyword(f) else f for f in c_fields]
    assert [f.name for f in dataclasses.fields(value)] == python


def test_every_struct_is_a_value_type_or_read_by_hand():
    by_hand = {"kl_io_error": "a KinloopError with line and column",
               "kl_sweep_result": "its fields are in SweepResult with the recorded rows"}
    for name in ("status", "steps_done", "limit_input", "substeps"):
        assert name in (f.name for f in dataclasses.fields(kl.SweepResult))
    assert {t.__name__ for t in _api.VALUE_TYPES} | set(by_hand) == set(STRUCTS)


@pytest.mark.parametrize("name", sorted(ENUMS))
def test_enums_have_the_compiled_values(name):
    python = getattr(kl, "".join(p.capitalize() for p in name[3:].split("_")))
    values = ENUMS[name]
    prefix = os.path.commonprefix(list(values))
    prefix = prefix[:prefix.rfind("_") + 1] if len(values) > 1 else "KL_"
    assert {k[len(prefix):]: v for k, v in values.items()} == \
        {m.name: m.value for m in python}


def test_callback_types_match():
    assert raw.kl_sweep_fn._restype_ is ctypes.c_int
    assert list(raw.kl_sweep_fn._argtypes_) == [raw.solver_p, ctypes.c_int,
                                                ctypes.c_double, ctypes.c_void_p]
    assert raw.kl_alloc_fn._restype_ is ctypes.c_void_p
    assert list(raw.kl_alloc_fn._argtypes_) == [ctypes.c_void_p, ctypes.c_void_p,
                                                ctypes.c_size_t, ctypes.c_size_t]


def test_version_matches_the_header():
    major, minor, patch = (int(re.search(r"#define KINLOOP_VERSION_%s (\d+)" % p, TEXT).group(1))
                           for p in ("MAJOR", "MINOR", "PATCH"))
    assert raw.VERSION == (major, minor, patch) and raw.WRITTEN_FOR == (major, minor)
    assert kl.version() == kl.library_version == "%d.%d.%d" % (major, minor, patch)
    assert kl.version_number() == major * 10000 + minor * 100 + patch
    assert re.search(r"#define KL_GROUND (\d+)", TEXT).group(1) == str(kl.GROUND)


def test_lifetimes_and_makers_are_generated():
    # kl_<h>_free and the makers are bound by the generated part of each
    # class; a handle with nothing else to bind (kl_cam) is generated whole
    assert kl.Cam is _api.Cam
    for h in ("model", "solver", "study", "cam"):
        assert _api.GENERATED["kl_%s_free" % h] == "%sMethods.close" % h.capitalize()
    assert _api.GENERATED["kl_model_read_file"] == "ModelMethods.read_file"
    assert _api.GENERATED["kl_study_read"] == "StudyMethods.read_text"


RESULT_TUPLES = sorted(n for n in _api.__all__ if isinstance(getattr(_api, n), type) and
                       issubclass(getattr(_api, n), tuple))


@pytest.mark.parametrize("name", RESULT_TUPLES)
def test_result_tuples_are_named_after_the_c_parameters(name):
    """A result tuple's fields are the C function's filled parameters, in
    the header's order (its C result first, as `result`), and its method
    returns it."""
    tup = getattr(_api, name)
    function = re.search(r"of (kl_\w+)", tup.__doc__).group(1)
    params = dict(DECLARED)[function]
    filled = [re.sub(r"\[\d+\]", "", p).replace("*", " ").split()[-1] for p in params.split(",")
              if ("*" in p or "[" in p) and not p.strip().startswith("const") and
              p.split()[0] not in ("kl_model", "kl_solver", "kl_study", "kl_cam")]
    fields = [f.rstrip("_") for f in tup._fields]
    assert fields in (filled, ["result"] + filled) and len(fields) > 1
    # named after its method, or after its handle and method where the
    # method's name alone says too little (Study.run gives a StudyRun)
    owner, method = _api.GENERATED[function].split(".")[-2:] if "." in \
        _api.GENERATED[function] else ("", _api.GENERATED[function])
    method = method.replace("_", "")
    assert name.lower() in (method, owner.replace("Methods", "").lower() + method)


def test_lists_are_read_from_their_counts():
    """Every kl_<h>_<x>_count(handle) with a getter kl_<h>_<x> or
    kl_<h>_<x>_name of (handle, int index, ...) gives the list property
    <getter>s."""
    declared = dict(DECLARED)
    lists = []
    for name, params in declared.items():
        m = re.fullmatch(r"kl_(model|solver|study|cam)_(\w+)_count", name)
        if not m or len(params.split(",")) != 1:
            continue
        for getter in ("kl_%s_%s" % m.groups(), "kl_%s_%s_name" % m.groups()):
            given = declared.get(getter, "").split(",")
            if len(given) >= 2 and re.fullmatch(r"\s*int \w+\s*", given[1]):
                lists.append((CLASSES["kl_" + m.group(1)], getter[4 + len(m.group(1)):] + "s"))
    assert (kl.Model, "loops") in lists and (kl.Study, "output_names") in lists
    for cls, prop in lists:
        assert isinstance(inspect.getattr_static(cls, prop), property), (cls, prop)


@pytest.mark.parametrize("name", sorted(_api.VALUE_TYPES, key=lambda t: t.__name__))
def test_every_struct_has_its_converters(name):
    """to_kl_<struct> (generated from the header's declaration) makes the C
    struct from its value type field by field, passes the struct itself as
    it is, and refuses a value lacking a field, naming the struct's fields;
    from_kl_<struct> (generated too) reads the C struct back as the value
    type, each field as the value type declares it (an enum, a flag, a
    struct inside as its own value type)."""
    convert, read = getattr(_api, "to_" + name.__name__), getattr(_api, "from_" + name.__name__)
    value = read(name())  # zeros, structs inside as their value types
    assert isinstance(value, _api.VALUE_TYPES[name])
    for field in dataclasses.fields(value):
        got = getattr(value, field.name)
        if field.type is bool or (isinstance(field.type, type) and
                                  issubclass(field.type, (enum.IntEnum,))):
            assert type(got) is field.type or type(got) is int, field.name
        elif isinstance(field.type, str):  # a struct inside: its value type, by name
            assert type(got).__name__ == field.type, field.name
    c = convert(value, "kl_f", "arg")
    assert isinstance(c, name) and convert(c, "kl_f", "arg") is c
    assert read(c) == value
    with pytest.raises(kl.KinloopError, match=r"kl_f: arg has no field \w+ \(a %s needs" %
                       name.__name__):
        convert(object(), "kl_f", "arg")
