"""Cleanup: context managers and finalizers free every model and solver
exactly once, whatever the order Python drops them in; a solver keeps
working after its model is closed (the library keeps the model for it,
include/kinloop.h, kl_model_free). A counting allocator hook
(kl_model_new_with_alloc) sees every block: none may stay live, and none
may be freed twice."""

import ctypes
import gc
import os
import subprocess
import sys
import textwrap
import weakref

import pytest

import kinloop as kl
from mechanisms import (CountingAllocator, angle_diff, build_fourbar, freudenstein,
                        sketch_branch)


def solved_fourbar(model):
    f = build_fourbar(40, 120, 80, 100, model=model)
    s = kl.Solver(f.model)
    sketch_branch(s, f, 1.0, +1)
    s.solve_position(1.0)
    return f, s


def assert_all_freed_once(alloc):
    assert alloc.calls > 0
    assert alloc.live == {}
    assert alloc.foreign == 0  # no free (or resize) of a block not held


def assert_solves_like_freudenstein(s, f):
    # Freudenstein's equation (half-angle form, recalled), as test_position
    for t2 in (0.3, 1.7, 4.0):
        assert s.solve_position(t2) == kl.Status.OK
        t3, t4 = freudenstein(f, t2, +1)
        assert abs(angle_diff(s.link_angle(f.coupler), t3)) <= 1e-10
        assert abs(angle_diff(s.link_angle(f.rocker), t4)) <= 1e-10


def test_a_solver_keeps_solving_after_its_model_is_closed():
    alloc = CountingAllocator()
    with kl.Model(allocator=alloc) as m:
        f, s = solved_fourbar(m)
    assert m.closed and not s.closed
    m.close()  # again: nothing happens
    with pytest.raises(ValueError, match="the model is closed"):
        m.link_count
    with pytest.raises(ValueError, match="the model is closed"):
        kl.Solver(m)
    del m, f.model
    gc.collect()
    assert alloc.live  # the library keeps the model for the solver
    assert_solves_like_freudenstein(s, f)
    twin, modes = s.copy(), s.find_assemblies([1.0])  # solvers of the same model
    assert twin.link_angle(f.rocker) == s.link_angle(f.rocker) and len(modes) == 2
    assert s.sweep(0, 0.0, 1.0, 10).steps_done == 11
    s.close()
    del twin, modes
    gc.collect()
    assert_all_freed_once(alloc)


def test_solver_context_manager_leaves_the_model_open():
    alloc = CountingAllocator()
    with kl.Model(allocator=alloc) as m:
        build_fourbar(40, 120, 80, 100, model=m)
        held = len(alloc.live)
        with kl.Solver(m) as s:
            assert len(alloc.live) > held
        assert s.closed and not m.closed
        assert len(alloc.live) == held
    assert_all_freed_once(alloc)


def test_garbage_collection_frees_everything():
    alloc = CountingAllocator()

    def make():
        m = kl.Model(allocator=alloc)
        solved_fourbar(m)
        return weakref.ref(m)

    ref = make()
    gc.collect()
    assert ref() is None
    assert_all_freed_once(alloc)


def test_a_solver_keeps_its_model_alive():
    alloc = CountingAllocator()

    def make_solver():
        return solved_fourbar(kl.Model(allocator=alloc))[1]

    s = make_solver()
    gc.collect()
    assert alloc.live and not s.model.closed
    assert s.solve_position(1.2) == kl.Status.OK  # the model is still there
    address = ctypes.cast(kl.raw.lib.kl_solver_model(s._handle), ctypes.c_void_p).value
    assert address == ctypes.cast(s.model._handle, ctypes.c_void_p).value
    del s
    gc.collect()
    assert_all_freed_once(alloc)


def test_a_cycle_frees_everything_once():
    # in a reference cycle the collector may finalize the model first; the
    # library then keeps the model until the solver goes
    alloc = CountingAllocator()

    def make_cycle():
        m = kl.Model(allocator=alloc)
        f, s = solved_fourbar(m)
        m.solver_kept = s  # model -> solver -> model
        return weakref.ref(m)

    ref = make_cycle()
    gc.collect()
    assert ref() is None
    assert_all_freed_once(alloc)


def test_in_place_solver_takes_nothing_from_the_allocator():
    alloc = CountingAllocator()
    with kl.Model(allocator=alloc) as m:
        f, heap = solved_fourbar(m)
        calls = alloc.calls
        assert m.solver_bytes > 0
        placed = kl.Solver(m, in_place=True)
        assert alloc.calls == calls
        sketch_branch(placed, f, 1.0, +1)
        placed.solve_position(1.0)
        assert placed.link_angle(f.rocker) == heap.link_angle(f.rocker)
    heap.close()
    placed.close()  # the model's last holder: now it goes
    assert_all_freed_once(alloc)


def test_every_failed_allocation_is_clean():
    # fail the Nth allocation for every N until the whole job succeeds: each
    # failure is KL_ENOMEM, and afterwards nothing stays live
    n = 1
    while True:
        alloc = CountingAllocator(fail_at=n)
        try:
            with kl.Model(allocator=alloc) as m:
                solved_fourbar(m)
        except kl.KinloopError as e:
            assert e.status == kl.Status.ENOMEM, (n, e)
            gc.collect()
            assert alloc.live == {} and alloc.foreign == 0, n
            n += 1
            continue
        assert_all_freed_once(alloc)
        assert alloc.calls < n  # the job needed fewer allocations than n
        break
    assert n > 2


def test_exit_with_live_handles_is_clean():
    # handles left to the interpreter's exit: finalizers run solvers first
    script = textwrap.dedent("""
        import sys
        sys.path[:0] = [%r, %r]
        import kinloop as kl
        from mechanisms import build_fourbar
        f = build_fourbar(40, 120, 80, 100)
        solvers = [kl.Solver(f.model) for _ in range(3)]
        f.model.kept = solvers
        print("done")
    """ % (os.path.dirname(os.path.dirname(kl.__file__)), os.path.dirname(__file__)))
    out = subprocess.run([sys.executable, "-B", "-c", script], capture_output=True,
                         text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "done"
