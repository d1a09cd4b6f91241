"""Shared test configuration.

Hypothesis runs derandomized (a fixed sequence of examples for a given hypothesis version), so
a CI run is repeatable: a failure on CI is a failure here too.  ``HYPOTHESIS_PROFILE=explore``
gives fresh random examples for local exploration.
"""
import os
import sys
from pathlib import Path

from hypothesis import settings

settings.register_profile("repeatable", derandomize=True, print_blob=True)
settings.register_profile("explore", derandomize=False, print_blob=True)
settings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "repeatable"))



def pytest_addoption(parser):
    parser.addoption("--update-golden", action="store_true", default=False,
                     help="rewrite the expected files of tests/golden instead of comparing")


_TESTS = str(Path(__file__).resolve().parent)
if _TESTS not in sys.path:
    sys.path.insert(0, _TESTS)
