"""Design studies through the bindings (kinloop.Study): the demo study
examples/models/flap-tucker.study read and run, runs that do not depend on
threads or splitting (include/kinloop.h, kl_study_run), summaries against
numpy's own statistics, study-file errors with line and column, the
first-order estimate against Monte Carlo, and the lifetimes of a study and
of its borrowed model."""

import ctypes
import gc
import itertools
import math
import os
import subprocess
import sys
import textwrap
import threading
import time
import weakref

import numpy as np
import pytest

import kinloop as kl
from mechanisms import CountingAllocator

MODELS = os.path.normpath(os.path.join(os.path.dirname(__file__), os.pardir, os.pardir,
                                       os.pardir, "examples", "models"))
DEMO = os.path.join(MODELS, "flap-tucker.study")
DEMO_MODEL = os.path.join(MODELS, "flap-tucker.kinloop")
if not os.path.exists(DEMO):
    pytest.skip("examples/models is not beside these bindings", allow_module_level=True)


@pytest.fixture(scope="module")
def demo():
    with kl.Study.read_file(DEMO) as st:
        yield st.prepare()


def demo_model():
    return kl.Model.read_file(DEMO_MODEL)


@pytest.fixture(scope="module")
def demo_run(demo):
    return demo.run(0, 100)


def address(pointer):
    return ctypes.cast(pointer, ctypes.c_void_p).value


# ---- the demo study ----

def test_demo_study_reads_as_its_file_says(demo):
    # the counts, names and limits written in examples/models/flap-tucker.study
    assert demo.sample_count == 2000
    assert demo.output_names == ["stroke", "mu_min", "tip_low", "torque"]
    assert demo.dimension_names == [
        "crank_pin a x", "rocker_pin a x", "rocker_pin b x", "pivot b x", "pivot b y",
        "arm_pin a x", "plate_pin a x", "rail a y", "tucker tip x"]
    assert "2000 samples, 4 outputs, 9 dimensions" in repr(demo)
    # its model is examples/models/flap-tucker.kinloop, read relative to the study
    m = demo.model
    plain = kl.Model.read_file(DEMO_MODEL)
    assert m.borrowed and not plain.borrowed
    assert m.to_text() == plain.to_text()


def test_demo_run_shapes_and_dimensions(demo, demo_run):
    values, status, dims = demo_run
    assert values.shape == (100, 4) and status.shape == (100,) and dims.shape == (100, 9)
    assert status.dtype == np.intc
    # every sample of these tolerances assembles (a fact of this demo, seen
    # in its summary), so every value is there
    assert (status == kl.SampleStatus.OK).all() and np.isfinite(values).all()
    # the dimensions drawn are the nominal geometry of flap-tucker.kinloop
    # within the study's tolerances: "rail a y" evenly within 260 +- 0.2;
    # the pin holes normal with three standard deviations of 0.05, so a
    # mean of 100 within 4 standard errors of the nominal
    m = demo.model
    rail = dims[:, demo.dimension_names.index("rail a y")]
    assert ((rail >= 260 - 0.2) & (rail <= 260 + 0.2)).all()
    assert rail.std(ddof=1) > 0.2 / math.sqrt(3) / 2  # spread over the band
    nominal = {"crank_pin a x": m.joint_links(m.find_joint("crank_pin"))[1][0],
               "pivot b x": m.joint_links(m.find_joint("pivot"))[2][0],
               "tucker tip x": m.point_link(m.find_point("tucker tip"))[1][0]}
    assert nominal == {"crank_pin a x": 60.0, "pivot b x": 220.0, "tucker tip x": 100.0}
    for name, centre in nominal.items():
        column = dims[:, demo.dimension_names.index(name)]
        sigma = (0.1 if name == "tucker tip x" else 0.05) / 3
        assert abs(column.mean() - centre) <= 4 * sigma / math.sqrt(len(column)), name
        assert 0.7 * sigma <= column.std(ddof=1) <= 1.3 * sigma, name


def test_nominal_stroke_is_the_swing_a_solver_of_the_view_finds(demo):
    # the study's nominal "stroke" is "swing slide rail" over the model's
    # sweep (motor 0 to 360 degrees in 72 steps): the same figure from a
    # Solver made on the borrowed model, through Solver.output_range
    m = demo.model
    sweep = m.sweep
    s = kl.Solver(m)
    s.solve_position(sweep.from_)
    r = s.output_range(sweep.input, sweep.from_, sweep.to, sweep.steps,
                       kl.Output.slide(m.find_joint("rail")))
    nominal = demo.summarize("stroke", *demo.run(0, 1)[:2]).nominal
    assert r.max - r.min == pytest.approx(nominal, abs=1e-9)
    # the file's claim: "is the plate's stroke still 213 +- 1.5 mm"
    assert abs(nominal - 213) <= 1.5


# ---- runs depend on the seed and the sample alone (kl_study_run) ----

def test_threads_do_not_change_the_numbers(demo, demo_run):
    one = demo.run(0, 100, threads=1)
    two = demo.run(0, 100, threads=2)
    for a, b, c in zip(one, two, demo_run):
        assert a.tobytes() == b.tobytes() == c.tobytes()  # bit for bit


def test_split_runs_give_the_same_samples(demo, demo_run):
    first = demo.run(0, 50, threads=2)
    second = demo.run(50, 50, threads=1)
    for part_a, part_b, whole in zip(first, second, demo_run):
        assert np.concatenate([part_a, part_b]).tobytes() == whole.tobytes()
    # count=None runs to the last sample
    tail = demo.run(1990)
    assert len(tail.sample_status) == 10
    assert tail.values.tobytes() == demo.run(1990, 10).values.tobytes()


def test_run_range_errors(demo):
    # kl_study_run: KL_EINVAL for a bad range, the call and its range named
    for first, count in ((0, 2001), (-1, 5), (1999, 2), (0, -1)):
        with pytest.raises(kl.KinloopError) as info:
            demo.run(first, count)
        assert info.value.status == kl.Status.EINVAL
        assert "run(%d, %d, 0)" % (first, count) in info.value.message
    # more samples than the bindings make room for in one call
    with pytest.raises(kl.KinloopError) as info:
        demo.run(0, kl.MAX_STEPS + 1)
    assert info.value.status == kl.Status.ETOOLARGE
    empty = demo.run(2000)
    assert empty.values.shape == (0, 4) and empty.dims.shape == (0, 9)


# ---- summaries against numpy ----

def reference_summary(values, status, lower, upper):
    """numpy's statistics over what include/kinloop.h says is summarized:
    the samples that assembled and have a value."""
    usable = (status != kl.SampleStatus.NO_ASSEMBLY) & ~np.isnan(values)
    v = values[usable]
    ok = usable & (status == kl.SampleStatus.OK)
    within = ok & (values >= lower) & (values <= upper) if not math.isnan(lower) else ok
    return v, int(within.sum()), int((status != kl.SampleStatus.NO_ASSEMBLY).sum())


@pytest.mark.parametrize("output", ["stroke", "mu_min", "tip_low", "torque"])
def test_summary_matches_numpy(demo, demo_run, output):
    values, status, _ = demo_run
    k = demo.output_names.index(output)
    s = demo.summarize(output, values, status)
    assert repr(s) == repr(demo.summarize(k, values, status))  # by name or index (NaN-safe)
    column = values[:, k]
    v, within, assembled = reference_summary(column, status, s.lower, s.upper)
    assert s.samples == 100 and s.assembled == assembled == 100 and s.limited == 0
    assert s.within_limits == within
    # numpy.mean, numpy.std with ddof=1 (the header's n - 1), min, max
    assert s.mean == pytest.approx(np.mean(v), rel=1e-13)
    assert s.std == pytest.approx(np.std(v, ddof=1), rel=1e-10)
    assert (s.min, s.max) == (np.min(v), np.max(v))
    # numpy.percentile's default method is linear interpolation between the
    # closest ranks, (n - 1) q, as include/kinloop.h says of kl_study_summary
    for q, got in ((1, s.p01), (5, s.p05), (50, s.p50), (95, s.p95), (99, s.p99)):
        assert got == pytest.approx(np.percentile(v, q), rel=1e-13, abs=1e-12), q
    # the worst: furthest outside the limits, or from the nominal without
    # them (include/kinloop.h)
    if s.has_limits:
        badness = np.maximum(s.lower - column, column - s.upper)
    else:
        badness = np.abs(column - s.nominal)
    assert s.worst_sample == int(np.argmax(badness))
    assert s.worst == column[s.worst_sample]


def test_summary_limits_are_the_files(demo, demo_run):
    # the 'limit' statements of flap-tucker.study; torque has none
    values, status, _ = demo_run
    limits = {name: (s.has_limits, s.lower, s.upper) for name, s in
              ((n, demo.summarize(n, values, status)) for n in demo.output_names)}
    assert limits["stroke"] == (True, 212.2, 215.2)
    assert limits["mu_min"] == (True, 45, 180)
    assert limits["tip_low"] == (True, 44.5, 45.7)
    has, lower, upper = limits["torque"]
    assert not has and math.isnan(lower) and math.isnan(upper)
    # no first-order estimate of an effort (include/kinloop.h)
    assert math.isnan(demo.summarize("torque", values, status).first_order_std)


def test_summary_skips_what_did_not_assemble(demo, demo_run):
    # statuses are the caller's to give: marking samples as not assembled
    # (and their values NaN, as kl_study_run writes them) leaves them out
    values, status, _ = demo_run
    values, status = values.copy(), status.copy()
    dropped = np.arange(100) % 3 == 0
    status[dropped] = kl.SampleStatus.NO_ASSEMBLY
    values[dropped] = np.nan
    s = demo.summarize("mu_min", values, status)
    v = values[~dropped, 1]
    assert s.samples == 100 and s.assembled == len(v) == 66
    assert s.mean == pytest.approx(np.mean(v), rel=1e-13)
    assert s.p50 == pytest.approx(np.percentile(v, 50), rel=1e-13)
    none = demo.summarize("mu_min", values[:1], status[:1])
    assert none.assembled == 0 and none.worst_sample == -1 and math.isnan(none.mean)


def test_summarize_argument_errors(demo, demo_run):
    values, status, _ = demo_run
    for bad_values, bad_status in ((values[:, :3], status), (values, status[:99]),
                                   (values.ravel(), status)):
        with pytest.raises(kl.KinloopError) as info:
            demo.summarize(0, bad_values, bad_status)
        assert info.value.status == kl.Status.EINVAL
    with pytest.raises(kl.KinloopError) as info:
        demo.summarize("strok", values, status)
    assert info.value.status == kl.Status.EID and "stroke" in info.value.message
    with pytest.raises(kl.KinloopError) as info:  # kl_study_summarize: KL_EID
        demo.summarize(4, values, status)
    assert info.value.status == kl.Status.EID


def test_first_order_std_predicts_the_monte_carlo_std(demo):
    # first-order propagation (the root-sum-square of sensitivity times
    # standard deviation, as in the GUM's law of propagation of uncertainty,
    # JCGM 100, from memory) against the spread of 2000 samples. The sample
    # std's own relative standard error is 1/sqrt(2 (n - 1)), 1.6% here; the
    # 15% leaves the rest to the linearization of these small tolerances.
    values, status, _ = demo.run()
    for output in ("stroke", "mu_min", "tip_low"):
        s = demo.summarize(output, values, status)
        assert s.samples == 2000 and s.assembled == 2000
        assert abs(s.first_order_std - s.std) <= 0.15 * s.std, (output, s)


# ---- grid studies ----

GRID = """\
kinloop-study 1
model flap-tucker.kinloop
grid joint crank_pin a x from 59.5 to 60.5 steps 2
grid joint pivot b x from 219 to 221 steps 1
output stroke swing slide rail
"""


def test_grid_samples_every_combination_and_matches_an_edited_model():
    # geometry chosen for this test: the demo's crank and pivot moved by up
    # to a millimetre; each grid point is checked against the model file
    # edited by hand to the same numbers and swept by a Solver
    with kl.Study.read_text(GRID, demo_model()).prepare() as st:
        assert st.sample_count == 3 * 2
        values, status, dims = st.run()
        assert (status == kl.SampleStatus.OK).all()
        expected = set(itertools.product([59.5, 60.0, 60.5], [219.0, 221.0]))
        assert set(map(tuple, dims.tolist())) == expected
        # no first-order estimate for a grid (include/kinloop.h)
        assert math.isnan(st.summarize(0, values, status).first_order_std)
    with open(DEMO_MODEL, encoding="utf-8") as f:
        model_text = f.read()
    for (crank_x, pivot_x), stroke in zip(dims, values[:, 0]):
        edited = model_text.replace("crank 60 0", "crank %r 0" % crank_x).replace(
            "ground 220 0", "ground %r 0" % pivot_x)
        assert edited.count("%r" % crank_x) >= 1
        m = kl.Model.read_text(edited)
        sweep = m.sweep
        s = kl.Solver(m)
        s.solve_position(sweep.from_)
        r = s.output_range(sweep.input, sweep.from_, sweep.to, sweep.steps,
                           kl.Output.slide(m.find_joint("rail")))
        assert r.max - r.min == pytest.approx(stroke, abs=1e-9)


LONGER_CRANKS = """\
kinloop-study 1
model flap-tucker.kinloop
grid joint crank_pin a x from 60 to 140 steps 4
output stroke swing slide rail
output tip_low at 270 y "tucker tip"
limit stroke 0 1000
"""


def test_samples_stopped_at_a_limit_are_summarized_as_the_header_says():
    # geometry chosen for this test: the demo's crank lengthened until the
    # linkage no longer turns through the whole sweep. include/kinloop.h:
    # a LIMITED sample assembled, has its outputs over the reachable part
    # (NaN for an input value beyond it), and is never within limits
    with kl.Study.read_text(LONGER_CRANKS, demo_model()).prepare() as st:
        values, status, _ = st.run()
        limited = status == kl.SampleStatus.LIMITED
        assert limited.any() and (status != kl.SampleStatus.NO_ASSEMBLY).all()
        assert np.isfinite(values[:, 0]).all()  # a swing over what it reached
        assert np.isnan(values[limited, 1]).any()  # 270 degrees out of reach
        for k in (0, 1):
            s = st.summarize(k, values, status)
            column = values[:, k]
            v, within, assembled = reference_summary(column, status, s.lower, s.upper)
            assert (s.assembled, s.limited) == (assembled, int(limited.sum()))
            assert s.within_limits == within
            assert s.mean == pytest.approx(np.mean(v), rel=1e-13)
            assert s.p95 == pytest.approx(np.percentile(v, 95), rel=1e-13)


# ---- errors in study files ----

def study_error(text, model=None):
    with pytest.raises(kl.KinloopError) as info:
        kl.Study.read_text(text, model or demo_model())
    return info.value


def test_syntax_errors_carry_line_and_column():
    e = study_error("kinloop-study 1\nmodel flap-tucker.kinloop\nsamples 10\n"
                    "vary joint crank_pin a z tolerance 0.05 normal\n")
    assert e.status == kl.Status.ESYNTAX
    assert (e.line, e.column) == (4, len("vary joint crank_pin a ") + 1)
    assert "'z'" in e.message and "line 4, column 24" in str(e)
    e = study_error("kinloop-study 1\nmodel flap-tucker.kinloop\nsamples 10\n"
                    "vary joint crank_pn a x tolerance 0.05 normal\n")
    assert e.status == kl.Status.ESYNTAX and e.line == 4 and "crank_pn" in e.message
    e = study_error("kinloop-model 1\n")
    assert e.status == kl.Status.ESYNTAX and (e.line, e.column) == (1, 1)


def test_whole_study_errors_have_no_line():
    # found once every statement is read: line 0 in the C struct, None here
    e = study_error("kinloop-study 1\nmodel flap-tucker.kinloop\nsamples 10\n")
    assert e.status == kl.Status.ESYNTAX and e.line is None and "output" in e.message


def test_model_file_errors(tmp_path):
    # a study file's model is looked for beside it
    (tmp_path / "lone.study").write_text("kinloop-study 1\nmodel flap-tucker.kinloop\n")
    with pytest.raises(kl.KinloopError) as info:
        kl.Study.read_file(tmp_path / "lone.study")
    e = info.value
    assert e.status == kl.Status.EIO and (e.line, e.column) == (2, 7)
    assert "flap-tucker.kinloop" in e.message
    # a model with an error of its own: the study's line, the model's place
    (tmp_path / "broken.kinloop").write_text("kinloop-model 1\nlink crank\nwobble 3\n")
    (tmp_path / "broken.study").write_text("kinloop-study 1\nmodel broken.kinloop\n")
    with pytest.raises(kl.KinloopError) as info:
        kl.Study.read_file(tmp_path / "broken.study")
    e = info.value
    assert e.status == kl.Status.ESYNTAX and (e.line, e.column) == (2, 7)
    assert "line 3, column 1" in e.message
    # a file's statements that need the model before it is named
    (tmp_path / "late.study").write_text("kinloop-study 1\nsamples 10\n"
                                         "output stroke swing slide rail\n"
                                         "model flap-tucker.kinloop\n")
    with pytest.raises(kl.KinloopError) as info:
        kl.Study.read_file(tmp_path / "late.study")
    assert info.value.status == kl.Status.ESYNTAX and info.value.line == 3
    with pytest.raises(kl.KinloopError) as info:
        kl.Study.read_file(tmp_path / "no-such.study")
    assert info.value.status == kl.Status.EIO and "no-such.study" in info.value.message


def test_nominal_that_cannot_move_through_the_sweep():
    # the demo's crank made so long (geometry chosen for this test) that
    # crank + ground exceed coupler + rocker, 140 + 220 > 200 + 150: the
    # loop cannot close with the crank at 180 degrees, inside the sweep.
    # Reading solves nothing; prepare says why, and run waits for it.
    with open(DEMO_MODEL, encoding="utf-8") as f:
        text = f.read().replace("crank 60 0", "crank 140 0")
    st = kl.Study.read_text("kinloop-study 1\nmodel long-crank.kinloop\nsamples 5\n"
                            "output stroke swing slide rail\n", kl.Model.read_text(text))
    assert st.model_path == "long-crank.kinloop" and st.error == ""
    with pytest.raises(kl.KinloopError) as info:
        st.run()
    assert info.value.status == kl.Status.ESTAGE
    with pytest.raises(kl.KinloopError) as info:
        st.prepare()
    e = info.value
    assert e.status == kl.Status.ENOASSEMBLY
    assert e.line is None and "nominal" in e.message and e.message == st.error
    st.close()


def test_a_study_holds_the_model_it_is_read_against():
    # the model, read with a counting allocator hook, closed before the
    # study is prepared and run: the study still has it, and every block
    # comes back only when the study goes (include/kinloop.h, kl_study_read)
    alloc = CountingAllocator()
    with open(DEMO_MODEL, encoding="utf-8") as f:
        m = kl.Model.read_text(f.read(), allocator=alloc)
    st = kl.Study.read_text(GRID, m)
    assert st.model_path == "flap-tucker.kinloop"
    m.close()
    del m
    gc.collect()
    assert alloc.live  # the study's, and its model's
    values, status, _ = st.prepare().run()
    with kl.Study.read_text(GRID, demo_model()).prepare() as again:
        assert values.tobytes() == again.run()[0].tobytes()
    assert st.model.link_count == kl.Model.read_file(DEMO_MODEL).link_count
    st.close()
    assert alloc.live == {} and alloc.foreign == 0


# ---- lifetimes: the study, and its borrowed model ----

@pytest.fixture
def counted_frees(monkeypatch):
    """Counts kl_study_free calls and records every model kl_model_free frees."""
    calls = {"study": [], "model": []}
    study_free, model_free = kl.raw.lib.kl_study_free, kl.raw.lib.kl_model_free

    def count_study(ptr):
        calls["study"].append(address(ptr))
        study_free(ptr)

    def count_model(ptr):
        calls["model"].append(address(ptr))
        model_free(ptr)

    monkeypatch.setattr(kl.raw.lib, "kl_study_free", count_study)
    monkeypatch.setattr(kl.raw.lib, "kl_model_free", count_model)
    return calls


def test_context_manager_and_close_free_once(counted_frees):
    with kl.Study.read_file(DEMO) as st:
        study = address(st._handle)
    assert st.closed and counted_frees["study"] == [study]
    with pytest.raises(ValueError):
        st.sample_count
    st.close()  # again: nothing happens
    del st
    gc.collect()
    assert counted_frees["study"] == [study]


def test_garbage_collection_frees_once(counted_frees):
    st = kl.Study.read_file(DEMO)
    study = address(st._handle)
    ref = weakref.ref(st)
    del st
    gc.collect()
    assert ref() is None and counted_frees["study"] == [study]


def test_the_borrowed_model_is_never_freed_by_python(counted_frees):
    st = kl.Study.read_file(DEMO)
    m = st.model
    model = address(m._handle)
    assert model == address(kl.raw.lib.kl_study_model(st._handle))
    s = kl.Solver(m)
    s.solve_position(0.0)
    # the view refuses what would change the study's model, as the library
    # refuses changing a finalized one
    for change in (lambda: m.add_link("more"), lambda: m.set_joint_name(0, "x"),
                   lambda: m.set_sketch_angle(1, 0.5)):
        with pytest.raises(kl.KinloopError) as info:
            change()
        assert info.value.status == kl.Status.ESTATE
    m.finalize()  # finalized already: nothing to do, as in C
    # closing the view frees nothing: its solver keeps working
    m.close()
    assert m.closed and not s.closed
    assert s.solve_position(0.0) == kl.Status.OK
    gc.collect()
    assert model not in counted_frees["model"]
    again = st.model
    assert again is not m and not again.closed
    assert kl.Solver(again).solve_position(0.0) == kl.Status.OK
    del m, s, again
    gc.collect()
    assert model not in counted_frees["model"] and counted_frees["study"] == []
    st.close()
    assert counted_frees["study"] == [address(st._ptr)]
    assert model not in counted_frees["model"]


def test_the_view_keeps_the_study_alive(counted_frees):
    def view_only():
        return kl.Study.read_file(DEMO).model

    m = view_only()
    gc.collect()
    assert counted_frees["study"] == []
    s = kl.Solver(m)
    assert s.solve_position(0.0) == kl.Status.OK  # the study is still there
    del m
    gc.collect()
    assert counted_frees["study"] == []  # the solver keeps the view
    del s
    gc.collect()
    assert len(counted_frees["study"]) == 1 and counted_frees["model"] == []


def test_closing_the_study_closes_its_view_not_its_solvers(counted_frees):
    st = kl.Study.read_file(DEMO)
    m = st.model
    s = kl.Solver(m)
    s.solve_position(0.0)
    assert s.solve_position(0.3) == kl.Status.OK
    before = s.row()
    st.close()
    assert m.closed and st.closed and not s.closed
    with pytest.raises(ValueError, match="the model is closed"):
        m.link_count
    with pytest.raises(ValueError, match="the study is closed"):
        st.model
    del m, st
    gc.collect()
    # the library keeps the study's model for the solver: the same position
    # again (to the solver's tolerance; the start differs by the last solve)
    s.solve_position(0.0)
    assert s.solve_position(0.3) == kl.Status.OK
    np.testing.assert_allclose(s.row(), before, rtol=0, atol=1e-9)
    assert len(counted_frees["study"]) == 1 and counted_frees["model"] == []


def test_a_study_cannot_be_closed_while_it_runs():
    st = kl.Study.read_file(DEMO).prepare()
    done = []
    worker = threading.Thread(target=lambda: done.append(st.run(0, 400, threads=1)))
    worker.start()
    deadline = time.monotonic() + 30
    while not st._runs and not done and time.monotonic() < deadline:
        time.sleep(0.0005)
    assert st._runs, "the run ended before this thread saw it"
    with pytest.raises(RuntimeError):  # ctypes lets go of the GIL in the C call
        st.close()
    worker.join()
    assert len(done) == 1 and len(done[0].sample_status) == 400
    st.close()


def test_exit_with_live_handles_is_clean():
    # a study, its view and a solver of it left to the interpreter's exit
    script = textwrap.dedent("""
        import sys
        sys.path[:0] = [%r]
        import kinloop as kl
        st = kl.Study.read_file(%r)
        view = st.model
        solver = kl.Solver(view)
        solver.solve_position(0.0)
        st.kept = solver   # a cycle: study -> solver -> view -> study
        print("done")
    """ % (os.path.dirname(os.path.dirname(kl.__file__)), DEMO))
    out = subprocess.run([sys.executable, "-B", "-c", script], capture_output=True,
                         text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "done"


def test_study_cannot_be_made_directly():
    with pytest.raises(TypeError):
        kl.Study()
