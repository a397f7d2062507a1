"""The binding tests import kinloop from bindings/python, never installed."""
import os
import sys

sys.dont_write_bytecode = True  # keep the source tree clean
sys.path.insert(0, os.path.normpath(os.path.join(os.path.dirname(__file__), os.pardir)))
