"""fuzz_bindings.py - fuzz target for the Python binding: every public
method of a model (open and finalized), a solver and a study, and the
package's functions, called with random arguments drawn from hostile values
(integers past every C type's range, floats at the edges of a double,
strings and paths with an embedded NUL, wrong types). A call may return or
raise KinloopError (the library's kind of error, EINVAL for a value the
argument rule refuses) or TypeError for a wrong number of arguments; any
other exception, a crash or a hang is a finding.

    /usr/bin/python3 tests/fuzz/fuzz_bindings.py [--seconds S | --iterations N] [--seed K]

with PYTHONPATH at the build's bindings/python (CTest and scripts/fuzz.sh
set it). It runs in a scratch directory, so paths it invents stay there.
A finding prints the call (seed and iteration replay it) and exits 1.
"""

import argparse
import faulthandler
import inspect
import math
import os
import random
import re
import sys
import tempfile
import time

import kinloop as kl

MODEL = """kinloop-model 1
units length mm angle deg
link crank
link coupler
link rocker
revolute a ground 0 0 crank 0 0
revolute b crank 40 0 coupler 0 0
revolute c coupler 120 0 rocker 80 0
revolute d rocker 0 0 ground 100 0
point tip coupler 60 20
input a
sketch angle coupler 20
sketch angle rocker 100
sweep a from 0 to 360 steps 24
"""

STUDY = """kinloop-study 1
seed 5
samples 4
vary joint b a x tolerance 0.5 normal
sweep a from 0 to 90 steps 6
output swing swing angle rocker
output there at 45 x tip
"""

INTS = [0, 1, 2, 3, -1, 2**31 - 1, 2**31, -2**31 - 1, 2**32 + 3, 2**63 - 1, 2**63,
        -2**63 - 1, 2**64, 2**64 + 1, sys.maxsize, kl.MAX_STEPS, kl.MAX_STEPS + 1, True]
FLOATS = [0.0, -0.0, 1.0, 0.5, math.nan, math.inf, -math.inf, 1e308, -1e308, 5e-324,
          2.0**53 + 1, 1e-300]
TEXTS = ["", "a", "a\0b", "x.kinloop\0junk", "\0", "crank", "tip", "\udcff", "x" * 300,
         b"a\0b", b"\xff", "kinloop-model 1\n\0"]
OTHERS = [None, (), (1.0, 2.0), (1.0,), [0, 1], 2**70 * 1.0, 10**400, 1 + 2j, object(),
          float("nan"), "1", b"", bytearray(b"a\0")]
POOL = INTS + FLOATS + TEXTS + OTHERS

# TypeError from Python itself for a wrong number or name of arguments
ARITY = re.compile(r"positional argument|required|takes|unexpected keyword|"
                   r"missing|got multiple values")
# methods that end a handle, or take callables the pool has none of
SKIP = {"close", "borrowed"}
# a hang: well beyond the longest legal call with these handles (reaching
# an input value of 1e7 rad, 1.6 million turns of continuation, takes 12 s
# on an idle two-core machine; ctest runs two suites at once)
CALL_SECONDS = 90


def targets(objects):
    """(label, bound method) for every public callable of the objects."""
    out = []
    for label, obj in objects:
        for name in dir(obj):
            if name.startswith("_") or name in SKIP:
                continue
            try:
                attr = getattr(obj, name)
            except kl.KinloopError:
                continue  # a property refusing in this state
            if callable(attr) and not inspect.isclass(attr):
                out.append(("%s.%s" % (label, name), attr))
    return out


def build():
    model = kl.Model.read_text(MODEL)
    open_model = kl.Model()
    open_model.add_link("crank")
    solver = kl.Solver(model)
    solver.solve_position(0.3)
    study = kl.Study.read_text(STUDY, model)
    study.prepare()
    functions = [(name, getattr(kl, name)) for name in kl.__all__
                 if callable(getattr(kl, name)) and not inspect.isclass(getattr(kl, name))]
    return [("model", model), ("open_model", open_model), ("solver", solver),
            ("study", study)], functions


def call_one(rng, label, fn):
    args = [rng.choice(POOL) for _ in range(rng.randrange(0, 6))]
    kwargs = {}
    if label.endswith("set_options") and rng.random() < 0.5:
        kwargs[rng.choice(["max_iterations", "tolerance", "kernel", "singular_rcond"])] = \
            rng.choice(POOL)
    # a call that runs on (a hang in C) ends the process with its stack
    faulthandler.dump_traceback_later(CALL_SECONDS, exit=True)
    try:
        fn(*args, **kwargs)
    except kl.KinloopError as e:
        if not isinstance(e.status, int) or e.status >= 0 or not str(e):
            return "KinloopError without a negative status and a message: %r" % (e,), args
    except TypeError as e:
        if not ARITY.search(str(e)):
            return "TypeError that is no arity error: %s" % e, args
    except Exception as e:  # noqa: BLE001 - any other kind is the finding
        return "%s: %s" % (type(e).__name__, e), args
    finally:
        faulthandler.cancel_dump_traceback_later()
    return None, args


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seconds", type=float, default=None)
    parser.add_argument("--iterations", type=int, default=None)
    parser.add_argument("--seed", type=int, default=None)
    parser.add_argument("--trace", action="store_true", help="name each call before it")
    a = parser.parse_args()
    seed = a.seed if a.seed is not None else random.randrange(2**32)
    rng = random.Random(seed)
    # said first: a hang ends the run by faulthandler, before the last line
    print("fuzz_bindings: seed %d" % seed, file=sys.stderr, flush=True)
    deadline = time.monotonic() + (a.seconds if a.seconds is not None else 1e9)
    limit = a.iterations if a.iterations is not None else (None if a.seconds else 2000)
    os.chdir(tempfile.mkdtemp(prefix="kinloop-fuzz-bindings-"))
    objects, functions = build()
    calls = targets(objects) + functions
    done = refused = 0
    while (limit is None or done < limit) and time.monotonic() < deadline:
        if done % 500 == 0:  # fresh handles now and then: calls change them
            objects, functions = build()
            calls = targets(objects) + functions
        label, fn = rng.choice(calls)
        if a.trace:
            print("fuzz_bindings: iteration %d: %s" % (done, label), file=sys.stderr, flush=True)
        finding, args = call_one(rng, label, fn)
        if finding is not None:
            print("fuzz_bindings: seed %d, iteration %d: %s(%s): %s" % (
                seed, done, label, ", ".join(map(repr, args)), finding), file=sys.stderr)
            return 1
        done += 1
    print("fuzz_bindings: seed %d, %d calls over %d functions, no findings"
          % (seed, done, len(calls)))
    return 0


if __name__ == "__main__":
    sys.exit(main())
