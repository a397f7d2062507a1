"""The binding tests import kinloop as the build assembled it (CTest puts
build/bindings/python on PYTHONPATH), never from the source tree."""
import sys

sys.dont_write_bytecode = True  # keep the build tree clean
try:
    import kinloop  # noqa: F401
except ImportError as e:
    raise ImportError("the tests need the package the build assembles: run them through "
                      "ctest, or with PYTHONPATH=build/bindings/python (%s)" % e) from None
