"""The computation engine used by the analysis: geometry functions behind a cache and a budget.

Geometry values are immutable and hashable, so results are cached by the mathematical input
(the cone, the generator list, ...): editing one definition recomputes only the definitions
whose values changed.  Each heavy call gets a fresh :class:`Budget` with the engine's limit and
its cancellation event; a computation that runs out of budget is not cached, so raising the
budget and asking again recomputes it.
"""
from __future__ import annotations

import threading
from collections import OrderedDict

from ..geometry import budget as gbudget
from ..geometry import cone as gcone
from ..geometry.budget import Budget

_CACHE: "OrderedDict[tuple, object]" = OrderedDict()
_CACHE_SIZE = 4096
_LOCK = threading.Lock()


class NotPointed(Exception):
    """A computation that needs a pointed cone got one that contains the line through ``line``."""

    def __init__(self, line):
        self.line = line
        super().__init__(f"the cone contains the line through {line}")


class NotAvailable(Exception):
    """A capability that this version does not compute."""


def clear_cache() -> None:
    with _LOCK:
        _CACHE.clear()


class Engine:
    def __init__(self, budget_limit: int | None = gbudget.DEFAULT_LIMIT, cancel: threading.Event | None = None):
        self.budget_limit = budget_limit
        self.cancel = cancel

    def budget(self) -> Budget:
        return Budget(self.budget_limit, self.cancel)

    def cached(self, name: str, fn, *args, budgeted: bool = True):
        key = (name,) + args
        with _LOCK:
            if key in _CACHE:
                _CACHE.move_to_end(key)
                return _CACHE[key]
        result = fn(*args, budget=self.budget()) if budgeted else fn(*args)
        with _LOCK:
            _CACHE[key] = result
            if len(_CACHE) > _CACHE_SIZE:
                _CACHE.popitem(last=False)
        return result

    # -- cones -------------------------------------------------------------------------
    def dual(self, cone):
        return self.cached("dual", gcone.dual, cone, budgeted=False)

    @staticmethod
    def require_pointed(cone) -> None:
        line = gcone.a_line_in(cone)
        if line is not None:
            raise NotPointed(line)

    def hilbert_basis(self, cone):
        from ..geometry import monoid
        return self.cached("hilbert_basis", monoid.hilbert_basis, cone)

    def variety(self, cone):
        """The affine toric variety U_σ (σ pointed)."""
        from ..geometry import toric
        self.require_pointed(cone)
        return self.cached("variety", toric.affine_toric_variety, cone)

    def invariant(self, name: str, cone):
        """``name`` is a function of :mod:`conelang.geometry.invariants` taking a cone."""
        from ..geometry import invariants
        self.require_pointed(cone)
        fn = getattr(invariants, name)
        return self.cached("invariant:" + name, fn, cone, budgeted=False)

    def characters(self, chars):
        from ..geometry import characters
        return self.cached("characters", characters.analyse_characters, chars)

    def resolve(self, cone):
        try:
            from ..geometry import fan
        except ImportError:
            raise NotAvailable("resolution of singularities is not available in this version") from None
        self.require_pointed(cone)
        return self.cached("resolve", fan.resolve, cone)

    def morphism(self, value):
        """Pullbacks and torus map of a toric morphism (see :mod:`conelang.geometry.maps`)."""
        raise NotAvailable("pullbacks of toric morphisms are not computed in this version")

    def fan_facts(self, value):
        raise NotAvailable("fan properties are not computed in this version")
