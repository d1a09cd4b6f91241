"""The one content-keyed cache: keys are contents, so equal content is found again after an
edit elsewhere, and a changed dependency is never mistaken for the old one (common practice,
no source: a memo must be keyed by everything its result is computed from)."""
from __future__ import annotations

from conelang import cache
from conelang.semantics.analysis import Analysis

BASE = "lattice N = Z^2\ncone c in N { rays (0,1) (3,-2) }\ncone d = dual c\n"


def test_every_layer_keeps_its_memory_in_the_one_cache():
    Analysis(BASE).diagnostics()
    names = set(cache.stats())
    assert {"parse trees", "typed statements", "statement evaluations", "geometry results"} <= names
    cache.clear_all()
    assert all(n == 0 for n in cache.stats().values())


def test_fingerprints_follow_content_not_position_or_identity():
    a, moved = Analysis(BASE), Analysis("# a line above\n\n" + BASE)
    for name in ("N", "c", "d"):
        assert a.evaluator.fingerprint(name) == moved.evaluator.fingerprint(name)
    # a change of what `d` uses changes the fingerprint of `d` (and of `c`), not of `N`
    changed = Analysis(BASE.replace("(3,-2)", "(4,-3)"))
    assert changed.evaluator.fingerprint("N") == a.evaluator.fingerprint("N")
    assert changed.evaluator.fingerprint("c") != a.evaluator.fingerprint("c")
    assert changed.evaluator.fingerprint("d") != a.evaluator.fingerprint("d")
    # the budget is part of what a value is computed from
    from conelang.semantics.engine import Engine
    assert Analysis(BASE, Engine(1000)).evaluator.fingerprint("c") != a.evaluator.fingerprint("c")


def test_a_remembered_evaluation_is_the_same_value_and_diagnostics():
    cache.clear_all()
    first = Analysis(BASE + "cone e in N { rays (2,0) (0,1) }\n")      # a not-primitive warning
    d1 = [(d.code, d.span) for d in first.diagnostics()]
    again = Analysis("\n" + BASE + "cone e in N { rays (2,0) (0,1) }\n")
    d2 = [(d.code, (d.span[0] - 1, d.span[1] - 1)) for d in again.diagnostics()]
    assert d1 == d2 == [("not-primitive", (len(BASE) + 19, len(BASE) + 24))]
    assert again.value("d") == first.value("d")
    assert cache.stats()["statement evaluations"] >= 4
