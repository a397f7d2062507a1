"""The argument rule: what a caller gives reaches C exactly, or is refused.

Every integer is checked against its C type's range (int, long, size_t) and
must be whole (3.0 is 3; 3.5 and 2**32 + 3 are refused, never wrapped);
every double must be a real number a C double holds exactly (NaN and
infinities pass: the library has statuses for them); every string must be
encodable and hold no NUL (which would end it early in C). A refusal raises
KinloopError with Status.EINVAL naming the function and the argument. The
generated calls (kinloop._api) apply it to every value; the Octave gateway
applies the same rule."""

import ctypes
import dataclasses
import math
import numbers
import operator
import os

import numpy as np

from ._core import Handle, KinloopError
from ._header import MAX_STEPS, Status


def _range(ctype, signed):
    bits = 8 * ctypes.sizeof(ctype)
    return (-(1 << (bits - 1)), (1 << (bits - 1)) - 1) if signed else (0, (1 << bits) - 1)


_RANGES = {"int": _range(ctypes.c_int, True), "long": _range(ctypes.c_long, True),
           "size_t": _range(ctypes.c_size_t, False)}


def refuse(function, argument, why):
    raise KinloopError(Status.EINVAL, "%s: %s %s" % (function, argument, why))


def _integer(value, ctype, function, argument):
    if isinstance(value, numbers.Integral):
        n = operator.index(value)
    elif isinstance(value, numbers.Real):
        if not (math.isfinite(value) and value == math.floor(value)):
            refuse(function, argument, "must be a whole number; got %r" % (value,))
        n = int(value)
    else:
        refuse(function, argument, "must be an integer; got %s" % type(value).__name__)
    low, high = _RANGES[ctype]
    if not low <= n <= high:
        refuse(function, argument, "must be within the range of a C %s, %d to %d; got %d"
               % (ctype, low, high, n))
    return n


def to_int(value, function, argument):
    return _integer(value, "int", function, argument)


def to_long(value, function, argument):
    return _integer(value, "long", function, argument)


def to_size(value, function, argument):
    return _integer(value, "size_t", function, argument)


def to_array_size(value, function, argument, ctype="int"):
    """A whole number of the C type `ctype` sizing an array the bindings
    make for the library to fill: at most MAX_STEPS elements, else
    Status.ETOOLARGE, so a huge value is refused before any memory is asked
    for."""
    n = _integer(value, ctype, function, argument)
    if n > MAX_STEPS:
        raise KinloopError(Status.ETOOLARGE, "%s: %s %d is above KL_MAX_STEPS (%d), the most "
                           "elements the bindings make room for" % (function, argument, n,
                                                                   MAX_STEPS))
    return n


def to_double(value, function, argument):
    if not isinstance(value, numbers.Real):
        refuse(function, argument, "must be a real number; got %s" % type(value).__name__)
    try:
        x = float(value)
    except OverflowError:
        x = None
    if x is None or not (x == value or math.isnan(x)):
        refuse(function, argument, "is not a number a C double holds exactly: %r" % (value,))
    return x


def _no_nul(data, function, argument):
    if b"\0" in data:
        refuse(function, argument, "contains a NUL character (at byte %d), which would "
               "end it there in C" % data.index(b"\0"))
    return data


def to_string(value, function, argument):
    """A str as UTF-8, or bytes as they are; None stays NULL."""
    if value is None:
        return None
    if isinstance(value, str):
        try:
            return _no_nul(value.encode("utf-8"), function, argument)
        except UnicodeEncodeError as e:
            refuse(function, argument, "cannot be encoded as UTF-8: %s" % e.reason)
    if isinstance(value, (bytes, bytearray, memoryview)):
        return _no_nul(bytes(value), function, argument)
    refuse(function, argument, "must be a str or bytes; got %s" % type(value).__name__)


def to_text(value, function, argument):
    """A text read with its length (a model or study file's): a str or
    bytes as to_string takes them; None, no text at all, is refused."""
    if value is None:
        refuse(function, argument, "must be a str or bytes; got NoneType")
    return to_string(value, function, argument)


def to_path(value, function, argument):
    """A file system path (str, bytes or os.PathLike) as the OS encodes it."""
    if value is None:
        return None
    try:
        return _no_nul(os.fsencode(value), function, argument)
    except (TypeError, UnicodeEncodeError) as e:
        refuse(function, argument, "is not a file system path: %s" % e)


def to_handle(value, kind, function, argument):
    """Another handle a function reads: a kinloop object of the C type
    kl_<kind> (Model, Solver, Study); any other object is refused, never
    handed to C as a pointer it would misread."""
    if not (isinstance(value, Handle) and
            any(c.__name__.lower() == kind for c in type(value).__mro__)):
        refuse(function, argument, "must be a %s; got %s" % (kind.capitalize(),
                                                              type(value).__name__))
    return value._handle


def to_point(value, function, argument):
    """A point: a sequence of two real numbers (x, y)."""
    try:
        x, y = value
    except (TypeError, ValueError):
        refuse(function, argument, "must be a point (x, y) of two numbers; got %r" % (value,))
    return (to_double(x, function, argument + "[0]"),
            to_double(y, function, argument + "[1]"))


def flat_pairs(values, function, argument):
    """Points (x, y) as the flat list x0, y0, x1, y1, ... that C reads: a
    sequence of pairs (an n-by-2 array)."""
    if values is None:
        return None
    try:
        items = list(values)
    except TypeError:
        refuse(function, argument, "must be a sequence of (x, y) pairs; got %s"
               % type(values).__name__)
    flat = []
    for k, v in enumerate(items):
        flat.extend(to_point(v, function, "%s[%d]" % (argument, k)))
    return flat


def fields_of(value, names, ctype_name, function, argument):
    """The attributes `names` of a value given for a C struct (a dataclass
    of kinloop, or any object), in order; a field named as a Python keyword
    is read with a trailing underscore (from_). The generated converters
    (kinloop._api.to_kl_<struct>) put each under the rule."""
    got = []
    for name in names:
        if not hasattr(value, name):
            refuse(function, argument, "has no field %s (a %s needs %s)" % (
                name, ctype_name, ", ".join(n.rstrip("_") for n in names)))
        got.append(getattr(value, name))
    return got


def to_chars(value, size, function, argument):
    """A string for a char array of `size` bytes, its NUL included."""
    data = to_string(value, function, argument)
    if len(data) >= size:
        refuse(function, argument, "is longer than %d bytes" % (size - 1))
    return data


def array_of(values, ctype, rule, function, argument):
    """A C array of the values (each by `rule`: to_int, to_double or a
    struct's converter; None for none) and how many there are."""
    try:
        items = [] if values is None else list(values)
    except TypeError:
        refuse(function, argument, "must be a sequence; got %s" % type(values).__name__)
    converted = [rule(v, function, "%s[%d]" % (argument, k)) for k, v in enumerate(items)]
    return (ctype * max(len(items), 1))(*converted), len(items)


def with_fields(value, ctype_name, fields, function, argument):
    """A value type (a frozen dataclass of kinloop) with `fields` replacing
    fields by name, or without fields the value as it is; a value that is
    no value type takes no fields (a keyword naming no field is Python's
    TypeError, as for any function)."""
    if not fields:
        return value
    if not dataclasses.is_dataclass(value) or isinstance(value, type):
        refuse(function, argument, "must be a %s; got %s" % (ctype_name, type(value).__name__))
    return dataclasses.replace(value, **fields)


def same_count(function, count, *arrays, rule=to_int):
    """The length of arrays (name, length) that one int (or long, by
    `rule`) `count` gives C."""
    lengths = {n for _, n in arrays}
    if len(lengths) > 1:
        refuse(function, " and ".join(a for a, _ in arrays), "must have as many elements "
               "each; got %s" % ", ".join("%d" % n for _, n in arrays))
    return rule(lengths.pop(), function, count)


def rows_of(values, columns, function, argument):
    """A table of `columns` doubles per row (an (n, columns) array) as C
    reads it, row by row, and its rows."""
    try:
        table = np.ascontiguousarray(values, dtype=float)
    except (TypeError, ValueError, OverflowError) as e:
        refuse(function, argument, "must be an array of numbers (%s)" % e)
    if table.ndim != 2 or table.shape[1] != columns:
        refuse(function, argument, "must have %d columns (an (n, %d) array); got the "
               "shape %s" % (columns, columns, table.shape))
    return table.ctypes.data_as(ctypes.POINTER(ctypes.c_double)), table.shape[0]


def struct_in(value, rule, function, argument):
    """A `const kl_x *` argument: NULL for None, a reference to the struct
    `rule` (its converter) makes, or a pointer or array the bindings made,
    as it is."""
    if value is None or isinstance(value, (ctypes._Pointer, ctypes.Array,
                                           type(ctypes.byref(ctypes.c_int())))):
        return value
    return ctypes.byref(rule(value, function, argument))
