"""The bindings mirror include/kinloop.h, the C API's contract: every
function with its exact C types, every struct field for field, every enum
value, the callback types and the version. A header change the bindings
have not followed fails here rather than corrupting memory at run time."""

import ctypes
import os
import re

import pytest

import kinloop as kl
from kinloop import raw

HEADER = os.path.normpath(os.path.join(os.path.dirname(__file__), os.pardir, os.pardir,
                                       os.pardir, "include", "kinloop.h"))
if not os.path.exists(HEADER):
    pytest.skip("include/kinloop.h is not beside these bindings", allow_module_level=True)


def header_text():
    with open(HEADER, encoding="utf-8") as f:
        text = f.read()
    text = re.sub(r"/\*.*?\*/", " ", text, flags=re.S)  # comments
    return re.sub(r"\\\n", " ", text)


TEXT = header_text()
STRUCTS = {name: getattr(raw, name) for name in (
    "kl_io_error", "kl_options", "kl_solve_stats", "kl_sweep_settings",
    "kl_sweep_result", "kl_range", "kl_output", "kl_load", "kl_dimension",
    "kl_study_summary")}
ENUMS = {  # C enum -> (Python enum, prefix the Python names drop)
    "kl_status": (kl.Status, "KL_"),
    "kl_joint_kind": (kl.JointKind, "KL_JOINT_"),
    "kl_length_unit": (kl.LengthUnit, "KL_LENGTH_"),
    "kl_angle_unit": (kl.AngleUnit, "KL_ANGLE_"),
    "kl_kernel": (kl.Kernel, "KL_KERNEL_"),
    "kl_grashof_class": (kl.GrashofClass, "KL_GRASHOF_"),
    "kl_output_kind": (kl.OutputKind, "KL_OUTPUT_"),
    "kl_load_kind": (kl.LoadKind, "KL_LOAD_"),
    "kl_dimension_kind": (kl.DimensionKind, "KL_DIMENSION_"),
    "kl_sample_status": (kl.SampleStatus, "KL_SAMPLE_"),
}


def ctype_of(declaration):
    """The ctypes type the bindings must use for a C parameter or result
    declaration (its name, if any, included)."""
    d = " ".join(declaration.replace("*", " * ").split())
    d = re.sub(r"\bconst\b", "", d)
    array = re.search(r"\[\d+\]$", d)
    d = re.sub(r"\s*\w+\s*\[\d+\]$", " *", d) if array else d
    tokens = d.split()
    pointers = tokens.count("*")
    words = [t for t in tokens if t != "*"]
    base = words[0]  # any further word is the parameter's name
    basics = {"int": ctypes.c_int, "long": ctypes.c_long, "double": ctypes.c_double,
              "size_t": ctypes.c_size_t, "void": None}
    if base in ("kl_alloc_fn", "kl_sweep_fn"):
        return getattr(raw, base)
    if base == "char" and pointers == 1:
        # the header's strings are const char *; a writable char * buffer is
        # passed as a void pointer
        return ctypes.c_char_p if "const" in declaration else ctypes.c_void_p
    if base == "void":
        return ctypes.c_void_p if pointers == 1 else None
    handles = {"kl_model": raw.model_p, "kl_solver": raw.solver_p, "kl_study": raw.study_p}
    if base in handles:
        handle = handles[base]
        return handle if pointers == 1 else ctypes.POINTER(handle)
    target = STRUCTS[base] if base in STRUCTS else basics[base]
    for _ in range(pointers):
        target = ctypes.POINTER(target)
    return target


def split_params(params):
    params = params.strip()
    if params in ("", "void"):
        return []
    return [p.strip() for p in params.split(",")]


def declared_functions():
    found = {}
    for m in re.finditer(r"^KL_API\s+([^;{]*?)\b(kl_\w+)\s*\(([^)]*)\)\s*;", TEXT,
                         re.M):
        result, name, params = m.groups()
        found[name] = (result.strip(), split_params(params))
    return found


def test_every_function_is_bound_with_the_header_types():
    declared = declared_functions()
    assert len(declared) > 90
    assert set(raw.PROTOTYPES) == set(declared)
    for name, (result, params) in declared.items():
        restype, argtypes = raw.PROTOTYPES[name]
        assert restype == ctype_of(result), name
        assert len(argtypes) == len(params), name
        for k, (given, param) in enumerate(zip(argtypes, params)):
            assert given == ctype_of(param), "%s parameter %d: %s" % (name, k, param)


def test_the_loaded_library_exports_every_function():
    assert raw.missing == []


def test_callback_types_match():
    for name in ("kl_alloc_fn", "kl_sweep_fn"):
        m = re.search(r"typedef\s+(.*?)\(\s*\*\s*%s\s*\)\s*\(([^)]*)\)\s*;" % name, TEXT)
        result, params = m.groups()
        ftype = getattr(raw, name)
        assert ftype._restype_ == ctype_of(result), name
        assert list(ftype._argtypes_) == [ctype_of(p) for p in split_params(params)], name


def struct_fields(name):
    m = re.search(r"typedef\s+struct\s+%s\s*\{(.*?)\}\s*%s\s*;" % (name, name), TEXT, re.S)
    fields = []
    for statement in m.group(1).split(";"):
        statement = " ".join(statement.split())
        if not statement:
            continue
        first = re.match(r"((?:unsigned\s+)?\w+)\s+(.*)", statement)
        ctype, names = first.groups()
        for item in names.split(","):
            item = item.strip()
            array = re.match(r"(\w+)\s*\[(\d+)\]", item)
            if array:
                fields.append((array.group(1), ctype_of(ctype) * int(array.group(2))
                               if ctype != "char" else ctypes.c_char * int(array.group(2))))
            else:
                fields.append((item, ctype_of(ctype)))
    return fields


@pytest.mark.parametrize("name", sorted(STRUCTS))
def test_structs_match_field_for_field(name):
    expected = struct_fields(name)
    given = [(f[0], f[1]) for f in STRUCTS[name]._fields_]
    assert [f for f, _ in given] == [f for f, _ in expected]
    for (field, gtype), (_, etype) in zip(given, expected):
        if isinstance(etype, type) and issubclass(etype, ctypes.Array):
            assert gtype._type_ == etype._type_ and gtype._length_ == etype._length_, field
        else:
            assert gtype == etype, field


def test_every_struct_of_the_header_is_mirrored():
    declared = set(re.findall(r"typedef\s+struct\s+(\w+)\s*\{", TEXT))
    assert declared == set(STRUCTS)


@pytest.mark.parametrize("name", sorted(ENUMS))
def test_enums_match(name):
    python_enum, prefix = ENUMS[name]
    body = re.search(r"enum\s+%s\s*\{(.*?)\}\s*;" % name, TEXT, re.S).group(1)
    values = {k[len(prefix):]: int(v) for k, v in re.findall(r"(KL_\w+)\s*=\s*(-?\d+)", body)}
    assert values == {member.name: member.value for member in python_enum}


def test_every_enum_of_the_header_is_mirrored():
    assert set(re.findall(r"\benum\s+(\w+)\s*\{", TEXT)) == set(ENUMS)


def test_version_written_for_matches_the_header():
    major = int(re.search(r"#define KINLOOP_VERSION_MAJOR (\d+)", TEXT).group(1))
    minor = int(re.search(r"#define KINLOOP_VERSION_MINOR (\d+)", TEXT).group(1))
    assert (major, minor) == raw.WRITTEN_FOR
    assert kl.version() == kl.library_version
    assert kl.version_number() // 100 == major * 100 + minor
    assert re.search(r"#define KL_GROUND (\d+)", TEXT).group(1) == str(kl.GROUND)
