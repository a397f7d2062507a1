"""Finding libkinloop in the documented order (README.md: KINLOOP_LIBRARY,
then KINLOOP_BUILD_DIR and the repository's build/, then the system path),
a clear ImportError when none loads, and the version check. Each case runs
in a fresh interpreter, since a process loads the library once."""

import os
import shutil
import subprocess
import sys
import textwrap

import pytest

import kinloop as kl

PACKAGE_ROOT = os.path.dirname(os.path.dirname(os.path.abspath(kl.__file__)))
REPOSITORY_BUILD = os.path.normpath(os.path.join(PACKAGE_ROOT, os.pardir, os.pardir, "build"))
LOOKUP_VARIABLES = ("KINLOOP_LIBRARY", "KINLOOP_BUILD_DIR")


def run_import(package_root=PACKAGE_ROOT, **env):
    """Imports kinloop in a new interpreter; (returncode, stdout, stderr)."""
    environment = {k: v for k, v in os.environ.items() if k not in LOOKUP_VARIABLES}
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


def test_kinloop_library_comes_first(tmp_path):
    # a copy under another name: only KINLOOP_LIBRARY can point at it
    copy = tmp_path / "copy-of-libkinloop.so"
    shutil.copy(kl.library_path, copy)
    build = tmp_path / "build"
    build.mkdir()
    os.symlink(kl.library_path, build / "libkinloop.so")
    code, out, err = run_import(KINLOOP_LIBRARY=str(copy), KINLOOP_BUILD_DIR=str(build))
    assert code == 0, err
    assert out == [str(copy), kl.version()]


def test_a_kinloop_library_that_does_not_load_is_an_error(tmp_path):
    missing = tmp_path / "nothing-here.so"
    code, out, err = run_import(KINLOOP_LIBRARY=str(missing))
    assert code != 0
    assert "ImportError" in err and "KINLOOP_LIBRARY" in err and str(missing) in err


def test_kinloop_build_dir_comes_before_the_repository_build(tmp_path):
    os.symlink(kl.library_path, tmp_path / "libkinloop.so")
    code, out, err = run_import(KINLOOP_BUILD_DIR=str(tmp_path))
    assert code == 0, err
    assert out[0] == str(tmp_path / "libkinloop.so")


@pytest.mark.skipif(not os.path.exists(os.path.join(REPOSITORY_BUILD, "libkinloop.so")),
                    reason="the repository's build/ holds no libkinloop.so")
def test_the_repository_build_is_found_without_variables():
    code, out, err = run_import()
    assert code == 0, err
    assert out[0] == os.path.join(REPOSITORY_BUILD, "libkinloop.so")


def copy_of_package(tmp_path):
    """The package somewhere its ../../build does not exist."""
    root = tmp_path / "elsewhere" / "python"
    shutil.copytree(os.path.join(PACKAGE_ROOT, "kinloop"), root / "kinloop",
                    ignore=shutil.ignore_patterns("__pycache__"))
    return str(root)


def test_the_system_path_comes_last(tmp_path):
    # the dynamic loader finds libkinloop.so.0 through LD_LIBRARY_PATH
    os.symlink(kl.library_path, tmp_path / "libkinloop.so.0")
    os.symlink(kl.library_path, tmp_path / "libkinloop.so")
    code, out, err = run_import(copy_of_package(tmp_path),
                                LD_LIBRARY_PATH=str(tmp_path))
    assert code == 0, err
    assert os.path.basename(out[0]).startswith("libkinloop.so")


def test_none_found_is_a_clear_import_error(tmp_path):
    code, out, err = run_import(copy_of_package(tmp_path), LD_LIBRARY_PATH="")
    if code == 0:
        pytest.skip("a libkinloop is installed on the system path: %s" % out[0])
    assert "ImportError" in err
    assert "libkinloop.so not found" in err and "KINLOOP_LIBRARY" in err


@pytest.mark.skipif(shutil.which("cc") is None, reason="no C compiler (cc) to build a stand-in")
def test_a_library_of_another_version_is_refused(tmp_path):
    # a stand-in library that reports a version these bindings were not written for
    source = tmp_path / "other.c"
    source.write_text('const char *kl_version(void) { return "%d.%d.0"; }\n'
                      % (kl.raw.WRITTEN_FOR[0], kl.raw.WRITTEN_FOR[1] + 1))
    library = tmp_path / "libother.so"
    subprocess.run(["cc", "-shared", "-fPIC", "-o", str(library), str(source)], check=True)
    code, out, err = run_import(KINLOOP_LIBRARY=str(library))
    assert code != 0
    assert "ImportError" in err
    assert "written for %d.%d" % kl.raw.WRITTEN_FOR in err
