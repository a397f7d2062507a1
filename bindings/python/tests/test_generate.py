"""bindings/generate.py picks up a new plain function with no hand code:
given the header with declarations added the way the header's grammar
writes them, each is generated, named by the grammar, with the argument
kinds its C types say; a pointer the C type cannot explain is left to hand
code unless the generator's POINTERS table says what it is."""

import os
import re
import sys

import pytest

HEADER = os.environ.get("KINLOOP_HEADER") or pytest.skip(
    "KINLOOP_HEADER is not set (ctest sets it)", allow_module_level=True)
sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(HEADER)), os.pardir,
                                "bindings"))
import generate  # noqa: E402  (bindings/generate.py, found through the line above)

ADDED = """
/** The length of a link between two of its joints (made up for this test). */
KL_API double kl_model_link_length(const kl_model *m, int link, int joint_a,
                                   int joint_b);
/** Moves input `input` toward `target`. Returns KL_OK, KL_EID, KL_EINVAL. */
KL_API int kl_solver_reach(kl_solver *s, int input, double target);
/** A link's transform into `m` and its origin into `xy`: KL_OK or KL_EID. */
KL_API int kl_link_frame(const kl_solver *s, int link, double m[4], double xy[2]);
/** A name for a study output by its label: KL_OK, KL_EID. */
KL_API int kl_study_set_label(kl_study *st, int k, const char *label);
/** Rows of a state into `row`, at most `cap`: hand-written, the pointer is not explained. */
KL_API int kl_solver_row(const kl_solver *s, double *row, int cap);
"""


@pytest.fixture(scope="module")
def extended():
    with open(HEADER, encoding="utf-8") as f:
        text = f.read()
    end = text.rindex("#ifdef __cplusplus")
    header = generate.Header(text[:end] + ADDED + text[end:])
    return header, {b.name: b for b in generate.bindings(header)}


def test_new_plain_functions_are_generated(extended):
    header, found = extended
    length = found["kl_model_link_length"]
    assert length.plain and length.handle == "model" and length.method == "link_length"
    assert [(a.kind, a.name) for a in length.inputs] == [
        ("scalar", "link"), ("scalar", "joint_a"), ("scalar", "joint_b")]
    assert length.vectorized  # Octave: a double getter over ids
    reach = found["kl_solver_reach"]
    assert reach.plain and reach.method == "reach" and reach.status and not reach.handle_const
    frame = found["kl_link_frame"]
    assert frame.plain and [(a.kind, a.length) for a in frame.outputs] == [
        ("out_array", 4), ("out_array", 2)]
    label = found["kl_study_set_label"]
    assert label.plain and label.method == "set_label" and label.inputs[1].kind == "string"


def test_an_unexplained_pointer_is_left_to_hand_code(extended):
    header, found = extended
    rows = found["kl_solver_sweep_rows"]
    assert not rows.plain and "POINTERS" in rows.why


def test_both_bindings_emit_them(extended):
    header, found = extended
    api = generate.python_api(header)
    assert "def link_length(self, link, joint_a, joint_b):" in api
    assert "def reach(self, input, target):" in api
    assert "'kl_solver_sweep_rows': None" in api  # bound by hand, or reported by test_drift
    gateway = generate.octave_gateway(header)
    assert 'gen_model_link_length' in gateway and '{"solver_reach", 3, 3,' in gateway
    assert "gen_solver_sweep_rows" not in gateway
    compile(api, "_api.py", "exec")  # valid Python


def test_a_struct_filled_through_an_out_pointer_is_an_output():
    # kl_model_load fills a kl_load, which has no size field: POINTERS says
    # "out", and neither binding sets a size it does not have
    with open(HEADER, encoding="utf-8") as f:
        header = generate.Header(f.read())
    load = {b.name: b for b in generate.bindings(header)}["kl_model_load"]
    assert load.plain and load.method == "load"
    assert [(a.kind, a.struct.name) for a in load.outputs] == [("struct_out", "kl_load")]
    gateway = generate.octave_gateway(header)
    body = gateway[gateway.index("gen_model_load("):]
    body = body[:body.index("\n}\n")]
    assert "kl_load load = kl_load();" in body and ".size" not in body
    assert "return from_kl_load(load)" in generate.python_api(header)


def test_arrays_a_function_fills_are_outputs():
    # POINTERS "CAP fills": sized by a first call with NULL and 0, the count
    # hidden; "N out": N the caller's (kl_cam_outline) or taken from the
    # array N also counts (kl_output_ranges)
    with open(HEADER, encoding="utf-8") as f:
        header = generate.Header(f.read())
    found = {b.name: b for b in generate.bindings(header)}
    loop = found["kl_model_loop"]
    assert loop.plain and loop.fills is not None and not loop.value_result
    assert [a.kind for a in loop.inputs] == ["scalar"]
    assert [(a.kind, a.count) for a in loop.outputs] == [("filled", "cap")]
    outline = found["kl_cam_outline"]
    assert [(a.kind, a.name) for a in outline.inputs] == [("scalar", "n")]
    assert [(a.kind, a.per) for a in outline.outputs] == [("array_out", 2)] * 2
    ranges = found["kl_output_ranges"]
    assert [a.kind for a in ranges.inputs][-1] == "array_in"
    assert "n" not in [a.name for a in ranges.inputs]
    api = generate.python_api(header)
    assert "cap = check_const(kl_model_loop(self._handle, loop, None, 0), 'loop', loop)" in api
    gateway = generate.octave_gateway(header)
    assert "int cap = kl_model_loop(h.model, loop, nullptr, 0);" in gateway
    assert "out(0) = pitch_xy.transpose();" in gateway


def test_a_count_that_is_no_int_parameter_is_refused(monkeypatch):
    with open(HEADER, encoding="utf-8") as f:
        header = generate.Header(f.read())
    monkeypatch.setitem(generate.POINTERS, "kl_cam_outline", {"pitch_xy": "count out"})
    with pytest.raises(SystemExit, match="not an int"):
        generate.check_pointers(header)


def test_the_array_roles_bind_what_they_say(extended):
    """Each POINTERS role of an array or text makes the arguments it names:
    the sizes of 'per', 'grows' and 'text' come from the model, a retry
    and a first call, never from the caller; a table's rows count it."""
    header, found = extended
    row = found["kl_solver_row"]
    assert row.plain and not row.is_property  # METHODS: a new array each call
    assert [(a.kind, a.per_model) for a in row.outputs] == [("array_out", "row_size")]
    space = found["kl_solver_workspace"]
    assert space.plain and space.grows == "cap"
    assert [a.kind for a in space.outputs] == ["grown"] * 3 + ["struct_out"]
    assert space.outputs[2].enum.name == "kl_workspace_kind"
    assert [a.name for a in space.inputs if a.optional] == ["cap"]
    write = found["kl_model_write"]
    assert write.plain and [a.name for a in write.inputs] == [] and write.text.field == "needed"
    saved = found["kl_model_write_file"]
    assert saved.plain and saved.error.struct.name == "kl_io_error"
    summary = found["kl_study_summarize"]
    assert summary.plain and [(a.name, a.rows) for a in summary.inputs if a.kind == "array_in"] \
        == [("values", "output_count"), ("sample_status", None)]
    gateway = generate.octave_gateway(header)
    assert "c.rows(c.arg(2), values_columns" in gateway and "cap *= 4" in gateway


def test_handles_and_makers_are_generated():
    """Each handle's lifetime comes from its kl_<h>_free (close, freed once)
    and its makers: without arguments the constructor, with them a class
    method by the grammar (a text read with its length: read_text), raising
    the kl_io_error it fills. A handle with nothing else to bind (kl_cam)
    gets its whole class."""
    with open(HEADER, encoding="utf-8") as f:
        header = generate.Header(f.read())
    bs = generate.bindings(header)
    found = {b.name: b for b in bs}
    assert [generate.py_maker_name(found[n]) for n in (
        "kl_cam_new", "kl_model_new", "kl_model_read", "kl_model_read_file",
        "kl_study_read", "kl_study_read_file")] == [
        "__init__", "__init__", "read_text", "read_file", "read_text", "read_file"]
    assert generate.standalone(bs, "cam")
    assert not any(generate.standalone(bs, h) for h in ("model", "solver", "study"))
    api = generate.python_api(header)
    assert "class Cam(CamMethods):" in api and "class Model(" not in api
    assert "        self._finalizer = weakref.finalize(self, _free_solver, ptr, keep)" in api
    assert "    lib.kl_study_free(ptr)" in api  # looked up when it frees
    assert "    def read_text(cls, text, model):" in api
    assert "to_handle(model, 'model', 'kl_study_read', 'model')" in api
    assert "return cls._adopting(made, model)" in api  # the study keeps its model's hook
    assert "check_report(err.status or Status.ENOMEM, err, 'read_file', path)" in api
    # made only by makers with arguments: calling the class says which
    assert "raise TypeError('kinloop.Study: use Study.read_text(text, model) or " \
        "Study.read_file(path)')" in api
    assert "kinloop.Model: use" not in api and "kinloop.Cam: use" not in api


ALLOCATING = """
/** As kl_cam_new, every allocation through `fn` with `user` (made up for this test). */
KL_API kl_cam *kl_cam_new_with_alloc(kl_alloc_fn fn, void *user);
/** Not an allocator form: its parameters are not kl_study_read's (made up). */
KL_API kl_study *kl_study_read_file_with_alloc(kl_alloc_fn fn, void *user);
"""


def test_the_allocator_forms_of_makers_are_generated():
    """A maker's kl_<maker>_with_alloc (its parameters with a kl_alloc_fn and
    its user pointer inserted) is the same Python maker with `allocator=`:
    Model(allocator=...), Model.read_text(text, allocator=...); a new one in
    the header needs no hand code, and a _with_alloc of other parameters is
    not taken for one."""
    with open(HEADER, encoding="utf-8") as f:
        text = f.read()
    header = generate.Header(text)
    assert [(f.name, at) for f, at in (generate.alloc_form(header, header.function(n))
                                       for n in ("kl_model_new", "kl_model_read"))] == [
        ("kl_model_new_with_alloc", 0), ("kl_model_read_with_alloc", 2)]
    assert generate.alloc_form(header, header.function("kl_model_read_file")) is None
    api = generate.python_api(header)
    assert "made = kl_model_read(text, len(text), ctypes.byref(err)) if hook is None else " \
        "kl_model_read_with_alloc(text, len(text), hook, None, ctypes.byref(err))" in api
    assert "    def read_text(cls, text, allocator=None):" in api
    assert "'kl_model_new_with_alloc': 'ModelMethods.__init__'," in api
    end = text.rindex("#ifdef __cplusplus")
    header = generate.Header(text[:end] + ALLOCATING + text[end:])
    api = generate.python_api(header)
    assert "    def __init__(self, allocator=None):" in api.split("class CamMethods")[1]
    assert "kl_cam_new() if hook is None else kl_cam_new_with_alloc(hook, None)" in api
    assert "'kl_cam_new_with_alloc': 'CamMethods.__init__'," in api
    assert "'kl_study_read_file_with_alloc': None," in api


ANOTHER = """
/** Probes output `o` (made up for this test). Returns KL_OK, or KL_ESINGULAR.
 * With KL_ESINGULAR, `r` still receives what was found. */
KL_API int kl_solver_probe(kl_solver *s, const kl_output *o, kl_range *r);
/** Sets the solver's range (made up for this test). Returns KL_OK. */
KL_API int kl_solver_set_bounds(kl_solver *s, const kl_range *r);
/** The solver's range into `r` (made up for this test). Returns KL_OK. */
KL_API int kl_solver_bounds(const kl_solver *s, kl_range *r);
"""


def test_what_a_failure_keeps_and_setters_of_structs(monkeypatch):
    """A struct the doc says a failure 'still receives' is the error's
    result; a setter of one struct whose getter reads it back starts from
    the current value, keywords replacing its fields."""
    with open(HEADER, encoding="utf-8") as f:
        text = f.read()
    end = text.rindex("#ifdef __cplusplus")
    header = generate.Header(text[:end] + ANOTHER + text[end:])
    monkeypatch.setitem(generate.POINTERS, "kl_solver_probe", {"o": "one"})
    found = {b.name: b for b in generate.bindings(header)}
    status, kept = found["kl_solver_probe"].kept
    assert (status, kept.name) == ("KL_ESINGULAR", "r")
    assert found["kl_output_range"].kept[1].name == "range"
    assert found["kl_output_value"].kept is None
    assert found["kl_solver_set_bounds"].current == "bounds"
    assert found["kl_solver_set_options"].current == "options"
    assert found["kl_model_set_sweep"].current == "sweep"
    assert found["kl_model_set_gravity"].current is None
    api = generate.python_api(header)
    assert "self._check(status, result=from_kl_range(r) if status == Status.ESINGULAR else None)" \
        in api
    assert "def set_bounds(self, bounds=None, **fields):" in api
    assert "bounds = with_fields(self.bounds if bounds is None else bounds, 'Range', fields, " \
        "'kl_solver_set_bounds', 'bounds')" in api
    compile(api, "_api.py", "exec")


KEYWORDS = """
/** Runs a made-up cycle `c` against `loads` (made up for this test), the
 * peak into `peak` and the worst load into `worst`. Returns KL_OK. */
KL_API int kl_solver_trial(kl_solver *s, const kl_cycle *c, int nloads,
                           const kl_load *loads, double *peak, int *worst);
"""


def test_structs_by_keyword_and_several_results(monkeypatch):
    """A struct read that has kl_<struct>_default is given whole or by its
    fields as keywords (named after the struct), a trailing array of
    structs may be left out, and several results are a named tuple named
    after the method, its fields after the C parameters."""
    with open(HEADER, encoding="utf-8") as f:
        text = f.read()
    end = text.rindex("#ifdef __cplusplus")
    header = generate.Header(text[:end] + KEYWORDS + text[end:])
    monkeypatch.setitem(generate.POINTERS, "kl_solver_trial",
                        {"c": "one", "loads": "nloads", "peak": "out", "worst": "out"})
    found = {b.name: b for b in generate.bindings(header)}
    trial = found["kl_solver_trial"]
    assert trial.plain and trial.keywords[1:] == ("cycle", "Cycle()")
    assert found["kl_solver_set_options"].keywords[1:] == ("options", "self.options")
    assert found["kl_output_value"].keywords is None  # kl_output has no defaults
    assert generate.py_results(trial) == ("Trial", ["peak", "worst"])
    assert generate.py_results(found["kl_solver_workspace"]) == (
        "Workspace", ["xy", "curves", "kinds", "result"])
    assert generate.py_results(found["kl_output_value"]) is None  # one result: itself
    api = generate.python_api(header)
    assert "    def trial(self, loads=(), cycle=None, **fields):" in api
    assert "cycle = with_fields(Cycle() if cycle is None else cycle, 'Cycle', fields, " \
        "'kl_solver_trial', 'cycle')" in api
    assert "Trial = collections.namedtuple('Trial', ['peak', 'worst'])" in api
    assert "return Trial(peak.value, worst.value)" in api
    assert "    def workspace(self, point, cap=4096, workspace_options=None, **fields):" in api
    compile(api, "_api.py", "exec")
    # two functions whose tuples would share a name stop the generator
    twin = KEYWORDS.replace("kl_solver_trial", "kl_model_trial").replace(
        "kl_solver *s", "kl_model *m")
    header = generate.Header(text[:end] + KEYWORDS + twin + text[end:])
    monkeypatch.setitem(generate.POINTERS, "kl_model_trial", generate.POINTERS["kl_solver_trial"])
    with pytest.raises(SystemExit, match="would both give a Trial"):
        generate.python_api(header)


def test_lists_from_counts():
    """A count property and a getter of one index (kl_<h>_<x>, or
    kl_<h>_<x>_name) give the list <getter>s; a count taking more than the
    handle (kl_model_curve_count) gives none."""
    with open(HEADER, encoding="utf-8") as f:
        header = generate.Header(f.read())
    bs = generate.bindings(header)
    model = [(c.name, g.method) for c, g in generate.py_lists(bs, "model")]
    assert ("kl_model_loop_count", "loop") in model
    assert ("kl_model_link_count", "link_name") in model
    assert not any(c == "kl_model_curve_count" for c, _ in model)
    api = generate.python_api(header)
    assert "        return [self.output_name(k) for k in range(self.output_count)]" in api


def test_struct_converters_follow_the_declarations():
    """to_<struct> puts each field of the header's declaration under the
    rule of its C type: a char array by its length, a struct inside by its
    own converter, a field named as a keyword read with an underscore."""
    with open(HEADER, encoding="utf-8") as f:
        header = generate.Header(f.read())
    cycle = "\n".join(generate.py_converter(header, header.struct("kl_cycle")))
    assert "    setattr(c, 'from', to_double(v[1], F, A + '.from_'))" in cycle
    assert "    c.steps = to_int(v[3], F, A + '.steps')" in cycle
    summary = "\n".join(generate.py_converter(header, header.struct("kl_cycle_summary")))
    assert "to_kl_cycle_peak(v[" in summary and "c.size" not in summary
    report = "\n".join(generate.py_converter(header, header.struct("kl_io_error")))
    assert re.search(r"c\.message = to_chars\(v\[\d\], \d+, F, A \+ '\.message'\)", report)


def test_constructors_per_kind_and_readers_of_structs():
    """A value struct whose first field is its kind gets a constructor per
    kind taking the fields that kind uses (not those whose doc names another
    kind), named after the kind, or, where a kind's name is a field's
    (kl_load's torque), after the kind and the word its doc puts before the
    item; and every struct gets from_<struct>, reading it back field by
    field."""
    with open(HEADER, encoding="utf-8") as f:
        header = generate.Header(f.read())
    api = generate.python_api(header)
    assert "    def force_at(cls, id, f_xy=(0.0, 0.0)):" in api  # "applied at point `id`"
    assert "    def torque_on(cls, id, torque=0.0):" in api  # "on link `id`"
    assert "        return cls(H.LoadKind.TORQUE, id=id, torque=torque)" in api
    assert "    def link_angle(cls, id, line_a=0, line_b=0):" in api
    assert "    return Load(kind=as_enum(H.LoadKind, c.kind), id=c.id, fx=c.fx, fy=c.fy, " \
        "torque=c.torque)" in api
    for s in header.structs:
        assert "def from_%s(c):" % s.name in api
