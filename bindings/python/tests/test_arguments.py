"""The argument rule (kinloop._args): what the caller gives reaches C
exactly or is refused with KinloopError EINVAL naming the function and the
argument, and a refused call changes nothing. ctypes alone would wrap an
int modulo 2**32 (link 2**32 + 3 would read link 3), cut a string at its
first NUL, and store 2**32 + 5 as 5 in a struct field."""

import math
import os
import sys

import numpy as np
import pytest

import kinloop as kl
from mechanisms import build_fourbar, sketch_branch

INT_MAX = 2**31 - 1


def refused(fn, *args, **kwargs):
    with pytest.raises(kl.KinloopError) as info:
        fn(*args, **kwargs)
    assert info.value.status == kl.Status.EINVAL, info.value
    return info.value.message


@pytest.fixture
def solved():
    f = build_fourbar(40, 120, 80, 100)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 1.0, +1)
    s.solve_position(1.0)
    return f, s


@pytest.mark.parametrize("bad", [2**32 + 3, -2**32 + 3, INT_MAX + 1, -INT_MAX - 2, 2**64])
def test_an_int_out_of_range_is_refused_not_wrapped(solved, bad):
    f, s = solved
    message = refused(s.link_angle, bad)
    assert "kl_link_angle" in message and "link" in message and str(bad) in message
    refused(f.model.joint_kind, bad)
    refused(s.point_position, bad)


def test_ints_at_the_ends_of_the_range_reach_c(solved):
    f, s = solved
    assert math.isnan(s.link_angle(INT_MAX)) and math.isnan(s.link_angle(-INT_MAX - 1))
    with pytest.raises(kl.KinloopError) as info:  # the library's own answer
        f.model.joint_kind(INT_MAX)
    assert info.value.status == kl.Status.EID


def test_whole_floats_and_numpy_ints_are_ints(solved):
    f, s = solved
    assert s.link_angle(3.0) == s.link_angle(3) == s.link_angle(np.int64(3)) == \
        s.link_angle(np.float32(3))
    message = refused(s.link_angle, 2.5)
    assert "whole number" in message and "2.5" in message
    for bad in (math.nan, math.inf, np.float64(0.5), "3", None, 3j):
        refused(s.link_angle, bad)


def test_a_builder_refused_adds_nothing():
    f = build_fourbar(40, 120, 80, 100, finalize=False)
    m = f.model
    joints = m.joint_count
    refused(m.add_revolute, 2**32, (0, 0), 2**32 + 1, (0, 0))  # would join ground to link 1
    refused(m.add_revolute, kl.GROUND, (0, 0), 1.5, (0, 0))
    refused(m.add_input, 2**32 + f.pivot)
    refused(m.add_loop, [f.pivot, 2**32 + f.crank_pin])
    assert m.joint_count == joints and m.input_count == 1


def test_a_double_must_be_exactly_a_double():
    m = kl.Model()
    crank = m.add_link("crank")
    message = refused(m.add_point, crank, (2**53 + 1, 0))  # would round to 2**53
    assert "kl_add_point" in message and "xy[0]" in message
    refused(m.add_point, crank, (0, 10**400))  # beyond any double
    refused(m.add_point, crank, (0, "1"))
    refused(m.add_point, crank, (0, 1j))
    refused(m.add_point, crank, (1, 2, 3))
    refused(m.add_point, crank, 5)
    assert m.point_count == 0
    # NaN and infinities are numbers: the library has a status for them
    with pytest.raises(kl.KinloopError) as info:
        m.add_point(crank, (math.nan, 0))
    assert info.value.status == kl.Status.ENONFINITE
    assert m.add_point(crank, (2**53, np.float32(0.1))) == 0  # exact, as given


def test_inputs_and_tolerances_go_under_the_rule(solved):
    f, s = solved
    before = s.input_value(0)
    refused(s.solve_position, [2**53 + 1])
    refused(s.solve_position, "1")
    refused(s.solve_velocity, [1.0, 2.0])
    assert s.input_value(0) == before
    dims = [kl.Dimension.joint_b(f.rocker_pin, "x")]
    refused(s.output_tolerance_stack, kl.Output.link_angle(f.rocker), dims, [10**400])


def test_strings_without_nul_and_encodable(tmp_path):
    m = kl.Model()
    message = refused(m.add_link, "a\0b")  # ctypes would make it "a"
    assert "kl_add_link" in message and "name" in message and "NUL" in message
    refused(m.add_link, b"a\0b")
    refused(m.add_link, "\ud800")  # a lone surrogate is no UTF-8
    refused(m.add_link, 42)
    assert m.link_count == 1
    assert m.add_link(b"bytes") == 1 and m.add_link("\u00e9") == 2
    refused(m.find_link, "bytes\0")
    m = build_fourbar(40, 120, 80, 100).model
    path = tmp_path / "x.kinloop"
    m.write_file(path)
    message = refused(kl.Model.read_file, str(path) + "\0junk")  # would read x.kinloop
    assert "kl_model_read_file" in message and "path" in message
    refused(m.write_file, str(tmp_path / "y.kinloop\0z"))
    assert not os.path.exists(tmp_path / "y.kinloop")
    refused(kl.Model.read_text, "kinloop-model 1\n\0")
    refused(kl.Model.read_text, None)  # no text at all, not an empty one
    refused(kl.Model.read_text, None, allocator=lambda ptr, old, new: 0)


def test_struct_fields_go_under_the_rule(solved):
    f, s = solved
    message = refused(s.set_options, max_iterations=2**32 + 5)  # would store 5
    assert "max_iterations" in message and "kl_solver_set_options" in message
    refused(s.set_options, tolerance="1e-9")
    assert s.options == kl.Options()
    refused(s.output_value, kl.Output(kl.OutputKind.LINK_ANGLE, 2**32 + f.rocker))
    refused(s.output_value, kl.Output(kl.OutputKind.LINK_ANGLE, 1.5))
    refused(s.input_effort, [kl.Load.torque_on(f.rocker, 10**400)])
    refused(s.input_effort, [kl.Load(kl.LoadKind.TORQUE, 2**32 + f.rocker, torque=1.0)])
    m = build_fourbar(40, 120, 80, 100, finalize=False).model
    refused(m.set_sweep, kl.SweepSettings(0, 0.0, 1.0, 2**32 + 4))
    refused(m.set_sweep, object())  # no fields at all


def test_sweeps_and_ranges_go_under_the_rule(solved):
    f, s = solved
    refused(s.sweep, 0, 0.0, 1.0, 2**32 + 4)
    refused(s.sweep, 2**32, 0.0, 1.0, 4)
    refused(s.output_range, 0, 0.0, 1.0, 2**32 + 4, kl.Output.link_angle(f.rocker))
    assert s.input_value(0) == 1.0


def test_study_runs_never_hand_c_a_wrapped_range():
    study = os.path.join(os.path.dirname(__file__), os.pardir, os.pardir, os.pardir,
                         "examples", "models", "flap-tucker.study")
    with kl.Study.read_file(study) as st:
        for first, count in ((2**64, 5), (0, 2**64), (-2**63 - 1, 1), (0.5, 1)):
            message = refused(st.run, first, count)
            assert "kl_study_run" in message
        refused(st.run, 0, 1, threads=2**32 + 1)
        refused(st.output_name, 2**32)


def test_study_ranges_that_fit_a_long_but_wrap_in_c_are_refused():
    """Values a C long holds exactly, so the argument rule passes them; the
    library checks first + count without overflow (it once wrapped, ran
    samples that do not exist and wrote past the arrays)."""
    study = os.path.join(os.path.dirname(__file__), os.pardir, os.pardir, os.pardir,
                         "examples", "models", "flap-tucker.study")
    with kl.Study.read_file(study) as st:
        st.prepare()
        n = st.sample_count
        for first, count in ((sys.maxsize - 5, 10), (n, 1), (n + 1, 0)):
            message = refused(st.run, first, count)
            assert "run(%d, %d, 0)" % (first, count) in message
        # counts the bindings could not make room for never reach C
        for first, count in ((10, sys.maxsize), (0, sys.maxsize), (sys.maxsize, sys.maxsize)):
            with pytest.raises(kl.KinloopError) as info:
                st.run(first, count)
            assert info.value.status == kl.Status.ETOOLARGE
        assert st.run(n - 1, 1).sample_status.shape == (1,)


def test_steps_beyond_the_limit_are_too_large(solved):
    """One step limit (KL_MAX_STEPS, 10^7) for every sweep, named in the
    message; values within an int that C would otherwise take."""
    f, s = solved
    for call in (lambda: s.sweep(0, 0.0, 1.0, 10**7 + 1),
                 lambda: s.output_range(0, 0.0, 1.0, 2**31 - 1, kl.Output.link_angle(f.rocker))):
        with pytest.raises(kl.KinloopError) as info:
            call()
        assert info.value.status == kl.Status.ETOOLARGE
        assert "at most 10000000" in info.value.message
    assert s.input_value(0) == 1.0


def test_a_name_given_as_bytes_that_are_not_utf8_writes_back():
    """A name given as bytes reaches C as it is; the written model reads
    its non-UTF-8 byte as U+FFFD, as every string from C does (the
    bindings fuzzer found to_text raising UnicodeDecodeError here)."""
    with kl.Model() as m:
        m.add_link(b"arm\xff")
        text = m.to_text()
    assert "arm\ufffd" in text
