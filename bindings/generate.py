#!/usr/bin/env python3
"""Generates the mechanical part of kinloop's Python and Octave bindings
from include/kinloop.h, at build time (standard library only).

    generate.py python HEADER OUT_DIR   writes OUT_DIR/_header.py, _api.py
    generate.py octave HEADER OUT_DIR   writes OUT_DIR/kinloop_gateway.inc and
                                        OUT_DIR/+kinloop/*Methods.m and the
                                        package functions of plain calls
    generate.py layout HEADER OUT.c     writes the layout probe (a C program)
    generate.py list HEADER             prints how each function is bound

The header is the one source: its KL_API prototypes, enums, structs, handle
and callback typedefs, version macros and doc comments, with one table here
(POINTERS) for the pointer parameters whose meaning its C types cannot
carry. A function is "plain", and gets a generated method, when its
parameters are a handle (first only), scalars (int, long, size_t, double),
strings (const char *), fixed arrays it fills (double xy[2]), sized structs
(first field size_t size) read or filled whole, and pointers POINTERS
explains; its result a scalar, a string or void. A "maker" returns a new model,
study or cam instead: the Octave gateway adopts it as an id, Python's generated
class part as its constructor or a class method. Everything else (callbacks, new solvers, arrays of handles, tables sized
from other arguments) is left to the hand-written part of each binding.
DEVELOPERS.md says more.
"""

import keyword
import os
import re
import sys
import textwrap

SCALARS = ("int", "long", "size_t", "double")
HANDLES = ("model", "solver", "study", "cam")


# ---------------------------------------------------------------------------
# Reading the header
# ---------------------------------------------------------------------------

def clean_doc(raw):
    """The text of a doc comment without its markers and leading stars."""
    lines = []
    for line in raw.splitlines():
        line = line.strip()
        line = re.sub(r"^\*+\s?", "", line) if not line.startswith("*/") else ""
        lines.append(line)
    text = "\n".join(lines).strip()
    return re.sub(r"\n{3,}", "\n\n", text)


class Header:
    """What bindings need to know of include/kinloop.h."""

    def __init__(self, text):
        self.text = text
        self.version = tuple(int(re.search(r"#define KINLOOP_VERSION_%s (\d+)" % p,
                                           text).group(1))
                             for p in ("MAJOR", "MINOR", "PATCH"))
        self.ground = int(re.search(r"#define KL_GROUND (\d+)", text).group(1))
        self.max_steps = int(re.search(r"#define KL_MAX_STEPS (\d+)", text).group(1))
        self.handles = re.findall(r"typedef struct (kl_\w+) \1;", text)
        self.handle_docs = {m.group(1): self.doc_before(m.start())
                            for m in re.finditer(r"^typedef struct (kl_\w+) \1;", text, re.M)}
        self.enums = self._enums()
        self.structs = self._structs()
        self.callbacks = self._callbacks()
        self.functions = self._functions()

    def doc_before(self, start):
        """The /** */ comment that ends right before `start`, or ""."""
        head = self.text[:start].rstrip()
        if not head.endswith("*/"):
            return ""
        open_at = head.rfind("/**")
        if open_at < 0 or "*/" in head[open_at:-2]:
            return ""
        return clean_doc(head[open_at + 3:-2])

    def _enums(self):
        enums = []
        for m in re.finditer(r"^enum (kl_\w+)\s*\{(.*?)\};", self.text, re.S | re.M):
            name, body = m.groups()
            values, nxt = [], 0
            for item in re.finditer(r"(KL_\w+)(?:\s*=\s*(-?\d+))?\s*,?[ \t]*"
                                    r"(?:/\*\*<(.*?)\*/)?", body, re.S):
                const, value, doc = item.groups()
                nxt = int(value) if value is not None else nxt
                values.append((const, nxt, clean_doc(doc or "")))
                nxt += 1
            prefix = os.path.commonprefix([v[0] for v in values])
            prefix = prefix[:prefix.rfind("_") + 1] if len(values) > 1 else "KL_"
            enums.append(Enum(name, self.doc_before(m.start()), prefix, values))
        return enums

    def _structs(self):
        structs = []
        for m in re.finditer(r"^typedef struct (kl_\w+)\s*\{(.*?)\}\s*\1;", self.text,
                             re.S | re.M):
            name, body = m.groups()
            fields = []
            for f in re.finditer(r"([\w ]+?)\s+(\w+)(?:\[(\d+)\])?;[ \t]*"
                                 r"(?:/\*\*<(.*?)\*/)?", body, re.S):
                ctype, fname, length, doc = f.groups()
                fields.append(Field(" ".join(ctype.split()), fname,
                                    int(length) if length else None,
                                    clean_doc(doc or "")))
            structs.append(Struct(name, self.doc_before(m.start()), fields))
        return structs

    def _callbacks(self):
        return {m.group(2): (m.group(1).strip(), split_params(m.group(3)))
                for m in re.finditer(r"typedef\s+([^;()]*?)\(\s*\*\s*(kl_\w+)\s*\)"
                                     r"\s*\(([^)]*)\)\s*;", self.text)}

    def _functions(self):
        functions = []
        for m in re.finditer(r"^KL_API\s+([^;(#]*?)\b(kl_\w+)\s*\(([^)]*)\)\s*;"
                             r"(?:[ \t]*/\*\*<(.*?)\*/)?", self.text, re.S | re.M):
            result, name, params, trailing = m.groups()
            doc = clean_doc(trailing) if trailing else self.doc_before(m.start())
            functions.append(Function(name, " ".join(result.split()),
                                      [Param.parse(p) for p in split_params(params)],
                                      doc))
        return functions

    def struct(self, name):
        return next((s for s in self.structs if s.name == name), None)

    def enum(self, name):
        return next((e for e in self.enums if e.name == name), None)

    def function(self, name):
        return next((f for f in self.functions if f.name == name), None)


def split_params(params):
    params = " ".join(params.split())
    return [] if params in ("", "void") else [p.strip() for p in params.split(",")]


class Enum:
    def __init__(self, name, doc, prefix, values):
        self.name, self.doc, self.prefix, self.values = name, doc, prefix, values
        self.short = name[3:]  # without kl_
        self.python = camel(self.short)

    def member(self, const):
        return const[len(self.prefix):]

    def octave_name(self, const):
        """Statuses keep the header's spelling (they are error ids); other
        values are lower case, as Octave code writes them."""
        member = self.member(const)
        return member if self.name == "kl_status" else member.lower()


class Field:
    def __init__(self, ctype, name, length, doc):
        self.ctype, self.name, self.length, self.doc = ctype, name, length, doc


class Struct:
    def __init__(self, name, doc, fields):
        self.name, self.doc, self.fields = name, doc, fields
        self.sized = bool(fields) and fields[0].name == "size" and fields[0].ctype == "size_t"
        self.reports_error = any(f.name == "message" for f in fields)

    def value_fields(self):
        return self.fields[1:] if self.sized else self.fields


def camel(name):
    return "".join(part.capitalize() for part in name.split("_"))


class Param:
    """One C parameter: base type, constness of what it points to, pointer
    depth, fixed array length, and name."""

    def __init__(self, decl, base, const, pointers, length, name):
        self.decl, self.base, self.const = decl, base, const
        self.pointers, self.length, self.name = pointers, length, name

    @classmethod
    def parse(cls, decl):
        d = decl.replace("*", " * ")
        length = re.search(r"\[(\d+)\]\s*$", d)
        d = re.sub(r"\[\d+\]\s*$", "", d)
        tokens = d.split()
        const = tokens[0] == "const"
        words = [t for t in tokens if t not in ("const", "*")]
        base = words[0]
        name = words[1] if len(words) > 1 else ""
        return cls(decl, base, const, tokens.count("*"),
                   int(length.group(1)) if length else None, name)


class Function:
    def __init__(self, name, result, params, doc):
        self.name, self.result, self.params, self.doc = name, result, params, doc


# ---------------------------------------------------------------------------
# Pointers the C type cannot explain
# ---------------------------------------------------------------------------

# What the pointer parameters of these functions are, where the C type
# alone cannot say (a double * may be one value or an array): "out", one
# value or one struct the function fills; "one", one struct it reads; the
# name of the int parameter that counts an array; "inputs", one value per
# input of the model; "N out", an array of N elements the function fills
# (N is the caller's to give, unless it also counts an array given); "CAP
# fills", an array the function fills up to CAP elements while it returns
# how many there are (the bindings size it by a first call with NULL and 0,
# and give the caller the items); "per X out", an array the function fills
# with kl_model_X(model) elements (per joint_count: one per joint); "CAP
# grows FIELD", an array the function fills up to CAP elements, returning
# KL_ETRUNCATED when they do not fit and the count in FIELD of the struct
# it fills (the bindings call again with four times CAP, from the caller's
# CAP, default GROW_FROM, up to GROW_UP_TO); "text CAP LENGTH", a string
# the function writes into a buffer of CAP bytes (a size_t) with its length
# into *LENGTH (a size_t), sized by a first call with NULL and 0; "error",
# a struct the function fills with why it failed (kl_io_error: status,
# line, column, message), which the bindings raise. The header documents
# the same in words. "N rows X": a table the function reads, N rows
# (an int or long) of kl_<handle>_X(handle) numbers each, row by row ("N
# rows X out": such a table the function fills, N the caller's);
# "bytes LENGTH": a text the function reads, LENGTH (a size_t) bytes long.
# Handles, fixed arrays (double xy[2]) and sized structs need no entry; a
# function with any other pointer is bound by hand. generate.py stops if an entry names a
# function or parameter the header does not declare.
POINTERS = {
    "kl_add_loop": {"joints": "njoints"},
    "kl_model_loop": {"joints": "cap fills"},
    "kl_model_transmissions": {"sites": "cap fills"},
    "kl_model_pressure_sites": {"sites": "cap fills"},
    "kl_model_transmission_skips": {"skips": "cap fills"},
    "kl_output_ranges": {"outputs": "n", "ranges": "n out"},
    "kl_model_units": {"length_unit": "out", "angle_unit": "out"},
    "kl_model_transmission_lines": {"line_a": "out", "line_b": "out"},
    "kl_solve_position": {"inputs": "inputs"},
    "kl_solve_velocity": {"input_rates": "inputs"},
    "kl_solve_acceleration": {"input_accels": "inputs"},
    "kl_solve_jerk": {"input_jerks": "inputs"},
    "kl_model_set_profile_table": {"times": "n", "values": "n"},
    "kl_model_table_point": {"time": "out", "value": "out"},
    "kl_solver_time_efforts": {"loads": "nloads", "peaks": "inputs", "peak_times": "inputs",
                        "rms": "inputs"},
    "kl_output_value": {"o": "one", "value": "out"},
    "kl_output_deriv": {"o": "one", "deriv": "out"},
    "kl_output_range": {"o": "one"},
    "kl_range_time_ratio": {"ratio": "out"},
    "kl_range_quick_return": {"ratio": "out", "slower": "out", "slower_angle": "out"},
    "kl_output_mechanical_advantage": {"o": "one", "ma": "out"},
    "kl_input_effort": {"loads": "nloads", "efforts": "inputs"},
    "kl_output_sensitivity": {"o": "one", "dim": "one", "deriv": "out"},
    "kl_model_start_inputs": {"inputs": "inputs"},
    "kl_model_row_offset": {"count": "out"},
    "kl_solver_passages": {"count": "out", "last_input": "out"},
    "kl_solver_reach": {"inputs": "inputs"},
    "kl_input_effort_range": {"loads": "nloads"},
    "kl_model_link_mass": {"mass": "out", "inertia": "out"},
    "kl_solve_forces": {"loads": "nloads", "efforts": "inputs"},
    "kl_output_tolerance_stack": {"o": "one", "dims": "n", "tolerances": "n",
                                  "worst": "out", "rss": "out"},
    "kl_add_load": {"load": "one"},
    "kl_model_load": {"load": "out"},
    "kl_model_speed": {"input": "out", "speed": "out", "speed_fluctuation": "out"},
    # "N pairs": 2 numbers (x, y) per element that N counts
    "kl_add_curve_slot": {"xy": "npoints pairs"},
    "kl_cam_set_program": {"segments": "nsegments"},
    "kl_cam_outline": {"pitch_xy": "n pairs out", "surface_xy": "n pairs out"},
    "kl_solver_follow_path": {"path_x": "npoints", "path_y": "npoints"},
    "kl_solver_row": {"row": "per row_size out"},
    "kl_model_write": {"buf": "text cap needed"},
    "kl_study_summarize": {"values": "n rows output_count", "sample_status": "n"},
    "kl_study_run": {"values": "count rows output_count out", "sample_status": "count out",
                     "dims": "count rows dimension_count out"},
    "kl_model_write_file": {"err": "error"},
    "kl_model_read": {"text": "bytes length", "err": "error"},
    "kl_model_read_file": {"err": "error"},
    "kl_study_read": {"text": "bytes length", "err": "error"},
    "kl_study_read_file": {"err": "error"},
    "kl_solver_workspace": {"xy": "cap pairs grows vertices", "curves": "cap grows vertices",
                            "kinds": "cap grows vertices"},
    "kl_cycle_summarize": {"c": "one", "loads": "nloads", "input_peaks": "per input_count out",
                           "joint_peaks": "per joint_count out"},
}

# Named tuples of several results named otherwise than after their method
# (Study.run's would be a bare Run).
RESULT_NAMES = {"kl_study_run": "StudyRun"}

# Where a growing array starts (elements), and where it stops growing.
GROW_FROM, GROW_UP_TO = 4096, 1 << 22

# Getters of a const handle that stay methods in Python (not properties):
# each call makes a new array (or text) of the current state.
METHODS = {"kl_solver_row", "kl_model_write"}


# Int fields whose values the header names in words, not with an enum: the
# names the bindings take (and Octave gives) for them, by value 0, 1, ...
FIELD_NAMES = {("kl_dimension", "axis"): ("x", "y")}


def role_count(role):
    """The parameter a POINTERS role names as its count, or None."""
    return None if role in ("out", "one", "inputs", "error") or \
        role.split()[0] in ("per", "text", "bytes") else role.split()[0]


def check_pointers(header):
    for (struct, field), _ in FIELD_NAMES.items():
        s = header.struct(struct)
        if s is None or not any(fl.name == field and fl.ctype == "int"
                                for fl in s.value_fields()):
            sys.exit("generate.py: FIELD_NAMES names %s.%s, which include/kinloop.h does not "
                     "declare as an int field" % (struct, field))
    for name, roles in POINTERS.items():
        f = header.function(name)
        if f is None:
            sys.exit("generate.py: POINTERS names %s, which include/kinloop.h does not "
                     "declare" % name)
        params = {p.name: p for p in f.params}
        for param, role in roles.items():
            if param not in params or not params[param].pointers:
                sys.exit("generate.py: POINTERS names %s's pointer parameter %r, which "
                         "include/kinloop.h does not declare" % (name, param))
            count = role_count(role)
            if count is not None and \
                    (count not in params or params[count].base not in ("int", "long") or
                     params[count].pointers):
                sys.exit("generate.py: POINTERS counts %s's %r by %r, which is not an int or long "
                         "parameter of it" % (name, param, role))


# ---------------------------------------------------------------------------
# Classifying: what each parameter is to a binding, and which functions are
# plain
# ---------------------------------------------------------------------------

class Arg:
    """A parameter as the bindings see it. kind is one of
      handle       the model, solver or study (first parameter)
      handle_in    another handle the function reads (a solver to copy from)
      scalar       int, long, size_t, double (an enum where an int is named
                   after one: length_unit)
      point        two doubles named <p>x, <p>y, given as one pair
      point_array  const double p[2], given as one pair
      string       const char *
      length       the length of a string read ("bytes" in POINTERS), given
                   by the bindings
      count        an int that counts an array: the array's length
      array_in     const T * of `count` elements (ints, doubles or structs)
      inputs_in    const double *, one per input of the model
      struct_in    one struct read (a sized one, or "one" in POINTERS)
      out_value    one int or double the function fills
      out_array    a fixed array the function fills (double xy[2])
      struct_out   one struct filled (a sized one, or "out" in POINTERS)
      array_in     (also) a table: count rows of kl_<handle>_<rows> numbers
      array_out    count elements (x, y pairs if per is 2) the function fills;
                   with per_model, kl_model_<per_model>(model) of them
      filled       up to count elements the function fills, returning how
                   many there are
      grown        up to count elements, grown until they fit; the struct
                   filled says how many in its `field`
      text_out     a text written into a buffer (text_part: its size and
                   the length written, which the bindings give)
      error_out    a struct the function reports a failure in, raised"""

    def __init__(self, kind, name, params, ctype=None, length=None, enum=None,
                 struct=None, const=False, optional=False, count=None, per=1):
        self.kind, self.name, self.params = kind, name, params
        self.per = per  # numbers per counted element (2 for x, y pairs)
        self.ctype, self.length, self.enum, self.struct = ctype, length, enum, struct
        self.const, self.optional, self.count = const, optional, count
        self.per_model = None  # array_out: its count is kl_model_<per_model>(model)
        self.rows = None  # a table: count rows of kl_<handle>_<rows>(handle) numbers

    @property
    def is_input(self):
        return self.kind in ("scalar", "point", "point_array", "string", "array_in",
                             "inputs_in", "struct_in", "handle_in")

    @property
    def is_output(self):
        return self.kind in ("out_value", "out_array", "struct_out",
                             "filled", "array_out", "grown", "text_out")


class Binding:
    """How one function is bound: plain (generated) or not, and if plain,
    its handle (or value struct), its arguments, and what its result means."""

    def __init__(self, header, f):
        self.f = f
        self.name = f.name
        self.plain, self.why = True, ""
        self.args = []
        self.handle = None       # model, solver or study
        self.handle_const = False
        self.owner = None        # the value struct a kl_<struct>_<verb> belongs to
        # a maker: returns a new model, study or cam (NULL when it failed);
        # the Octave gateway adopts it as an id, Python's <H>Methods as its
        # constructor or a class method (py_maker)
        made = re.fullmatch(r"kl_(\w+) \*", f.result)
        self.makes = made.group(1) if made and made.group(1) in HANDLES and \
            made.group(1) != "solver" else None
        self._classify(header)
        if self.plain:
            self._result(header)
        if self.makes and self.plain:
            self.plain, self.why = False, "makes a kl_%s (generated as a maker)" % self.makes
        elif not self.plain:
            self.makes = None

    def refuse(self, why):
        if self.plain:
            self.plain, self.why = False, why

    def _classify(self, header):
        f = self.f
        roles = POINTERS.get(f.name, {})
        if f.name.endswith("_free"):
            self.refuse("frees a handle")
        if f.result not in ("void", "int", "long", "size_t", "double", "const char *") \
                and not self.makes:
            self.refuse("returns %s" % f.result)
        params = list(f.params)
        # the size and length of a text buffer, which the bindings give
        text = {n: role for role in roles.values() if role.startswith("text ")
                for n in role.split()[1:]}
        # the length of a text read, which the bindings give: its string's
        lengths = {role.split()[1]: param for param, role in roles.items()
                   if role.startswith("bytes ")}
        if any(p.base == "size_t" and not p.pointers and p.name not in text and
               p.name not in lengths for p in params) \
                and any(p.pointers and p.base[3:] not in HANDLES for p in params):
            self.refuse("a size_t sizes the memory of a pointer argument")
        counts = {role_count(role) for role in roles.values()} - {None}
        # a count that only sizes arrays the function fills is the caller's
        # to give; the bindings take the others from the arrays (or a probe)
        given = {n for n in counts if all(role.endswith(" out") or " grows " in role
                                          for role in roles.values()
                                          if role_count(role) == n)}
        self.grows = None  # the capacity parameter of arrays that grow
        self.text = self.error = None  # a text written, a failure's report
        counts -= given
        k = 0
        while k < len(params):
            p = params[k]
            nxt = params[k + 1] if k + 1 < len(params) else None
            struct = header.struct(p.base)
            role = roles.get(p.name)
            if p.name in lengths and p.base == "size_t" and not p.pointers:
                self.args.append(Arg("length", p.name, [p], count=lengths[p.name]))
            elif p.name in text and p.base == "size_t" and \
                    p.pointers == (p.name == text[p.name].split()[2]):
                self.args.append(Arg("text_part", p.name, [p]))
            elif role is not None and role.startswith("text ") and p.base == "char" and \
                    not p.const and p.pointers == 1:
                self.text = Arg("text_out", p.name, [p], count=role.split()[1])
                self.text.field = role.split()[2]
                self.args.append(self.text)
            elif role == "error" and struct is not None and struct.reports_error and \
                    p.pointers == 1 and not p.const:
                self.error = Arg("error_out", p.name, [p], struct=struct)
                self.args.append(self.error)
            elif p.base[3:] in HANDLES and p.base.startswith("kl_") and p.pointers == 1 \
                    and k == 0:
                self.handle, self.handle_const = p.base[3:], p.const
                self.args.append(Arg("handle", p.name, [p], const=p.const))
            elif p.base[3:] in HANDLES and p.base.startswith("kl_") and p.pointers == 1 \
                    and p.const:
                self.args.append(Arg("handle_in", p.name, [p], ctype=p.base[3:]))
            elif p.name in counts and p.base in ("int", "long") and not p.pointers:
                self.args.append(Arg("count", p.name, [p], ctype=p.base))
            elif p.base == "double" and not p.pointers and p.length is None and \
                    p.name.endswith("x") and nxt is not None and nxt.base == "double" and \
                    not nxt.pointers and nxt.length is None and \
                    nxt.name == p.name[:-1] + "y":
                stem = p.name[:-1]
                self.args.append(Arg("point", stem + "_xy" if stem else "xy", [p, nxt]))
                k += 1
            elif p.base in SCALARS and not p.pointers and p.length is None:
                self.args.append(Arg("scalar", p.name, [p], ctype=p.base,
                                     enum=header.enum("kl_" + p.name)
                                     if p.base == "int" else None))
            elif p.base == "char" and p.const and p.pointers == 1:
                self.args.append(Arg("string", p.name, [p]))
            elif p.base == "double" and p.const and p.length == 2 and not p.pointers:
                self.args.append(Arg("point_array", p.name, [p]))
            elif p.base in ("int", "double") and not p.const and p.length and \
                    not p.pointers:
                self.args.append(Arg("out_array", p.name, [p], ctype=p.base,
                                     length=p.length))
            elif role == "out" and p.base in ("int", "double") and not p.const and \
                    p.pointers == 1:
                self.args.append(Arg("out_value", p.name, [p], ctype=p.base,
                                     enum=header.enum("kl_" + p.name)
                                     if p.base == "int" else None))
            elif role == "inputs" and p.base == "double" and p.pointers == 1 and p.const:
                self.args.append(Arg("inputs_in", p.name, [p]))
            elif role is not None and (role == "inputs" or role.startswith("per ")) and \
                    not p.const and p.pointers == 1 and \
                    (p.base in ("int", "double") or struct is not None):
                # an array as long as the model says: kl_model_<per>(model)
                a = Arg("array_out", p.name, [p], ctype=p.base, struct=struct,
                        count=p.name + "_n")
                a.per_model = "input_count" if role == "inputs" else role.split()[1]
                self.args.append(a)
            elif role is not None and role.split()[-1] in ("fills", "out") and \
                    role_count(role) is not None and not p.const and p.pointers == 1 and \
                    (p.base in ("int", "double") or struct is not None):
                self.args.append(Arg("filled" if role.endswith(" fills") else "array_out",
                                     p.name, [p], ctype=p.base, struct=struct,
                                     count=role_count(role),
                                     per=2 if " pairs" in role else 1))
                self.args[-1].rows = role.split()[2] if " rows " in role else None
            elif role is not None and " grows " in role and not p.const and \
                    p.pointers == 1 and p.base in ("int", "double"):
                a = Arg("grown", p.name, [p], ctype=p.base, count=role_count(role),
                        per=2 if " pairs " in role else 1,
                        # an int array holds the enum its doc names and it is named after
                        enum=next((e for e in header.enums if p.base == "int" and
                                   e.short.endswith("_" + p.name.rstrip("s")) and
                                   re.search(r"\b%s\b" % e.name, f.doc)), None))
                a.field = role.split()[-1]
                self.grows = role_count(role)
                self.args.append(a)
            elif role is not None and role.split()[0] in counts and p.const and \
                    p.pointers == 1 and (p.base in ("int", "double") or struct is not None):
                self.args.append(Arg("array_in", p.name, [p], ctype=p.base, struct=struct,
                                     count=role.split()[0],
                                     per=2 if role.endswith(" pairs") else 1))
                # a table: its rows counted, kl_<handle>_<X>(handle) numbers each
                self.args[-1].rows = role.split()[2] if " rows " in role else None
            elif struct is not None and p.pointers == 1 and not struct.reports_error and \
                    (struct.sized or (role == "one" and p.const) or
                     (role == "out" and not p.const)):
                if k == 0 and p.const:
                    self.owner = struct
                self.args.append(Arg("struct_in" if p.const else "struct_out", p.name,
                                     [p], struct=struct))
            else:
                self.refuse("parameter %r is not a scalar, string, fixed array or sized "
                            "struct, and POINTERS does not say what it is" % p.decl)
                self.args.append(Arg("other", p.name, [p]))
            k += 1
        # the capacity of growing arrays is a first guess the caller may leave out
        for a in self.args:
            if a.kind == "scalar" and a.name == self.grows:
                a.optional = True
        # a builder's trailing name may be left out (NULL: an unnamed item)
        if f.name.startswith("kl_add_") and self.args and \
                self.args[-1].kind == "string" and self.args[-1].name == "name":
            self.args[-1].optional = True
        if self.handle is None and any(a.kind.startswith("inputs_") for a in self.args):
            self.refuse("an inputs array needs a model or solver to count the inputs")

    def _result(self, header):
        f = self.f
        # a function that fills a value or a struct returns whether it did
        self.status = f.result == "int" and (returns_status(header, f) or any(
            a.kind in ("struct_out", "out_value", "array_out", "grown", "error_out",
                       "text_out")
            for a in self.args))
        # a function filling up to a capacity returns a count the bindings use
        self.fills = next((a for a in self.args if a.kind == "filled"), None)
        # a setter of one struct whose getter reads it back (set_options,
        # options): fields not given keep their current values
        setter = re.fullmatch(r"kl_%s_set_(\w+)" % self.handle, f.name) if self.handle else None
        getter = header.function("kl_%s_%s" % (self.handle, setter.group(1))) if setter else None
        ins = self.inputs
        self.current = setter.group(1) if getter and len(ins) == 1 and \
            ins[0].kind == "struct_in" and \
            [p.base for p in getter.params[1:]] == [ins[0].struct.name] else None
        # Python: one struct read whose fields the caller may give as
        # keywords (set_options(tolerance=...), cycle_summarize(speed=...)),
        # as (argument, Python name, the value fields not given come from):
        # a setter's current value, or the struct's kl_<struct>_default
        defaulted = [a for a in ins if a.kind == "struct_in" and
                     header.function("kl_%s_default" % a.struct.name[3:]) is not None]
        self.keywords = (ins[0], self.current, "self." + self.current) if self.current else \
            (defaulted[0], defaulted[0].struct.name[3:],
             "%s()" % camel(defaulted[0].struct.name[3:])) if len(defaulted) == 1 else None
        # a struct it fills on a failure too ("With KL_E..., `range` still
        # receives ..."): that failure carries it (Python: the error's result)
        kept = re.search(r"\bWith (KL_E\w+)\b[^.]*?`(\w+)` still receives", f.doc)
        self.kept = next(((kept.group(1), a) for a in self.args if kept and
                          a.kind == "struct_out" and a.name == kept.group(2)), None)
        self.enum = None
        self.boolean = f.result == "int" and "_is_" in f.name
        if f.result == "int" and not self.status and not self.boolean and not self.fills:
            for e in header.enums:
                if e.name == "kl_status":
                    continue
                if re.search(r"\b%s\b" % e.name, f.doc) or \
                        any(re.search(r"\b%s\b" % v[0], f.doc) for v in e.values):
                    self.enum = e
                    break

    @property
    def outputs(self):
        return [a for a in self.args if a.is_output]

    @property
    def inputs(self):
        """What the caller gives: the arguments after the handle or the
        value struct the function belongs to."""
        ins = [a for a in self.args if a.is_input]
        return ins[1:] if self.owner is not None else ins

    @property
    def value_result(self):
        """Whether the C result is handed to the caller (a status is not)."""
        return self.f.result != "void" and not self.status and not self.fills

    @property
    def method(self):
        """The method's (or package function's) name: the C name without
        kl_ and without the prefix of its handle, the handle it makes or its
        value struct."""
        name = self.name[3:]
        prefix = self.handle or self.makes or (self.owner.name[3:] if self.owner else None)
        if prefix and name.startswith(prefix + "_"):
            name = name[len(prefix) + 1:]
        return name

    @property
    def command(self):
        """The Octave gateway command: the C name without kl_."""
        return self.name[3:]

    @property
    def is_property(self):
        """A getter of a const handle that takes nothing else (Python)."""
        return self.handle is not None and self.handle_const and not self.inputs and \
            (self.value_result or self.outputs) and self.name not in METHODS

    @property
    def vectorized(self):
        """Octave: a double getter over ids takes a vector of them."""
        ins = self.inputs
        return (self.f.result == "double" and self.handle_const and ins and
                ins[0].kind == "scalar" and ins[0].ctype == "int" and not self.outputs)


def is_path(name):
    """A string parameter named path or ..._dir is a file system path."""
    return name == "path" or name.endswith("_dir")


def returns_status(header, f, seen=()):
    """A function returns a status when its doc names KL_OK, or when it
    returns 'as' another function that does."""
    if "KL_OK" in f.doc:
        return True
    m = re.search(r"\b[Aa]s (kl_\w+)", f.doc)
    if m and m.group(1) not in seen:
        other = header.function(m.group(1))
        return other is not None and other.result == "int" and \
            returns_status(header, other, seen + (f.name,))
    return False


def enum_texts(header, bs):
    """(enum, binding) of each kl_..._str text function: the enum its one
    parameter is named after, or that its doc names."""
    found = []
    for b in bs:
        ins = b.inputs
        if not (b.plain and b.handle is None and b.name.endswith("_str") and
                b.f.result == "const char *" and len(ins) == 1 and ins[0].kind == "scalar"):
            continue
        e = ins[0].enum or next((e for e in header.enums
                                 if re.search(r"\b%s\b" % e.name, b.f.doc)), None)
        if e is not None:
            found.append((e, b))
    return found


def field_enum(header, fl):
    """The enum an int field holds: named after it (status, kernel), named
    in its doc (enum kl_output_kind), or whose values its doc names."""
    if fl.ctype != "int" or fl.length is not None:
        return None
    for e in header.enums:
        if fl.name == e.short or re.search(r"\benum %s\b" % e.name, fl.doc):
            return e
    for e in header.enums:
        if any(re.search(r"\b%s\b" % v[0], fl.doc) for v in e.values):
            return e
    return None


def is_flag(fl):
    """An int field that says yes or no (has_limits)."""
    return fl.ctype == "int" and re.match(r"(has|is)_", fl.name) is not None


def bindings(header):
    return [Binding(header, f) for f in header.functions]


# ---------------------------------------------------------------------------
# Python
# ---------------------------------------------------------------------------

GENERATED = "Generated by bindings/generate.py from include/kinloop.h: do not edit."


def py_name(name):
    """A C name as Python spells it: keywords take a trailing underscore."""
    return name + "_" if keyword.iskeyword(name) else name


def py_ctype(header, base, pointers, const, length=None):
    """The ctypes expression for a C type."""
    basics = {"int": "ctypes.c_int", "long": "ctypes.c_long", "double": "ctypes.c_double",
              "size_t": "ctypes.c_size_t"}
    if base in header.callbacks:
        return base
    if base == "char" and pointers == 1:
        return "ctypes.c_char_p" if const else "ctypes.c_void_p"
    if base == "void":
        return "ctypes.c_void_p" if pointers == 1 else "None"
    if base.startswith("kl_") and base[3:] in HANDLES:
        target, pointers = base[3:] + "_p", pointers - 1
    elif header.struct(base):
        target = base
    else:
        target = basics[base]
    if length is not None:
        pointers += 1
    for _ in range(pointers):
        target = "ctypes.POINTER(%s)" % target
    return target


def py_result_ctype(header, result):
    r = result.replace("*", " * ")
    const = r.split()[0] == "const"
    words = [w for w in r.split() if w not in ("const", "*")]
    return py_ctype(header, words[0], r.count("*"), const)


def py_docstring(text, indent):
    text = text.replace("\\", "\\\\").replace('"""', '\\"\\"\\"')
    lines = text.splitlines() or [""]
    pad = " " * indent
    body = ("\n".join(pad + l if l else "" for l in lines[1:]))
    if len(lines) == 1:
        return '%s"""%s"""' % (pad, lines[0])
    return '%s"""%s\n%s\n%s"""' % (pad, lines[0], body, pad)


def python_header(header):
    out = ['"""The declarations of include/kinloop.h for ctypes: version, enums,',
           'opaque handles, callback types, structs, and every prototype.', "",
           GENERATED + '"""', "", "import ctypes", "import enum", "",
           "#: KINLOOP_VERSION_MAJOR, _MINOR, _PATCH of the header",
           "VERSION = %r" % (header.version,),
           "#: KL_GROUND: the link id of ground", "GROUND = %d" % header.ground,
           "#: KL_MAX_STEPS: the most steps one sweep takes", "MAX_STEPS = %d" % header.max_steps,
           ""]
    for e in header.enums:
        out += ["", "class %s(enum.IntEnum):" % e.python,
                py_docstring("enum %s: %s" % (e.name, e.doc), 4)]
        for const, value, doc in e.values:
            out.append("    %s = %d%s" % (e.member(const), value,
                                          "  # " + " ".join(doc.split()) if doc else ""))
        out.append("")
    for h in header.handles:
        out += ["", "class %s(ctypes.Structure):" % h,
                '    """Opaque: only pointers to it exist."""', "    _fields_ = []", "",
                "", "%s_p = ctypes.POINTER(%s)" % (h[3:], h), ""]
    for name, (result, params) in header.callbacks.items():
        types = [py_result_ctype(header, result)]
        for p in map(Param.parse, params):
            types.append(py_ctype(header, p.base, p.pointers, p.const, p.length))
        out += ["#: %s" % name, "%s = ctypes.CFUNCTYPE(%s)" % (name, ", ".join(types)), ""]
    out += ["", "class Sized(ctypes.Structure):",
            '    """A struct whose first field, size, is set to its sizeof when made."""',
            "", "    def __init__(self, *args, **fields):",
            "        super().__init__(*args, **fields)",
            "        self.size = ctypes.sizeof(self)", ""]
    for s in header.structs:
        out += ["", "class %s(%s):" % (s.name, "Sized" if s.sized else "ctypes.Structure"),
                py_docstring(s.doc, 4), "    _fields_ = ["]
        for fl in s.fields:
            if fl.length is not None:
                base = "ctypes.c_char" if fl.ctype == "char" else \
                    py_ctype(header, fl.ctype, 0, False)
                t = "%s * %d" % (base, fl.length)
            else:
                t = py_ctype(header, fl.ctype, 0, False)
            out.append("        (%r, %s),  # %s" % (fl.name, t, " ".join(fl.doc.split())[:60]))
        out += ["    ]", ""]
    out += ["", "#: what the kinloop package exports from here",
            "__all__ = %r" % (["GROUND", "MAX_STEPS"] + [e.python for e in header.enums],)]
    out += ["", "#: every KL_API function: name -> (restype, argtypes), in the header's order",
            "PROTOTYPES = {"]
    for f in header.functions:
        args = [py_ctype(header, p.base, p.pointers, p.const, p.length) for p in f.params]
        out.append("    %r: (%s, [%s])," % (f.name, py_result_ctype(header, f.result),
                                           ", ".join(args)))
    out += ["}", ""]
    return "\n".join(out)


PY_CONVERT = {"int": "to_int", "long": "to_long", "size_t": "to_size", "double": "to_double"}
PY_CTYPES = {"int": "ctypes.c_int", "double": "ctypes.c_double"}
PY_POINTERS = {"int": "INTS", "double": "DOUBLES"}


def py_checked_call(b):
    """A function applying the argument rule to every value the caller gives
    before it reaches C; pointers the bindings made pass unchanged."""
    f = b.f
    names = [py_name(p.name) for p in f.params]
    conversions = []
    for p, n in zip(f.params, names):
        if p.base in SCALARS and not p.pointers and p.length is None:
            conversions.append("%s(%s, F, %r)" % (PY_CONVERT[p.base], n, p.name))
        elif p.base == "char" and p.const and p.pointers == 1:
            rule = "to_path" if is_path(p.name) else "to_string"
            conversions.append("%s(%s, F, %r)" % (rule, n, p.name))
        elif p.const and p.pointers == 1 and p.base.startswith("kl_") and \
                p.base[3:] not in HANDLES:
            conversions.append("struct_in(%s, to_%s, F, %r)" % (n, p.base, p.name))
        else:
            conversions.append(n)
    if conversions == names:
        return ["%s = lib.%s" % (f.name, f.name), ""]
    return ["def %s(%s):" % (f.name, ", ".join(names)),
            "    F = %r" % f.name,
            "    return lib.%s(%s)" % (f.name, ", ".join(conversions)), "", ""]


def py_checked(b, expr):
    """A C call's status checked: with the handle's message, or, for a
    const handle (which keeps none), naming the call and its arguments; a
    call reporting its failure in a struct raises with what that says."""
    if b.error is not None:
        shown = "".join(", " + py_name(a.name) for a in b.inputs)
        return "check_report(%s, %s, %r%s)" % (expr, b.error.name, b.method, shown)
    if b.handle is None or b.handle_const:
        shown = "".join(", " + py_name(a.name) for a in b.inputs)
        return "check_const(%s, %r%s)" % (expr, b.method, shown)
    if b.kept is not None:
        status, a = b.kept
        return "self._check(%s, result=from_%s(%s) if %s == Status.%s else None)" % (
            expr, a.struct.name, py_name(a.name), expr, status[3:])
    return "self._check(%s)" % expr


def py_output_array(a, handle):
    """The array a function fills, `count` elements: numbers as a numpy
    array ((count, 2) for x, y pairs, (count, columns) for a table; an int
    array as numpy.intc), structs as a ctypes array."""
    n, count = py_name(a.name), py_name(a.count)
    if a.struct is None and a.kind in ("array_out", "grown"):
        width = 2 if a.per == 2 else "lib.kl_%s_%s(self._handle)" % (handle, a.rows) \
            if a.rows else None
        shape = "(max(%s, 0), %s)" % (count, width) if width else "max(%s, 0)" % count
        return ["%s = np.zeros(%s%s)" % (n, shape, ", dtype=np.intc" if a.ctype == "int"
                                          else "")]
    ctype = "H." + a.struct.name if a.struct else PY_CTYPES[a.ctype]
    lines = ["%s = (%s * max(%s, 1))()" % (n, ctype, count)]
    if a.struct is not None and a.struct.sized:
        lines += ["for item in %s:" % n, "    item.size = ctypes.sizeof(item)"]
    return lines


def py_method(b):
    """The generated method (or package function) of a plain function."""
    params, pre, call, results = [], [], [], []
    # Python's order: what must be given, what may be left out, the keywords
    optional, keywords = [], []
    late = []  # arrays the function fills, made once their count is known
    # a trailing array of structs may be left out: none (cycle_summarize(speed=...))
    last = [a for a in b.inputs if not (b.keywords and a is b.keywords[0])][-1:]
    omissible = last[0] if last and last[0].kind == "array_in" and last[0].struct else None
    counts = {}
    f = b.name
    for a in b.args:
        n = py_name(a.name)
        if a.kind == "text_out":
            pre.append("%s = ctypes.c_size_t()" % a.field)
            late.append("%s = ctypes.create_string_buffer(%s.value + 1)" % (n, a.field))
            call.append(n)
            results.append("text(%s.raw[:%s.value])" % (n, a.field))
            continue
        if a.kind == "text_part":
            call.append("len(%s)" % b.text.name if a.name == b.text.count else
                        "ctypes.byref(%s)" % n)
            continue
        if a.kind == "error_out":
            pre.append("%s = H.%s()" % (n, a.struct.name))
            call.append("ctypes.byref(%s)" % n)
            continue
        if a.kind == "grown":
            late += py_output_array(a, b.handle)
            call.append("%s.ctypes.data_as(%s)" % (n, PY_POINTERS[a.ctype]))
            got = "%s[:%s.%s]" % (n, next(x.name for x in b.args if x.kind == "struct_out"),
                                  a.field)
            results.append("np.array([as_enum(H.%s, k) for k in %s], dtype=object)" % (
                a.enum.python, got) if a.enum else got)
            continue
        if a.kind in ("filled", "array_out"):
            if a.per_model:
                pre.append("%s = lib.kl_model_%s(self._model_ptr)" % (a.count, a.per_model))
            late += py_output_array(a, b.handle)
            call.append(n if a.struct or a.kind == "filled" else
                        "%s.ctypes.data_as(%s)" % (n, PY_POINTERS[a.ctype]))
            results.append("[from_%s(v) for v in %s[:%s]]" % (a.struct.name, n, py_name(a.count))
                           if a.struct else "list(%s[:%s])" % (n, py_name(a.count))
                           if a.kind == "filled" else n)
            sized = next((x for x in b.args if x.name == a.count), None)
            given = "%s = to_array_size(%s, %r, %r%s)" % (
                py_name(a.count), py_name(a.count), f, a.count,
                ", ctype=%r" % sized.ctype if sized is not None and sized.ctype != "int" else "")
            if a.kind == "array_out" and given not in pre and \
                    a.count in [x.name for x in b.args if x.kind == "scalar"]:
                pre.append(given)  # before the arrays it sizes
        elif a.kind == "handle":
            call.append("self._handle" if a.const else "self._changing")
        elif a.kind == "struct_in" and b.owner is not None and not call:
            call.append("self")
        elif b.keywords and a is b.keywords[0]:
            # a struct given whole or by fields: keywords replace the fields
            # of the value given, or else of the current or default value
            _, name, start = b.keywords
            keywords += [name + "=None", "**fields"]
            pre.append("%s = with_fields(%s if %s is None else %s, %r, fields, %r, %r)" % (
                name, start, name, name, camel(a.struct.name[3:]), f, name))
            call.append(name)
        elif a.kind == "handle_in":
            params.append(n)
            call.append("to_handle(%s, %r, %r, %r)" % (n, a.ctype, f, a.name))
        elif a.kind == "point":
            params.append(n)
            xs = [py_name(p.name) for p in a.params]
            pre.append("%s = to_point(%s, %r, %r)" % (", ".join(xs), n, f, a.name))
            call += xs
        elif a.kind == "point_array":
            params.append(n)
            pre.append("%s = (ctypes.c_double * 2)(*to_point(%s, %r, %r))" % (n, n, f, a.name))
            call.append(n)
        elif a.kind == "count":
            call.append(n)
        elif a.kind == "array_in":
            (optional if a is omissible else params).append(n + "=()" if a is omissible else n)
            ctype = "H." + a.struct.name if a.struct else PY_CTYPES[a.ctype]
            rule = "to_" + a.struct.name if a.struct else PY_CONVERT[a.ctype]
            if a.per == 2:
                pre.append("%s = flat_pairs(%s, %r, %r)" % (n, n, f, a.name))
            if a.rows:
                pre.append("%s, %s_n = rows_of(%s, lib.kl_%s_%s(self._handle), %r, %r)" % (
                    n, n, n, b.handle, a.rows, f, a.name))
            else:
                pre.append("%s, %s_n = array_of(%s, %s, %s, %r, %r)" % (n, n, n, ctype, rule, f,
                                                                       a.name))
            if a.per == 2:
                pre.append("%s_n //= 2" % n)
            counts.setdefault(a.count, []).append(a.name)
            call.append(n)
        elif a.kind == "inputs_in":
            params.append(n + "=None")
            pre.append("%s = self._inputs(%s, %r, %r)" % (n, n, f, a.name))
            call.append(n)
        elif a.kind == "out_value":
            pre.append("%s = %s()" % (n, PY_CTYPES[a.ctype]))
            call.append("ctypes.byref(%s)" % n)
            results.append("as_enum(H.%s, %s.value)" % (a.enum.python, n) if a.enum
                           else "%s.value" % n)
        elif a.kind == "out_array":
            pre.append("%s = (%s * %d)()" % (n, PY_CTYPES[a.ctype], a.length))
            call.append(n)
            results.append("tuple(%s)" % n)
        elif a.kind == "struct_out":
            pre.append("%s = H.%s()" % (n, a.struct.name))
            call.append("ctypes.byref(%s)" % n)
            results.append("from_%s(%s)" % (a.struct.name, n))
        elif a.optional:
            optional.append(n + ("=%d" % GROW_FROM if a.name == b.grows else "=None"))
            call.append(n)
        else:
            params.append(n)
            call.append(n)
    for count, arrays in counts.items():
        pre.append("%s = same_count(%r, %r, %s)" % (
            py_name(count), f, count, ", ".join("(%r, %s_n)" % (a, py_name(a)) for a in arrays)))
        if next(a for a in b.args if a.name == count).ctype == "long":
            pre[-1] = pre[-1][:-1] + ", rule=to_long)"
    expr = "%s(%s)" % (f, ", ".join(call))
    if b.fills:
        # a first call with no room says how many there are
        room = {py_name(b.fills.name): "None", py_name(b.fills.count): "0"}
        pre.append("%s = %s" % (py_name(b.fills.count), py_checked(
            b, "%s(%s)" % (f, ", ".join(room.get(x, x) for x in call)))))
    if b.text:
        # a first call with no room says how long the text is
        room = {b.text.name: "None", "len(%s)" % b.text.name: "0"}
        pre.append(py_checked(b, "%s(%s)" % (f, ", ".join(room.get(x, x) for x in call))))
    if b.grows:
        # the C call cannot grow the caller's arrays: a larger call each time
        cap = py_name(b.grows)
        pre += ["%s = to_array_size(%s, %r, %r)" % (cap, cap, f, b.grows), "while True:"] + ["    " + l for l in late] + [
            "    status = %s" % expr,
            "    if status != Status.ETRUNCATED or %s >= %d:" % (cap, GROW_UP_TO),
            "        break", "    %s *= 4" % cap]
        expr = "status"
    else:
        pre += late
    if b.kept is not None and b.handle and not b.handle_const:
        pre.append("status = %s" % expr)  # read twice by the check
        expr = "status"
    if b.f.result in ("int", "long"):
        expr = py_checked(b, expr)
        if b.enum is not None:
            expr = "as_enum(H.%s, %s)" % (b.enum.python, expr)
        elif b.boolean:
            expr = "bool(%s)" % expr
    elif b.f.result == "const char *":
        expr = "text(%s)" % expr
    if b.value_result:
        results.insert(0, "result")
    body = pre[:]
    if not results:
        body.append(("return Status(%s)" if b.status else "%s") % expr)
    elif results == ["result"]:
        body.append("return " + expr)
    else:
        body.append(("result = %s" if b.value_result else "%s") % expr)
        body.append("return " + (results[0] if len(results) == 1 else
                                 "%s(%s)" % (py_results(b)[0], ", ".join(results))))
    params += optional + keywords
    method = b.handle is not None or b.owner is not None
    pad = " " * (4 if method else 0)
    lines = [pad + "@property"] if b.is_property else []
    lines.append(pad + "def %s(%s):" % (b.method, ", ".join((["self"] if method else []) +
                                                             params)))
    lines.append(py_docstring("%s\n\n(%s)" % (b.f.doc, b.name), len(pad) + 4))
    lines += [pad + "    " + l for l in body]
    lines.append("")
    return lines


def py_results(b):
    """The named tuple of a function giving several results: named after
    the method in CamelCase (Workspace), its fields after the C parameters
    filled (the C result first, as `result`); None for one result."""
    fields = (["result"] if b.value_result else []) + [py_name(a.name) for a in b.outputs]
    return (RESULT_NAMES.get(b.name, camel(b.method)), fields) if len(fields) > 1 else None


def py_result_tuples(bs):
    """The named tuples of the plain functions giving several results, once
    each; two functions whose tuples would share a name stop the generator."""
    out, made = [], {}
    for b in bs:
        tup = py_results(b) if b.plain else None
        if tup is None:
            continue
        if made.setdefault(tup[0], b.name) != b.name:
            sys.exit("generate.py: %s and %s would both give a %s" % (made[tup[0]], b.name,
                                                                       tup[0]))
        out += ["%s = collections.namedtuple(%r, %r)" % (tup[0], tup[0], tup[1]),
                "%s.__doc__ = %r" % (tup[0], "The results of %s, named after its "
                                     "parameters: %s." % (b.name, ", ".join(tup[1]))), ""]
    return out


def py_converter(header, s):
    """to_<struct>: a C struct from a value with its fields as attributes
    (a value type, or any object), each field under the argument rule of its
    C type, read from the header; a struct of the type itself passes as it
    is. The size of a sized struct is set on creation."""
    fields = s.value_fields()
    out = ["def to_%s(value, F, A):" % s.name,
           '    """A %s from `value`, each field under the argument rule."""' % s.name,
           "    if isinstance(value, H.%s):" % s.name, "        return value",
           "    c, v = H.%s(), fields_of(value, %r, %r, F, A)" % (
               s.name, tuple(py_name(fl.name) for fl in fields), s.name)]
    for k, fl in enumerate(fields):
        where = "A + %r" % ("." + py_name(fl.name))
        if fl.length is not None:
            value = "to_chars(v[%d], %d, F, %s)" % (k, fl.length, where)
        elif header.struct(fl.ctype) is not None:
            value = "to_%s(v[%d], F, %s)" % (fl.ctype, k, where)
        else:
            value = "%s(v[%d], F, %s)" % (PY_CONVERT[fl.ctype], k, where)
        out.append("    setattr(c, %r, %s)" % (fl.name, value) if keyword.iskeyword(fl.name)
                   else "    c.%s = %s" % (fl.name, value))
    return out + ["    return c", "", ""]


def py_default(header, s, fl, defaults):
    """A field's default: from the struct's kl_<struct>_default function
    when it has one, else zero as C's initializers give it."""
    e = field_enum(header, fl)
    if defaults:
        value = ("getattr(%s, %r)" % (defaults, fl.name) if keyword.iskeyword(fl.name)
                 else "%s.%s" % (defaults, fl.name))
        return "as_enum(H.%s, %s)" % (e.python, value) if e else value
    if e is not None:
        zero = next((v for v in e.values if v[1] == 0), None)
        return "H.%s.%s" % (e.python, e.member(zero[0])) if zero else "0"
    if fl.length is not None:
        return '""'
    return {"double": "0.0"}.get(fl.ctype, "False" if is_flag(fl) else "0")


def py_value_type(header, s, bs):
    """The frozen dataclass a struct reads as, with the methods of its
    kl_<struct>_<verb> functions, and from_<struct>, which reads the C struct
    as it (py_from_c)."""
    name = camel(s.name[3:])
    default_fn = header.function("kl_%s_default" % s.name[3:])
    defaults = None
    out = []
    if default_fn is not None and [p.base for p in default_fn.params] == [s.name]:
        defaults = "_%s_DEFAULTS" % s.name[3:].upper()
        out += ["%s = H.%s()" % (defaults, s.name),
                "lib.%s(ctypes.byref(%s))" % (default_fn.name, defaults), "", ""]
    out += ["@dataclasses.dataclass(frozen=True)", "class %s:" % name,
            py_docstring("%s\n\n(%s)" % (s.doc, s.name), 4)]
    for fl in s.value_fields():
        e = field_enum(header, fl)
        nested = header.struct(fl.ctype)
        if nested is not None:
            # a struct inside a struct reads as its own value type
            out.append("    %s: %r = None" % (py_name(fl.name), camel(nested.name[3:])))
            continue
        kind = ("H." + e.python) if e else "str" if fl.length is not None else \
            "bool" if is_flag(fl) else {"double": "float"}.get(fl.ctype, "int")
        out.append("    %s: %s = %s" % (py_name(fl.name), kind,
                                        py_default(header, s, fl, defaults)))
    named = [(fl, FIELD_NAMES[(s.name, fl.name)]) for fl in s.value_fields()
             if (s.name, fl.name) in FIELD_NAMES]
    if named:
        out += ["", "    def __post_init__(self):",
                "        # int fields whose values the header names in words"]
        for fl, names in named:
            out += ["        if self.%s in %r:" % (py_name(fl.name), names),
                    "            object.__setattr__(self, %r, %r.index(self.%s))" % (
                        py_name(fl.name), names, py_name(fl.name))]
    out.append("")
    out += py_kind_constructors(header, s, bs)
    for b in bs:
        if b.plain and b.owner is s:
            out += py_method(b)
    return out + [""] + py_from_c(header, s)


def py_from_c(header, s):
    """from_<struct>: a C struct as its value type, field by field: a struct
    inside as its own value type, an enum field as its IntEnum (an int where
    the value is none of it), a flag as a bool."""
    given = []
    for fl in s.value_fields():
        e, n = field_enum(header, fl), py_name(fl.name)
        value = ("getattr(c, %r)" % fl.name) if keyword.iskeyword(fl.name) else "c." + fl.name
        if header.struct(fl.ctype) is not None:
            value = "from_%s(%s)" % (fl.ctype, value)
        elif e is not None:
            value = "as_enum(H.%s, %s)" % (e.python, value)
        elif is_flag(fl):
            value = "bool(%s)" % value
        given.append("%s=%s" % (n, value))
    name = camel(s.name[3:])
    return ["def from_%s(c):" % s.name,
            '    """A %s as its value type, %s."""' % (s.name, name),
            "    return %s(%s)" % (name, ", ".join(given)), "", ""]


def py_kind_constructors(header, s, bs):
    """A struct the functions read whose first field is its kind (enum
    kl_<x>_kind): a constructor per kind, named after it in lower case,
    taking the fields the kind uses in order: every field after kind but
    those whose doc names another kind (fx "(KL_LOAD_FORCE)"), the first
    required, two doubles <p>x, <p>y one pair <p>_xy. Where a kind's name is
    a field's (torque), every kind's constructor is named after it and the
    word its doc puts before its item (force "applied at point `id`":
    force_at)."""
    fields = s.value_fields()
    e = field_enum(header, fields[0]) if fields and fields[0].name == "kind" else None
    read = any(a.struct is s and a.kind in ("struct_in", "array_in")
               for b in bs if b.plain for a in b.args)
    if e is None or not read:
        return []
    by_word = any(e.member(c).lower() in [fl.name for fl in fields] for c, _, _ in e.values)
    out = []
    for const, _, doc in e.values:
        others = [c for c, _, _ in e.values if c != const]
        own = [fl for fl in fields[1:]
               if not any(re.search(r"\b%s\b" % c, fl.doc) for c in others)]
        name = e.member(const).lower()
        if by_word:
            word = re.search(r"\b(\w+) \w+ `%s`" % own[0].name, doc)
            if word is None:
                sys.exit("generate.py: %s's doc names no item `%s` to name its constructor "
                         "by" % (const, own[0].name))
            name += "_" + word.group(1)
        params, given, pre, k = [], [], [], 0
        while k < len(own):
            fl, nxt = own[k], own[k + 1] if k + 1 < len(own) else None
            n = py_name(fl.name)
            if fl.ctype == "double" and fl.name.endswith("x") and nxt is not None and \
                    nxt.ctype == "double" and nxt.name == fl.name[:-1] + "y":
                pair = fl.name[:-1] + "_xy"
                params.append(pair + ("=(0.0, 0.0)" if params else ""))
                pre.append("%s, %s = to_point(%s, %r, %r)" % (
                    fl.name, nxt.name, pair, "%s.%s" % (camel(s.name[3:]), name), pair))
                given += ["%s=%s" % (fl.name, fl.name), "%s=%s" % (nxt.name, nxt.name)]
                k += 2
                continue
            params.append(n + ("=" + py_default(header, s, fl, None) if params else ""))
            given.append("%s=%s" % (n, n))
            k += 1
        out += ["    @classmethod", "    def %s(cls, %s):" % (name, ", ".join(params)),
                py_docstring("%s: %s (%s)" % (e.member(const).lower(), " ".join(doc.split()),
                                            ", ".join(fl.name for fl in own)), 8)]
        out += ["        " + l for l in pre]
        out += ["        return cls(H.%s.%s, %s)" % (e.python, e.member(const),
                                                   ", ".join(given)), ""]
    return out


def alloc_form(header, f):
    """The allocator form of a maker, kl_<maker>_with_alloc: its parameters
    with a kl_alloc_fn and its `void *` user pointer inserted; as (the
    function, where the two go), or None where the header has none."""
    alloc = header.function(f.name + "_with_alloc")
    if alloc is None or alloc.result != f.result:
        return None
    decls = [(p.base, p.pointers) for p in alloc.params]
    for at in range(len(decls) - 1):
        if decls[at:at + 2] == [("kl_alloc_fn", 0), ("void", 1)] and \
                decls[:at] + decls[at + 2:] == [(p.base, p.pointers) for p in f.params]:
            return alloc, at
    return None


def py_maker(header, b):
    """A maker (kl_<h>_new, kl_<h>_read...) as its class makes itself: one
    without arguments is the constructor; one with them a class method
    named by the grammar (read_file), a text read with its length
    ('bytes LENGTH') taken as str or bytes by read_text. A NULL result
    raises the kl_io_error the maker fills, or else ENOMEM (its only
    failure). The new handle is adopted with the handles it read: a study
    keeps its model's allocator."""
    texts = {a.count for a in b.args if a.kind == "length"}
    params, pre, call, kept, shown = [], [], [], [], []
    alloc, at = alloc_form(header, b.f) or (None, None)
    for a in b.args:
        n = py_name(a.name)
        if a.kind == "length":
            call.append("len(%s)" % py_name(a.count))
        elif a.kind == "error_out":
            pre.append("%s = H.%s()" % (n, a.struct.name))
            call.append("ctypes.byref(%s)" % n)
        elif a.kind == "handle_in":
            params.append(n)
            call.append("to_handle(%s, %r, %r, %r)" % (n, a.ctype, b.name, a.name))
            kept.append(n)
        else:
            params.append(n)
            call.append(n)
            if a.name in texts:  # its length is taken from it: the rule first
                pre.append("%s = to_text(%s, %r, %r)" % (n, n, b.name, a.name))
            else:
                shown.append(n)
    made = "%s(%s)" % (b.name, ", ".join(call))
    if alloc is None:
        doc = py_docstring("%s\n\n(%s)" % (b.f.doc, b.name), 8)
    else:
        # the allocator form: the same call with the hook (and no user
        # pointer: the Python callable holds what it needs)
        params.append("allocator=None")
        doc = py_docstring("%s\n\n%s\n\n(%s, %s)" % (b.f.doc, textwrap.fill(
            "With `allocator`, a callable (ptr, old_size, new_size) -> address "
            "(kinloop._core.allocator_hook): " + " ".join(alloc.doc.split()), 76),
            b.name, alloc.name), 8)
        pre.append("hook = None if allocator is None else allocator_hook(allocator)")
        made = "%s if hook is None else %s(%s)" % (made, alloc.name, ", ".join(
            call[:at] + ["hook", "None"] + call[at:]))
        kept.append("hook")
    pre.append("made = " + made)
    if b.error is not None:
        fail = "check_report(%s.status or Status.ENOMEM, %s, %r%s)" % (
            b.error.name, b.error.name, py_maker_name(b),
            "".join(", " + n for n in shown))
    else:
        fail = "raise KinloopError(Status.ENOMEM, %r)" % (b.name + ": out of memory")
    pre += ["if not made:", "    " + fail]
    if py_maker_name(b) == "__init__":
        return ["    def __init__(%s):" % ", ".join(["self"] + params), doc] + \
            ["        " + l for l in pre] + [
                "        self._adopt(made%s)" % "".join(", " + k for k in kept), ""]
    return ["    @classmethod",
            "    def %s(cls, %s):" % (py_maker_name(b), ", ".join(params)), doc] + \
        ["        " + l for l in pre] + [
            "        return cls._adopting(made%s)" % "".join(", " + k for k in kept), ""]


def py_maker_name(b):
    """A maker's Python name: the constructor without arguments, else the
    grammar's, a text read with its length being read_text."""
    if not [a for a in b.args if a.is_input]:
        return "__init__"
    return b.method + ("_text" if any(a.kind == "length" for a in b.args) else "")


def py_lists(bs, h):
    """(count, getter) of each list a kl_<h> holds: a property
    kl_<h>_<x>_count and a getter kl_<h>_<x> or kl_<h>_<x>_name of one
    index, read whole as the list <getter>s (loops, output_names)."""
    plain = {b.name: b for b in bs if b.plain and b.handle == h}
    found = []
    for count in plain.values():
        x = re.fullmatch(r"kl_%s_(\w+)_count" % h, count.name)
        if not (x and count.is_property):
            continue
        for name in ("kl_%s_%s" % (h, x.group(1)), "kl_%s_%s_name" % (h, x.group(1))):
            getter = plain.get(name)
            if getter and [(a.kind, a.ctype) for a in getter.inputs] == [("scalar", "int")] \
                    and "%ss" % getter.method not in [b.method for b in plain.values()]:
                found.append((count, getter))
    return found


def standalone(bs, h):
    """Whether kl_<h> needs no hand code: freed by kl_<h>_free, and every
    function taking or making it plain or a maker."""
    mine = [b for b in bs if b.handle == h or re.fullmatch(r"(const )?kl_%s \*" % h, b.f.result)]
    return any(b.name == "kl_%s_free" % h for b in bs) and \
        all(b.plain or b.makes or b.name == "kl_%s_free" % h for b in mine)


def py_handle_class(header, bs, h):
    """kinloop.<H>'s generated part: the handle held and freed once
    (kl_<h>_free), its makers, and a method per plain function. A handle
    the header binds with nothing else (every function plain, its makers
    generated) gets its class here too (kinloop.Cam)."""
    name, free = camel(h), header.function("kl_%s_free" % h)
    out = ["", "class %sMethods(Handle):" % name,
           '    """The generated part of kinloop.%s (kl_%s): the handle held and freed,' % (
               name, h),
           "    its makers, and the plain functions as methods. A subclass supplies",
           '    what its handle needs more (a solver its _inputs and _input_count)."""', ""]
    if free is not None:
        out += ["    def _adopt(self, ptr, *keep):",
                '        """Holds the new kl_%s `ptr` until close() or garbage collection' % h,
                "        frees it (%s), exactly once; `keep` (what the handle uses: an" % free.name,
                '        allocator hook, a block) lives as long."""',
                "        self._ptr = ptr",
                "        self._finalizer = weakref.finalize(self, _free_%s, ptr, keep)" % h, "",
                "    def close(self):",
                py_docstring("%s\n\n(%s)" % (textwrap.fill(
                    free.doc + " Later calls of its methods raise ValueError; closing "
                    "twice does nothing.", 76), free.name), 8),
                "        self._finalizer()", ""]
    makers = [b for b in bs if b.makes == h]
    for b in makers:
        out += py_maker(header, b)
    if makers and "__init__" not in map(py_maker_name, makers):
        # made only by makers taking arguments: the class refuses to be called
        ways = " or ".join("%s.%s(%s)" % (name, py_maker_name(b), ", ".join(
            py_name(a.name) for a in b.args if a.is_input)) for b in makers)
        out += ["    def __init__(self, *args, **kwargs):",
                '        """Not a maker: use %s."""' % ways,
                "        raise TypeError(%r)" % ("kinloop.%s: use %s" % (name, ways)), ""]
    for b in bs:
        if b.plain and b.handle == h:
            out += py_method(b)
    for count, getter in py_lists(bs, h):
        out += ["    @property", "    def %ss(self):" % getter.method,
                '        """%s of each, in order (%s of them)."""' % (getter.name, count.name),
                "        return [self.%s(k) for k in range(self.%s)]" % (getter.method,
                                                                       count.method), ""]
    if free is not None:
        out = ["", "def _free_%s(ptr, keep):" % h,
               "    lib.%s(ptr)  # looked up now: a test may count the calls" % free.name,
               ""] + out
    if standalone(bs, h):
        out += ["", "class %s(%sMethods):" % (name, name),
                py_docstring("%s\n\n(kl_%s)" % (header.handle_docs.get("kl_" + h, ""), h), 4),
                ""]
    return out


def python_api(header):
    bs = bindings(header)
    out = ['"""Every function of include/kinloop.h with the argument rule applied to',
           "what the caller gives (kinloop._args), the structs as value types, and",
           "the methods and functions of the plain functions, which kinloop.Model,",
           "Solver and Study inherit.", "", GENERATED + '"""', "", "import collections", "import ctypes",
           "import dataclasses", "import weakref", "", "import numpy as np", "",
           "from . import _header as H",
           "from ._args import (array_of, fields_of, flat_pairs, rows_of, same_count, struct_in,",
           "                    to_array_size, to_chars, to_double, to_handle, to_int, to_long,",
           "                    to_path, to_point, to_size, to_string, to_text, with_fields)",
           "from ._core import (Handle, KinloopError, allocator_hook, as_enum, check_const,",
           "                    check_report, text)",
           "from ._header import Status",
           "from .raw import lib", "",
           "#: what numpy arrays the C functions fill are passed as",
           "DOUBLES = ctypes.POINTER(ctypes.c_double)",
           "INTS = ctypes.POINTER(ctypes.c_int)", "", "",
           "# ---- checked calls: one per KL_API function ----", ""]
    for b in bs:
        out += py_checked_call(b)
    out += ["", "# ---- the results of functions giving several ----", ""]
    out += py_result_tuples(bs)
    out += ["", "# ---- the structs from what the caller gives ----", ""]
    for s in header.structs:
        out += py_converter(header, s)
    out += ["", "# ---- the structs as values ----", ""]
    for s in header.structs:
        out += py_value_type(header, s, bs)
    out += ["#: each C struct's value type (from_<struct> reads one as the other)",
            "VALUE_TYPES = {%s}" % ", ".join("H.%s: %s" % (s.name, camel(s.name[3:]))
                                             for s in header.structs), "", ""]
    out += ["# ---- plain functions without a handle ----", ""]
    for b in bs:
        if b.plain and b.handle is None and b.owner is None:
            out += py_method(b) + [""]
    texts = enum_texts(header, bs)
    if texts:
        out += ["", "# ---- str() of an enum value is its kl_<enum>_str text ----", ""]
        for e, b in texts:
            out.append("H.%s.__str__ = lambda self: %s(self)" % (e.python, b.method))
        out.append("")
    for h in HANDLES:
        out += py_handle_class(header, bs, h)
    exported = [camel(s.name[3:]) for s in header.structs] + \
        [b.method for b in bs if b.plain and b.handle is None and b.owner is None] + \
        [camel(h) for h in HANDLES if standalone(bs, h)] + \
        [py_results(b)[0] for b in bs if b.plain and py_results(b)]
    out += ["", "#: what the kinloop package exports from here: value types, functions",
            "__all__ = %r" % (exported,)]
    # a maker's allocator form is bound with it (Model(allocator=...))
    makers = {b.name: b for b in bs if b.makes and alloc_form(header, b.f)}
    out += ["", "#: how each KL_API function is bound: the generated method, or None",
            "#: where the hand-written code binds it", "GENERATED = {"]
    for b in bs:
        where = None
        if b.plain:
            owner = ("%sMethods." % camel(b.handle) if b.handle else
                     "%s." % camel(b.owner.name[3:]) if b.owner else "")
            where = owner + b.method
        elif b.makes:
            where = "%sMethods.%s" % (camel(b.makes), py_maker_name(b))
        elif b.name.endswith("_with_alloc") and b.name[:-11] in makers:
            where = "%sMethods.%s" % (camel(makers[b.name[:-11]].makes),
                                      py_maker_name(makers[b.name[:-11]]))
        elif b.name.endswith("_free") and b.handle in HANDLES:
            where = "%sMethods.close" % camel(b.handle)
        out.append("    %r: %r," % (b.name, where))
    out += ["}", ""]
    return "\n".join(out)


# ---------------------------------------------------------------------------
# Octave
# ---------------------------------------------------------------------------

def first_sentence(doc):
    text = " ".join(doc.split())
    end = re.search(r"\.(\s|$)", text)
    return text[:end.start() + 1] if end else text


def cpp_string(text):
    return '"%s"' % text.replace("\\", "\\\\").replace('"', '\\"')


def cpp_comment(text, indent=""):
    lines = [l.replace("*/", "* /") for l in text.splitlines()]
    return [indent + "/* " + lines[0]] + [indent + " * " + l if l else indent + " *"
                                          for l in lines[1:]] + [indent + " */"]


def octave_enum_tables(header):
    out = ["/* ---- enums: each value's name (as Octave code gives and gets it) ---- */", ""]
    for e in header.enums:
        out.append("const named_code %s_names[] = {" % e.name)
        for const, _, _ in e.values:
            out.append("    {%s, %s}," % (cpp_string(e.octave_name(const)), const))
        out += ["    {nullptr, 0}};", ""]
    status = header.enum("kl_status")
    out += ["/* A status's name, as in the error identifiers kinloop:<name>. */",
            "const char *status_name(int status) {", "  switch (status) {"]
    for const, _, _ in status.values:
        out.append("  case %s: return %s;" % (const, cpp_string(status.octave_name(const))))
    out += ["  default: return \"EUNKNOWN\";", "  }", "}", ""]
    return out


def octave_structs(header):
    out = ["/* ---- structs: C to Octave and back, field by field ---- */", ""]
    for s in header.structs:
        fields = s.value_fields()
        named = {fl.name: "%s_%s_names" % (s.name, fl.name) for fl in fields
                 if (s.name, fl.name) in FIELD_NAMES}
        for fl in fields:
            if fl.name in named:
                out.append("const named_code %s[] = {" % named[fl.name])
                out += ["    {%s, %d}," % (cpp_string(n), k)
                        for k, n in enumerate(FIELD_NAMES[(s.name, fl.name)])]
                out += ["    {nullptr, 0}};", ""]
        out.append("octave_scalar_map to_octave(const %s &s) {" % s.name)
        out.append("  octave_scalar_map m;")
        for fl in fields:
            e = field_enum(header, fl)
            if e is not None or fl.name in named:
                value = "code_name(%s, s.%s)" % (named.get(fl.name, e and e.name + "_names"),
                                                 fl.name)
            elif is_flag(fl):
                value = "s.%s != 0" % fl.name
            elif fl.length is not None:
                value = "std::string(s.%s)" % fl.name
            elif header.struct(fl.ctype) is not None:
                value = "to_octave(s.%s)" % fl.name
            elif fl.ctype in ("long", "size_t"):
                value = "static_cast<double>(s.%s)" % fl.name
            else:
                value = "s.%s" % fl.name
            out.append("  m.assign(%s, %s);" % (cpp_string(fl.name), value))
        out += ["  return m;", "}", ""]
        out += ["octave_map struct_row(const %s *items, int n) {" % s.name,
                "  octave_map m(dim_vector(1, n));",
                "  for (int k = 0; k < n; k++)",
                "    m.assign(k, to_octave(items[k]));",
                "  return m;", "}", ""]
        out.append("/* Fields of element k of `v` into `s`: every field when `all` is set,")
        out.append(" * else those given; an unknown field is refused. */")
        out.append("void from_octave(const call &c, const octave_map &v, octave_idx_type k,")
        out.append("                 const std::string &what, %s &s, bool all) {" % s.name)
        out.append("  c.only_fields(v, what, {%s}, all);" %
                   ", ".join(cpp_string(fl.name) for fl in fields))
        for fl in fields:
            e = field_enum(header, fl)
            arg = "v.contents(%s)(k), what + \".%s\"" % (cpp_string(fl.name), fl.name)
            if header.struct(fl.ctype) is not None:
                out.append("  if (v.isfield(%s))" % cpp_string(fl.name))
                out.append("    from_octave(c, v.contents(%s)(k).map_value(), 0, what + "
                           "\".%s\", s.%s, all);" % (cpp_string(fl.name), fl.name, fl.name))
                continue
            if e is not None or fl.name in named:
                conv = "c.code(%s, %s)" % (arg, named.get(fl.name, e and e.name + "_names"))
            elif fl.length is not None:
                conv = None
            elif fl.ctype == "double":
                conv = "c.real(%s)" % arg
            else:
                conv = "c.whole<%s>(%s)" % (fl.ctype, arg)
            if conv is None:
                out.append("  if (v.isfield(%s))" % cpp_string(fl.name))
                out.append("    c.text_into(%s, s.%s, sizeof s.%s);" % (arg, fl.name,
                                                                        fl.name))
            else:
                out.append("  if (v.isfield(%s))" % cpp_string(fl.name))
                out.append("    s.%s = %s;" % (fl.name, conv))
        out += ["}", ""]
    return out


def octave_wrapper(header, b):
    """The gateway command of a plain function, and how many arguments it
    takes after the command name."""
    lines = cpp_comment("%s: %s" % (b.name, first_sentence(b.f.doc)))
    signature = len(lines)
    lines.append("octave_value_list gen_%s(const call &c) {" % b.command)
    call_args, outs, counts, i, vector_arg = [], [], {}, 0, None
    per_item = {}  # numbers per counted item: 2 for x, y pairs, a table's columns
    late = []  # arrays the function fills, made once their count is known
    for a in b.args:
        # the gateway's own names (the call c, the handle h, the results
        # out, the result r) are not a parameter's: a header parameter
        # named so takes a trailing _
        n = a.name + "_" if a.name in ("c", "h", "out", "r") else a.name
        what = cpp_string(a.name)
        if a.kind == "text_out":
            lines.append("  size_t %s = 0;" % a.field)
            late.append("  std::string %s(%s + 1, '\\0');" % (n, a.field))
            call_args.append("&%s[0]" % n)
            outs.append("octave_value(%s.substr(0, %s))" % (n, a.field))
            continue
        if a.kind == "text_part":
            call_args.append("%s.size()" % b.text.name if a.name == b.text.count else "&" + n)
            continue
        if a.kind == "length":
            call_args.append("%s.size()" % a.count)
            continue
        if a.kind == "error_out":
            lines.append("  %s %s = %s();" % (a.struct.name, n, a.struct.name))
            lines.append("  %s.size = sizeof %s;" % (n, n))
            call_args.append("&" + n)
            continue
        if a.kind == "grown":
            lines.append("  std::vector<%s> %s;" % (a.ctype, n))
            late.append("    %s.assign(%s * static_cast<size_t>(%s), 0);" % (n, a.per, a.count))
            call_args.append("%s.data()" % n)
            got = "%s.data(), %s.%s" % (n, next(x.name for x in b.args if x.kind == "struct_out"),
                                        a.field)
            outs.append("pairs(%s)" % got if a.per == 2 else
                        "code_names(%s_names, %s)" % (a.enum.name, got) if a.enum else
                        "row(%s)" % got)
            continue
        if a.kind in ("filled", "array_out"):
            if a.per_model:
                lines.append("  int %s = kl_model_%s(h.model);" % (a.count, a.per_model))
            more, arg, out = octave_output_array(a, n, b.handle)
            late += more
            call_args.append(arg)
            outs.append(out)
            continue
        if a.kind == "handle":
            lines.append("  entry &h = c.%s(0, %s);" % (
                b.handle, "access::read" if a.const else "access::write"))
            call_args.append("h.%s" % b.handle)
        elif a.kind == "count":
            call_args.append(n)
            continue
        elif a.kind == "handle_in":
            lines.append("  const kl_%s *%s = c.%s(%d, access::read).%s;" % (
                a.ctype, n, a.ctype, i, a.ctype))
            call_args.append(n)
        elif a.kind == "point":
            xs = [p.name for p in a.params]
            lines.append("  double %s, %s;" % tuple(xs))
            lines.append("  c.point(c.arg(%d), %s, %s, %s);" % (i, what, *xs))
            call_args += xs
        elif a.kind == "point_array":
            lines.append("  double %s[2];" % n)
            lines.append("  c.point(c.arg(%d), %s, %s[0], %s[1]);" % (i, what, n, n))
            call_args.append(n)
        elif a.kind == "scalar" and b.vectorized and vector_arg is None:
            vector_arg = (i, n)
            call_args.append(n)
        elif a.kind == "scalar":
            conv = ("c.code(c.arg(%d), %s, %s_names)" % (i, what, a.enum.name) if a.enum else
                    "c.real(c.arg(%d), %s)" % (i, what) if a.ctype == "double" else
                    "c.array_size<%s>(c.arg(%d), %s)" % (a.ctype, i, what)
                    if sizes_an_array(b, a.name) else
                    "c.whole<%s>(c.arg(%d), %s)" % (a.ctype, i, what))
            if a.optional:  # the capacity of growing arrays
                conv = "c.given(%d) ? %s : %d" % (i, conv, GROW_FROM)
            lines.append("  %s %s = %s;" % ("int" if a.enum else a.ctype, n, conv))
            call_args.append(n)
        elif a.kind == "string" and a.optional:
            lines.append("  std::string %s_text;" % n)
            lines.append("  const char *%s = c.optional_text(%d, %s, %s_text);" % (n, i, what, n))
            call_args.append(n)
        elif a.kind == "string":
            lines.append("  std::string %s = c.text(c.arg(%d), %s);" % (n, i, what))
            call_args.append("%s.c_str()" % n)
        elif a.kind == "array_in":
            if a.struct is not None:
                lines.append("  octave_map %s_map = c.struct_list(%d, %s);" % (n, i, what))
                lines.append("  std::vector<%s> %s(%s_map.numel(), %s());" % (
                    a.struct.name, n, n, a.struct.name))
                lines.append("  for (octave_idx_type k = 0; k < %s_map.numel(); k++)" % n)
                lines.append("    from_octave(c, %s_map, k, %s, %s[k], false);" % (n, what, n))
            elif a.rows:
                lines.append("  int %s_columns = kl_%s_%s(h.%s);" % (n, b.handle, a.rows,
                                                                    b.handle))
                lines.append("  std::vector<double> %s = c.rows(c.arg(%d), %s_columns, %s);" % (
                    n, i, n, what))
                per_item[n] = "(%s_columns > 0 ? %s_columns : 1)" % (n, n)
            elif a.ctype == "double":
                lines.append("  std::vector<double> %s = c.reals(c.arg(%d), %s);" % (n, i, what))
            else:
                lines.append("  std::vector<int> %s = c.wholes<int>(c.arg(%d), %s);" % (
                    n, i, what))
            if a.per == 2:
                # x, y pairs: a 2-by-n matrix, or a flat list x0 y0 x1 y1 ...
                lines.append("  if (%s.size() %% 2 != 0)" % n)
                lines.append("    c.bad(%s, \"must hold x, y pairs\");" % what)
                per_item[n] = "2"
            counts.setdefault(a.count, []).append(n)
            call_args.append("%s.empty() ? nullptr : %s.data()" % (n, n))
        elif a.kind == "inputs_in":
            lines.append("  int %s_n = kl_model_input_count(h.model);" % n)
            lines.append("  std::vector<double> %s = c.values(%d, %s_n, %s);" % (n, i, n, what))
            call_args.append("%s_n > 0 ? %s.data() : nullptr" % (n, n))
        elif a.kind == "struct_in":
            lines.append("  %s %s = %s();" % (a.struct.name, n, a.struct.name))
            defaults = header.function("kl_%s_default" % a.struct.name[3:])
            if defaults is not None:
                # the fields given replace the defaults; [] keeps them all
                lines.append("  %s(&%s);" % (defaults.name, n))
                lines.append("  if (c.given(%d))" % i)
            elif a.struct.sized:
                lines.append("  %s.size = sizeof %s;" % (n, n))
            lines.append("%sfrom_octave(c, c.one_struct(%d, %s), 0, %s, %s, %s);" % (
                "    " if defaults else "  ", i, what, what, n,
                "true" if a.struct.sized and not defaults else "false"))
            call_args.append("&" + n)
        elif a.kind == "struct_out":
            lines.append("  %s %s = %s();" % (a.struct.name, n, a.struct.name))
            if a.struct.sized:
                lines.append("  %s.size = sizeof %s;" % (n, n))
            call_args.append("&" + n)
            outs.append("octave_value(to_octave(%s))" % n)
        elif a.kind == "out_value":
            lines.append("  %s %s = %s;" % (a.ctype, n, "NAN" if a.ctype == "double" else "0"))
            call_args.append("&" + n)
            outs.append("code_name(%s_names, %s)" % (a.enum.name, n) if a.enum
                        else "octave_value(%s)" % n)
        elif a.kind == "out_array":
            lines.append("  %s %s[%d];" % (a.ctype, n, a.length))
            call_args.append(n)
            outs.append("row(%s, %d)" % (n, a.length))
        if a.is_input or a.kind == "handle":
            i += 1
    def items(n):
        return "%s.size()%s" % (n, " / " + per_item[n] if n in per_item else "")
    for count, arrays in counts.items():
        for other in arrays[1:]:
            lines.append("  if (%s != %s)" % (items(other), items(arrays[0])))
            lines.append("    c.bad(%s, \"must have as many %s as %s\");" % (
                cpp_string(other), "rows" if arrays[0] in per_item else "elements",
                arrays[0]))
        lines.append("  int %s = c.count(%s, %s);" % (count, items(arrays[0]),
                                                     cpp_string(arrays[0])))
    if b.fills:
        # a first call with no room says how many there are
        room = {b.fills.name + ".data()": "nullptr", b.fills.count: "0"}
        lines.append("  int %s = %s(%s);" % (b.fills.count, b.name, ", ".join(
            room.get(x, x) for x in call_args)))
        lines.append("  c.check(%s);" % b.fills.count)
    if b.text:
        # a first call with no room says how long the text is
        room = {"&%s[0]" % b.text.name: "nullptr", "%s.size()" % b.text.name: "0"}
        lines.append("  c.check(%s(%s));" % (b.name, ", ".join(room.get(x, x)
                                                               for x in call_args)))
    call = "%s(%s)" % (b.name, ", ".join(call_args))
    if b.grows:
        # the C call cannot grow the caller's arrays: a larger call each time
        lines += ["  int r;", "  for (;; %s *= 4) {" % b.grows] + late + [
            "    r = %s;" % call,
            "    if (r != KL_ETRUNCATED || %s >= %d)" % (b.grows, GROW_UP_TO),
            "      break;", "  }"]
    else:
        lines += late
    if vector_arg is not None:
        pos, name = vector_arg
        lines.append("  return one(c.each_id(%d, %s, [&](int %s) { return %s; }));" % (
            pos, cpp_string(name), name, call))
    else:
        if b.f.result == "void":
            lines.append("  %s;" % call)
        elif not b.grows:
            lines.append("  %s%sr = %s;" % (b.f.result, "" if b.f.result.endswith("*") else " ",
                                              call))
        if b.makes and b.error is not None:
            # with one output more asked for, a failure is that output
            lines += ["  if (r == nullptr && c.nargout < 2)",
                      "    c.check(%s.status, %s);" % (b.error.name, b.error.name)]
            outs.append("to_octave(%s)" % b.error.name)
        elif b.makes:
            lines += ["  if (r == nullptr)",
                      "    raise_status(KL_ENOMEM, %s);" % cpp_string(b.command +
                                                             ": out of memory")]
        if b.makes:
            lines += ["  entry e;", "  e.%s = r;" % b.makes]
            # NULL (a failure given as the report) is []
            outs.insert(0, ("r == nullptr ? octave_value(Matrix()) : " if b.error else "") +
                        "octave_value(new_id(kind::%s, e))" % b.makes)
        elif b.f.result in ("int", "long"):
            error = "kl_%s_error" % b.handle
            if b.error is not None:
                lines.append("  c.check(r, %s);" % b.error.name)
            elif b.handle and not b.handle_const and header.function(error):
                lines.append("  c.check(r, %s(h.%s));" % (error, b.handle))
            else:
                lines.append("  c.check(r);")
        if b.value_result and not b.makes:
            outs.insert(0, "code_name(%s_names, r)" % b.enum.name if b.enum else
                        "octave_value(r != 0)" if b.boolean else
                        "text_value(r)" if b.f.result == "const char *" else
                        "octave_value(static_cast<double>(r))"
                        if b.f.result in ("long", "size_t") else "octave_value(r)")
        if not outs:
            lines.append("  return none();")
        else:
            lines.append("  octave_value_list out;")
            lines += ["  out(%d) = %s;" % (k, o) for k, o in enumerate(outs)]
            lines.append("  return out;")
    lines += ["}", ""]
    if not any(re.search(r"\bc\b[.,)]", l) for l in lines[signature + 1:]):
        lines[signature] = lines[signature].replace("const call &c", "const call &")
    return lines, i


def sizes_an_array(b, name):
    """Whether the scalar argument `name` sizes an array the binding makes
    for the function to fill (a growing array's capacity, or an output's
    count the caller gives)."""
    return name == b.grows or any(a.kind == "array_out" and a.count == name for a in b.args)


def octave_output_array(a, n, handle):
    """An array the function fills: the lines making it (once its count
    is known), the C argument, and the Octave value of what was filled:
    numbers as a row (count-by-2 for x, y pairs, count-by-columns for a
    table), structs as a struct row."""
    count = a.count
    if a.struct is None and a.kind == "array_out" and a.ctype == "double":
        # C writes element by element, row by row: Octave's columns are C's rows
        width = "kl_%s_%s(h.%s)" % (handle, a.rows, handle) if a.rows else a.per
        make = ["  Matrix %s(%s, %s > 0 ? %s : 0);" % (n, width, count, count)]
        return make, "%s.fortran_vec()" % n, "%s.transpose()" % n \
            if a.per == 2 or a.rows else n
    ctype = a.struct.name if a.struct else a.ctype
    make = ["  std::vector<%s> %s(%s > 0 ? %s : 1, %s());" % (ctype, n, count, count, ctype)]
    if a.struct is None:
        return make, "%s.data()" % n, "row(%s.data(), %s)" % (n, count)
    if a.struct.sized:
        make += ["  for (%s &item : %s)" % (ctype, n), "    item.size = sizeof item;"]
    return make, "%s.data()" % n, "struct_row(%s.data(), %s)" % (n, count)


def octave_introspection(header):
    """Two commands telling what the gateway knows of the header, for the
    drift test: each enum's names and codes, each struct's fields."""
    out = ["/* enums(): per enum, its values' names and codes as the gateway knows them. */",
           "octave_value_list gen_enums(const call &) {", "  octave_scalar_map out;"]
    for e in header.enums:
        out.append("  out.assign(%s, enum_table(%s_names));" % (cpp_string(e.name), e.name))
    out += ["  return one(out);", "}", "",
            "/* structs(): per struct, the fields the converters read and write. */",
            "octave_value_list gen_structs(const call &) {", "  octave_scalar_map out;"]
    for s in header.structs:
        fields = s.value_fields()
        out.append("  {")
        out.append("    Cell fields(1, %d);" % len(fields))
        for k, fl in enumerate(fields):
            out.append("    fields(%d) = %s;" % (k, cpp_string(fl.name)))
        out.append("    out.assign(%s, fields);" % cpp_string(s.name))
        out.append("  }")
    out += ["  return one(out);", "}", ""]
    return out


def octave_usage(b):
    parts = [b.handle] if b.handle else []
    parts += ["[%s]" % a.name if a.optional else a.name for a in octave_inputs(b)]
    return "(%s)" % ", ".join(parts)


def octave_gateway(header):
    bs = bindings(header)
    out = ["/*", " * kinloop_gateway.inc - the generated part of the Octave gateway,",
           " * included by __kinloop__.cc. " + GENERATED, " */", ""]
    out += octave_enum_tables(header)
    out += octave_structs(header)
    out += ["/* ---- the plain functions: one command each ---- */", ""]
    table = []
    for b in bs:
        if not (b.plain or b.makes):
            continue
        lines, count = octave_wrapper(header, b)
        out += lines
        optional = sum(1 for a in octave_inputs(b) if a.optional)
        table.append("    {%s, %d, %d, %s, gen_%s}," % (
            cpp_string(b.command), count - optional, count,
            cpp_string(octave_usage(b)), b.command))
    out += octave_introspection(header)
    table += ['    {"enums", 0, 0, "()", gen_enums},', '    {"structs", 0, 0, "()", gen_structs},']
    out += ["/* The generated commands, in the header's order. */",
            "const command generated_commands[] = {"] + table + [
            "    {nullptr, 0, 0, nullptr, nullptr}};", ""]
    return "\n".join(out)


def octave_inputs(b):
    """What Octave code gives: every input after the handle (a value struct
    a function belongs to is an argument like any other)."""
    return [a for a in b.args if a.is_input]


def octave_method(b, obj=True):
    """An Octave method (or package function) calling the gateway."""
    ins = octave_inputs(b)
    name = b.method if obj else b.command
    fixed = [a.name for a in ins if not a.optional]
    params = (["obj"] if obj else []) + fixed + (["varargin"] if any(a.optional for a in ins)
                                                  else [])
    forward = (["obj.id"] if obj else []) + \
        [a.name + ".id" if a.kind == "handle_in" else a.name for a in ins if not a.optional] + \
        (["varargin{:}"] if any(a.optional for a in ins) else [])
    outputs = (["value"] if b.value_result else []) + [a.name for a in b.outputs]
    usage = "%s%s(%s)" % ("[%s] = " % ", ".join(outputs) if len(outputs) > 1 else
                          "%s = " % outputs[0] if outputs else "",
                          name, ", ".join(["[%s]" % a.name if a.optional else a.name
                                             for a in ins]))
    doc = b.f.doc.splitlines()
    head = "function %s%s(%s)" % ("varargout = " if outputs else "", name,
                                  ", ".join(params))
    lines = [head, "  %% %s: %s" % (usage, b.name)]
    lines += ["  % " + l if l else "  %" for l in doc]
    if b.vectorized:
        lines.append("  %% (%s may be a vector of ids: one value each, same shape)" %
                     ins[0].name)
    call = "__kinloop__(%s)" % ", ".join([repr(b.command)] + forward)
    if outputs:
        lines.append("  [varargout{1:max(nargout, 1)}] = %s;" % call)
    else:
        lines.append("  %s;" % call)
    lines.append("end")
    return lines


def octave_maker(b):
    """A maker taking arguments (a reader) as a static method of its class:
    the new handle wrapped as kinloop.<Class>('adopt', id). With one output
    more asked for, the gateway gives its failure report instead of raising."""
    ins = octave_inputs(b)
    names = [a.name for a in ins]
    forward = [repr(b.command)] + [a.name + ".id" if a.kind == "handle_in" else a.name
                                   for a in ins]
    report = ", %s" % b.error.name if b.error else ""
    lines = ["function [obj%s] = %s(%s)" % (", varargout" if b.error else "", b.method,
                                            ", ".join(names)),
             "  %% [obj%s] = %s(%s): %s" % (report, b.method, ", ".join(names), b.name)]
    lines += ["  % " + l if l else "  %" for l in b.f.doc.splitlines()]
    if b.error:
        lines += ["  %% With two outputs a failure does not raise: obj is [] and %s "
                  "says why" % b.error.name,
                  "  %% (%s)." % ", ".join(f.name for f in b.error.struct.value_fields()),
                  "  [id, varargout{1:nargout - 1}] = __kinloop__(%s);" % ", ".join(forward)]
    else:
        lines.append("  id = __kinloop__(%s);" % ", ".join(forward))
    return lines + ["  obj = [];", "  if ~isempty(id)",
                    "    obj = kinloop.%s('adopt', id);" % camel(b.makes), "  end", "end"]


def octave_classes(header, out_dir):
    bs = bindings(header)
    package = os.path.join(out_dir, "+kinloop")
    os.makedirs(package, exist_ok=True)
    for h in HANDLES:
        name = "%sMethods" % camel(h)
        lines = ["classdef %s < handle" % name,
                 "  %% kinloop.%s - the gateway id of a kinloop.%s, freed once, and a" %
                 (name, camel(h)),
                 "  %% method for each plain function of kl_%s, calling the gateway" % h,
                 "  % command of the same name. " + GENERATED, "",
                 "  properties (SetAccess = protected)",
                 "    id = [];  % the gateway's handle",
                 "  end", "",
                 "  % Public but hidden: Octave 7 runs a destructor in the context of the",
                 "  % object that released it, where private properties cannot be read.",
                 "  properties (Hidden)",
                 "    freed = false;  % set once the gateway has freed the handle",
                 "    owner = [];     % a borrowed handle: the object that frees it",
                 "  end", "", "  methods"]
        if header.function("kl_%s_free" % h):
            lines += ["    function delete(obj)",
                      "      %% Frees the %s (kl_%s_free) once; later calls do nothing. A" %
                      (h, h),
                      "      % borrowed one is its owner's to free: nothing happens.",
                      "      if ~obj.freed && ~isempty(obj.id) && isempty(obj.owner)",
                      "        __kinloop__('%s_free', obj.id);" % h,
                      "        obj.freed = true;", "      end", "    end", ""]
        for b in bs:
            if b.plain and b.handle == h:
                lines += ["    " + l for l in octave_method(b)] + [""]
        lines.append("  end")
        # a maker without arguments is the class constructor's to call
        makers = [b for b in bs if b.makes == h and octave_inputs(b)]
        if makers:
            lines += ["", "  methods (Static)"]
            for b in makers:
                lines += ["    " + l for l in octave_maker(b)] + [""]
            lines.append("  end")
        lines += ["end", ""]
        write(os.path.join(package, name + ".m"), "\n".join(lines))
    for b in bs:
        if b.plain and b.handle is None:
            lines = octave_method(b, obj=False)
            lines.insert(1, "  % " + GENERATED)
            write(os.path.join(package, b.command + ".m"), "\n".join(lines) + "\n")


# ---------------------------------------------------------------------------
# The layout probe: a C program printing what the compiler made of the header
# ---------------------------------------------------------------------------

def layout_probe(header):
    out = ["/*", " * kinloop_layout.c - prints the size and the field offsets of every",
           " * public struct of include/kinloop.h, and the value of every enum constant,",
           " * as this compiler lays them out: what the bindings' drift tests compare",
           " * with. " + GENERATED, " */", "#include <stddef.h>", "#include <stdio.h>", "",
           '#include "kinloop.h"', "",
           "#define FIELD(s, f) \\",
           '  printf("field %s %s %lu %lu\\n", #s, #f, (unsigned long)offsetof(s, f), \\',
           "         (unsigned long)sizeof(((s *)0)->f))", "", "int main(void) {"]
    for s in header.structs:
        out.append('  printf("struct %s %%lu\\n", (unsigned long)sizeof(%s));' % (s.name, s.name))
        for fl in s.fields:
            out.append("  FIELD(%s, %s);" % (s.name, fl.name))
    for e in header.enums:
        for const, _, _ in e.values:
            out.append('  printf("enum %s %s %%d\\n", (int)%s);' % (e.name, const, const))
    out += ["  return 0;", "}", ""]
    return "\n".join(out)


# ---------------------------------------------------------------------------

def write(path, text):
    tmp = path + ".tmp"
    with open(tmp, "w", encoding="utf-8") as f:
        f.write(text)
    os.replace(tmp, path)


def main(argv):
    if len(argv) < 3 or argv[1] not in ("python", "octave", "layout", "list") or \
            (argv[1] != "list" and len(argv) != 4):
        sys.exit(__doc__)
    with open(argv[2], encoding="utf-8") as f:
        header = Header(f.read())
    check_pointers(header)
    if argv[1] == "list":
        for b in bindings(header):
            home = camel(b.handle) + "." if b.handle else \
                camel(b.owner.name[3:]) + "." if b.owner else ""
            print("%-34s %s" % (b.name, "plain -> " + home + b.method if b.plain
                                else "hand: " + b.why))
        return
    if argv[1] == "layout":
        write(argv[3], layout_probe(header))
        return
    out_dir = argv[3]
    os.makedirs(out_dir, exist_ok=True)
    if argv[1] == "python":
        write(os.path.join(out_dir, "_header.py"), python_header(header))
        write(os.path.join(out_dir, "_api.py"), python_api(header))
    else:
        write(os.path.join(out_dir, "kinloop_gateway.inc"), octave_gateway(header))
        octave_classes(header, out_dir)


if __name__ == "__main__":
    main(sys.argv)
