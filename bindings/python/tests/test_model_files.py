"""Model files through the bindings (Model.read_text, read_file, to_text,
write_file), against docs/model-format.md: its example four-bar, writing
then reading gives the same model, and errors come with line and column."""

import math

import pytest

import kinloop as kl
from mechanisms import CountingAllocator, angle_diff, build_fourbar, freudenstein

IO_FUNCTIONS = ("kl_model_read", "kl_model_read_with_alloc", "kl_model_read_file",
                "kl_model_write", "kl_model_write_file")
_missing = [name for name in IO_FUNCTIONS if name in kl.raw.missing]
pytestmark = pytest.mark.skipif(
    bool(_missing), reason="libkinloop does not export %s (lib/io.c not built in)"
    % ", ".join(_missing))

# the example of docs/model-format.md, as printed there
DOCUMENTED_EXAMPLE = """\
# A crank-rocker four-bar (a drive for a small stirring paddle).
kinloop-model 1
units length mm angle deg

link crank
link coupler
link rocker

revolute motor     ground 0 0      crank 0 0
revolute crank_pin crank 40 0      coupler 0 0
revolute paddle    coupler 120 0   rocker 80 0
revolute pivot     rocker 0 0      ground 100 0

point "paddle tip" coupler 60 30
input motor

sketch angle coupler 18     # above the ground line: the open branch
sketch angle rocker 64
sweep motor from 0 to 360 steps 72
"""


def test_documented_example_reads_and_solves():
    m = kl.Model.read_text(DOCUMENTED_EXAMPLE)
    assert m.is_finalized and m.dof == 1
    assert [m.link_name(l) for l in range(4)] == ["ground", "crank", "coupler", "rocker"]
    assert m.find_joint("paddle") == 2 and m.find_point("paddle tip") == 0
    assert m.units == (kl.LengthUnit.MM, kl.AngleUnit.DEG)
    # angles in degrees are held in radians
    assert m.sketch_angle(2) == pytest.approx(math.radians(18), abs=1e-15)
    settings = m.sweep
    assert (settings.input, settings.from_, settings.steps) == (0, 0.0, 72)
    assert settings.to == pytest.approx(2 * math.pi, abs=1e-15)
    # its geometry is the crank-rocker 40, 120, 80, 100: Freudenstein's
    # equation (recalled half-angle form) on the branch of the sketch
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(m)
    r = s.sweep(settings.input, settings.from_, settings.to, settings.steps)
    assert r.status == kl.Status.OK
    branch = min((+1, -1), key=lambda b: abs(angle_diff(
        r.link_angle[0, 3], freudenstein(f, 0.0, b)[1])))
    assert math.sin(r.link_angle[0, 3]) > 0  # above the ground line, as the file says
    for k, u in enumerate(r.input):
        assert abs(angle_diff(r.link_angle[k, 3], freudenstein(f, u, branch)[1])) <= 1e-10


def described_model():
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    m = f.model
    m.set_units(kl.LengthUnit.IN, kl.AngleUnit.RAD)
    m.set_joint_name(f.pivot, "motor")
    m.add_point(f.rocker, (80.0 / 3, 0.1), "odd \"name\"")
    t3, t4 = freudenstein(f, 0.0, -1)
    m.set_sketch_angle(f.coupler, t3)
    m.set_sketch_angle(f.rocker, t4)
    m.set_sweep(kl.SweepSettings(0, 0.0, 1.0, 10))
    m.finalize()
    return m


def assert_same_model(a, b):
    assert (a.link_count, a.joint_count, a.point_count, a.input_count) == \
        (b.link_count, b.joint_count, b.point_count, b.input_count)
    for l in range(a.link_count):
        assert a.link_name(l) == b.link_name(l)
        x, y = a.sketch_angle(l), b.sketch_angle(l)
        assert x == y or (math.isnan(x) and math.isnan(y))
    for j in range(a.joint_count):
        assert a.joint_links(j) == b.joint_links(j)  # bit for bit (17 digits)
        assert a.joint_name(j) == b.joint_name(j)
    for p in range(a.point_count):
        assert a.point_link(p) == b.point_link(p) and a.point_name(p) == b.point_name(p)
    assert a.units == b.units and a.sweep == b.sweep
    assert a.loops == b.loops


def test_writing_then_reading_gives_the_same_model(tmp_path):
    m = described_model()
    text = m.to_text()
    assert text.startswith("kinloop-model 1\n")
    again = kl.Model.read_text(text)
    assert_same_model(m, again)
    assert again.to_text() == text  # canonical: the same text again
    same_bytes = kl.Model.read_text(text.encode("utf-8"))
    assert same_bytes.to_text() == text
    path = tmp_path / "fourbar.kinloop"
    m.write_file(path)
    assert path.read_text(encoding="utf-8") == text
    from_file = kl.Model.read_file(path)
    assert_same_model(m, from_file)
    # and the models solve alike
    s, t = kl.Solver(m), kl.Solver(from_file)
    s.solve_position(0.4)
    t.solve_position(0.4)
    assert [s.link_angle(l) for l in range(4)] == [t.link_angle(l) for l in range(4)]


def test_reading_through_an_allocator_frees_everything():
    alloc = CountingAllocator()
    with kl.Model.read_text(DOCUMENTED_EXAMPLE, allocator=alloc) as m:
        kl.Solver(m).solve_position(0.5)
        assert alloc.live
    assert alloc.calls > 0 and alloc.live == {} and alloc.foreign == 0


def read_error(text):
    with pytest.raises(kl.KinloopError) as info:
        kl.Model.read_text(text)
    return info.value


def test_syntax_errors_carry_line_and_column():
    # docs/model-format.md: "expected a number ..., found 'zero'"
    e = read_error("kinloop-model 1\nlink crank\nrevolute motor ground 0 zero crank 0 0\n")
    assert e.status == kl.Status.ESYNTAX and e.status_name == kl.status_str(kl.Status.ESYNTAX)
    assert (e.line, e.column) == (3, len("revolute motor ground 0 ") + 1)
    assert "zero" in e.message and "line 3, column 25" in str(e)
    e = read_error("kinloop-model 1\nlink crank\nrevolute motor ground 0 0 rokcer 0 0\n")
    assert e.line == 3 and "rokcer" in e.message
    # no NUL allowed: the bindings refuse it before C sees the text (kinloop._args)
    e = read_error(b"kinloop-model 1\nlink cr\0ank\n")
    assert e.status == kl.Status.EINVAL and "NUL" in e.message and "kl_model_read" in e.message
    # an empty text is an error of the text as a whole: line 0 in C, None here
    e = read_error("")
    assert e.status == kl.Status.ESYNTAX and e.line is None and "empty model" in e.message


def test_model_errors_have_no_line():
    # found when finalizing: line 0 in the C struct, None here
    e = read_error("kinloop-model 1\nlink crank\nrevolute motor ground 0 0 crank 0 0\n")
    assert e.status == kl.Status.EDOF
    assert e.line is None and e.column is None
    assert "degree" in e.message


def test_file_errors(tmp_path):
    with pytest.raises(kl.KinloopError) as info:
        kl.Model.read_file(tmp_path / "no-such-file.kinloop")
    assert info.value.status == kl.Status.EIO
    assert "no-such-file.kinloop" in info.value.message
    m = described_model()
    with pytest.raises(kl.KinloopError) as info:
        m.write_file(tmp_path / "no-such-dir" / "out.kinloop")
    assert info.value.status == kl.Status.EIO
