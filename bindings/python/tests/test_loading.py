"""Finding libkinloop in the documented order (bindings/python/README.md:
KINLOOP_LIBRARY, then the library recorded in kinloop/_location.py when the
package was assembled or installed, then the system path), a clear
ImportError when none loads, and the version check. Each case runs in a
fresh interpreter, since a process loads the library once."""

import os
import shutil
import subprocess
import sys
import textwrap

import pytest

import kinloop as kl

PACKAGE_ROOT = os.path.dirname(os.path.dirname(os.path.abspath(kl.__file__)))


def run_import(package_root=PACKAGE_ROOT, **env):
    """Imports kinloop in a new interpreter; (returncode, stdout, stderr)."""
    environment = {k: v for k, v in os.environ.items()
                   if k not in ("KINLOOP_LIBRARY", "PYTHONPATH")}
    environment.update(env)
    script = textwrap.dedent("""
        import sys
        sys.path.insert(0, %r)
        import kinloop
        print(kinloop.library_path)
        print(kinloop.version())
    """ % package_root)
    out = subprocess.run([sys.executable, "-B", "-c", script], env=environment,
                         capture_output=True, text=True, timeout=60)
    return out.returncode, out.stdout.splitlines(), out.stderr


def copy_of_package(tmp_path, library):
    """The package elsewhere, its _location.py recording `library`."""
    root = tmp_path / "elsewhere" / "python"
    shutil.copytree(os.path.join(PACKAGE_ROOT, "kinloop"), root / "kinloop",
                    ignore=shutil.ignore_patterns("__pycache__"))
    (root / "kinloop" / "_location.py").write_text("LIBRARY = %r\n" % str(library))
    return str(root)


def test_kinloop_library_comes_first(tmp_path):
    # a copy under another name: only KINLOOP_LIBRARY can point at it
    copy = tmp_path / "copy-of-libkinloop.so"
    shutil.copy(kl.library_path, copy)
    code, out, err = run_import(KINLOOP_LIBRARY=str(copy))
    assert code == 0, err
    assert out == [str(copy), kl.version()]


def test_a_kinloop_library_that_does_not_load_is_an_error(tmp_path):
    missing = tmp_path / "nothing-here.so"
    code, out, err = run_import(KINLOOP_LIBRARY=str(missing))
    assert code != 0
    assert "ImportError" in err and "KINLOOP_LIBRARY" in err and str(missing) in err


def test_the_recorded_library_is_found_without_variables():
    code, out, err = run_import()
    assert code == 0, err
    recorded = os.path.join(PACKAGE_ROOT, "kinloop", "_location.py")
    assert os.path.samefile(out[0], kl.library_path), open(recorded).read()


def test_a_recorded_path_is_relative_to_the_package(tmp_path):
    # as installed: the package records the library's path from itself
    lib_dir = tmp_path / "lib"
    lib_dir.mkdir()
    os.symlink(kl.library_path, lib_dir / "libkinloop.so.0")
    root = copy_of_package(tmp_path, os.path.join(os.pardir, os.pardir, os.pardir, "lib",
                                                  "libkinloop.so.0"))
    code, out, err = run_import(root)
    assert code == 0, err
    assert out[0] == str(lib_dir / "libkinloop.so.0")


def test_the_system_path_comes_last(tmp_path):
    # nothing at the recorded path: the dynamic loader finds libkinloop.so.0
    # through LD_LIBRARY_PATH
    os.symlink(kl.library_path, tmp_path / "libkinloop.so.0")
    os.symlink(kl.library_path, tmp_path / "libkinloop.so")
    code, out, err = run_import(copy_of_package(tmp_path, tmp_path / "gone.so"),
                                LD_LIBRARY_PATH=str(tmp_path))
    assert code == 0, err
    assert os.path.basename(out[0]).startswith("libkinloop.so")


def test_none_found_is_a_clear_import_error(tmp_path):
    code, out, err = run_import(copy_of_package(tmp_path, tmp_path / "gone.so"),
                                LD_LIBRARY_PATH="")
    if code == 0:
        pytest.skip("a libkinloop is installed on the system path: %s" % out[0])
    assert "ImportError" in err
    assert "libkinloop.so not found" in err and "KINLOOP_LIBRARY" in err
    assert str(tmp_path / "gone.so") in err  # every place tried is named


@pytest.mark.skipif(shutil.which("cc") is None, reason="no C compiler (cc) to build a stand-in")
def test_a_library_of_another_version_is_refused(tmp_path):
    # a stand-in library that reports a version these bindings were not made for
    source = tmp_path / "other.c"
    source.write_text('const char *kl_version(void) { return "%d.%d.0"; }\n'
                      % (kl.raw.WRITTEN_FOR[0], kl.raw.WRITTEN_FOR[1] + 1))
    library = tmp_path / "libother.so"
    subprocess.run(["cc", "-shared", "-fPIC", "-o", str(library), str(source)], check=True)
    code, out, err = run_import(KINLOOP_LIBRARY=str(library))
    assert code != 0
    assert "ImportError" in err
    assert "generated for %d.%d" % kl.raw.WRITTEN_FOR in err
