"""The worked examples in the docstrings of every conelang module run as tests.

Geometry functions carry a tiny worked example in their docstring (DEVELOPERS.md); this keeps
each of them true.  Modules are found from the package folders, so a new module is covered
without touching this file.
"""
from __future__ import annotations

import doctest
import importlib
import pkgutil

import pytest

PACKAGES = ("conelang", "conelang.syntax", "conelang.semantics", "conelang.geometry",
            "conelang.render", "conelang.server")


def _modules() -> list[str]:
    names = []
    for pkg in PACKAGES:
        mod = importlib.import_module(pkg)
        names.append(pkg)
        # the first folder only: from a source checkout conelang.__path__ also holds the
        # repository root (to find server/ and grammar/), which is not part of the package
        names += [f"{pkg}.{m.name}" for m in pkgutil.iter_modules(mod.__path__[:1]) if not m.ispkg]
    return sorted(names)


MODULES = _modules()


def test_every_package_folder_has_modules():
    for pkg in PACKAGES[1:]:
        assert any(m.startswith(pkg + ".") for m in MODULES), pkg


@pytest.mark.parametrize("name", MODULES)
def test_doctests_of_module(name):
    mod = importlib.import_module(name)
    finder = doctest.DocTestFinder()
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS)
    out: list[str] = []
    for test in finder.find(mod, name):
        runner.run(test, out=out.append)
    result = runner.summarize(verbose=False)
    assert result.failed == 0, f"{result.failed} failing doctest example(s) in {name}:\n" + "".join(out)


def test_the_geometry_doctests_are_found():
    """Every geometry module has worked examples (DEVELOPERS.md asks for one per function)."""
    finder = doctest.DocTestFinder()
    for name in MODULES:
        if name.startswith("conelang.geometry.") and not name.endswith("__init__"):
            examples = sum(len(t.examples) for t in finder.find(importlib.import_module(name), name))
            assert examples > 0, f"{name} has no worked example"
