"""The sweep benchmark of the Python binding (issue 19, target 4): a sweep
of 3600 steps through Solver.sweep against the same sweep from C
(kl_solver_sweep_rows, by kinloop-sweep-bench), both measured in this run.
Prints the ratio; never fails on time (timings are noisy).

    PYTHONPATH=build/bindings/python /usr/bin/python3 \\
        bindings/python/tests/bench_sweep.py [BUILD_DIR]

BUILD_DIR (default: build) holds bindings/kinloop-sweep-bench. The model
is the servo-index demo's slider-crank, its crank swept over one turn
(a full turn ends where it began, so every repeat starts alike)."""

import math
import os
import statistics
import subprocess
import sys
import time

import kinloop as kl

HERE = os.path.dirname(os.path.abspath(__file__))
MODEL = os.path.join(HERE, "..", "..", "..", "examples", "models", "servo-index.kinloop")
STEPS, REPEATS, INPUT, FROM, TO = 3600, 41, 0, 0.0, 2 * math.pi


def c_times(build):
    """(best, median) seconds of the C sweep."""
    program = os.path.join(build, "bindings", "kinloop-sweep-bench")
    out = subprocess.run([program, MODEL, str(INPUT), repr(FROM), repr(TO), str(STEPS),
                          str(REPEATS)], check=True, capture_output=True, text=True).stdout
    words = out.split()
    return float(words[1]), float(words[3])


def python_times():
    """(best, median) seconds of Solver.sweep, the same sweep."""
    with kl.Model.read_file(MODEL) as m:
        s = kl.Solver(m)
        s.solve_position([FROM])
        times = []
        for _ in range(REPEATS):
            start = time.perf_counter()
            r = s.sweep(INPUT, FROM, TO, STEPS)
            times.append(time.perf_counter() - start)
            assert r.status == kl.Status.OK and len(r) == STEPS + 1
    return min(times), statistics.median(times)


def main(argv):
    build = argv[1] if len(argv) > 1 else "build"
    # interleaved, C first and last, so that a change of machine load
    # between them shows as a spread
    c1, py, c2 = c_times(build), python_times(), c_times(build)
    c_best = min(c1[0], c2[0])
    c_median = statistics.median([c1[1], c2[1]])
    print("sweep of %d steps, best of %d: C %.3f ms, Python %.3f ms, ratio %.3f"
          % (STEPS, REPEATS, 1e3 * c_best, 1e3 * py[0], py[0] / c_best))
    print("medians: C %.3f ms, Python %.3f ms, ratio %.3f"
          % (1e3 * c_median, 1e3 * py[1], py[1] / c_median))


if __name__ == "__main__":
    main(sys.argv)
