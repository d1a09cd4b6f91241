"""The computation engine used by the analysis: geometry functions behind a cache and a budget.

Geometry values are immutable and hashable, so results are cached by the mathematical input
(the cone, the generator list, ...): editing one definition recomputes only the definitions
whose values changed.  Each heavy call gets a fresh :class:`Budget` with the engine's limit and
its cancellation event; a computation that runs out of budget is not cached, so raising the
budget and asking again recomputes it.
"""
from __future__ import annotations

import threading

from ..cache import ContentCache
from ..geometry import budget as gbudget
from ..geometry import cone as gcone
from ..geometry.budget import Budget, BudgetExceeded, Cancelled
from .forms import budget_advice, budget_message, fan_problem_message, fmt_vec

# heavy results by their mathematical input (values are immutable and hashable)
_CACHE = ContentCache("geometry results", 4096)
_MISSING = object()


class NotPointed(Exception):
    """A computation that needs a pointed cone got one that contains the line through ``line``
    (lattice coordinates; the messages that say so are made where the space is known)."""

    def __init__(self, line):
        self.line = line
        super().__init__(line)


class NotAvailable(Exception):
    """A capability that this version does not compute."""


def clear_cache() -> None:
    _CACHE.clear()


# what a progress line calls each cached computation (default: its name with spaces)
_PROGRESS_LABELS = {"variety": "binomial equations", "resolve": "resolution",
                    "characters": "torus action", "morphism": "toric morphism"}


class Engine:
    def __init__(self, budget_limit: int | None = gbudget.DEFAULT_LIMIT, cancel: threading.Event | None = None,
                 progress=None):
        self.budget_limit = budget_limit
        self.cancel = cancel
        self.progress = progress      # progress(what, budget) when a heavy computation starts

    def budget(self) -> Budget:
        return Budget(self.budget_limit, self.cancel)

    def cached(self, name: str, fn, *args, budgeted: bool = True):
        key = (name,) + args
        hit = _CACHE.get(key, _MISSING)
        if hit is not _MISSING:
            return hit
        budget = self.budget()
        if self.progress is not None:
            self.progress(_PROGRESS_LABELS.get(name, name.split(":")[-1].replace("_", " ")), budget)
        result = fn(*args, budget=budget) if budgeted else fn(*args)
        _CACHE.put(key, result)
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

    def characters(self, value):
        """The analysis of a ``characters`` value (its lattice rank is passed, so an empty list
        of characters is fine)."""
        from ..geometry import characters
        dim = value.space.rank
        return self.cached("characters", lambda chars, d, budget: characters.analyse_characters(chars, budget, dim=d),
                           value.characters, dim)

    def resolve(self, cone):
        """A smooth refinement of a pointed cone: a :class:`conelang.geometry.fan.Resolution`
        (``.rays`` in lattice coordinates, ``.cones`` 0-based index tuples)."""
        from ..geometry import fan
        self.require_pointed(cone)
        return self.cached("resolve", fan.resolve, cone)

    def coordinates(self, cone):
        """The generators z1..zr of the affine toric variety of a pointed cone: the Hilbert basis
        of its dual, which is the order of ``toric.affine_toric_variety`` (taken directly, so
        that pullbacks do not wait for the toric ideal)."""
        return self.hilbert_basis(self.dual(cone))

    def morphism_kinds(self, value):
        """:class:`conelang.geometry.maps.MorphismKinds` of a morphism value (its map must send
        the source cone into the target cone; NotAvailable otherwise)."""
        from ..geometry import maps
        matrix, s, t = value.map.matrix, value.source.cone, value.target.cone
        self.require_pointed(s)
        self.require_pointed(t)
        if not maps.is_compatible(matrix, s, t):
            raise NotAvailable(f"'{value.map_name}' does not send '{value.source_name}' into "
                               f"'{value.target_name}', so there is no morphism")
        return self.cached("morphism_kinds", maps.classify, matrix, s, t)

    def morphism(self, value):
        """The induced toric morphism of a morphism value (see :mod:`conelang.geometry.maps`):
        ``(kinds, exponents)``, the :class:`conelang.geometry.maps.MorphismKinds` and, for each
        target coordinate w_j, its pullback as exponents of the source coordinates z_i
        (:func:`conelang.semantics.facts.morphism_facts` writes them)."""
        from ..geometry import maps
        kinds = self.morphism_kinds(value)
        matrix, s, t = value.map.matrix, value.source.cone, value.target.cone
        sg, tg = self.coordinates(s), self.coordinates(t)
        return kinds, self.cached("pullback_exponents", maps.pullback_exponents, matrix, s, t, sg, tg)

    def fan_check(self, value):
        """Validity of a fan (a :class:`conelang.geometry.fan.FanCheck`).  Fans made by
        ``resolve`` are fans by construction: their cones are not intersected pairwise."""
        from ..geometry import fan
        return self.cached("fan_check", fan.check_fan, value.rays, value.cones, value.space.rank,
                           value.source_cone is not None)

    def fan_facts(self, value):
        """Invariants of a valid fan (a :class:`conelang.geometry.fan.FanInvariants`); raises
        NotAvailable for a list of cones that is not a fan."""
        from ..geometry import fan
        check = self.fan_check(value)
        if not check.valid:
            raise NotAvailable("it is not a fan: " + fan_problem_message(check.errors[0]))
        return self.cached("fan_invariants", fan.fan_invariants, check)

    def valid_fan_facts(self, value):
        """:meth:`fan_facts`, with the reason a list of cones is not a fan in user coordinates."""
        check = self.fan_check(value)
        if not check.valid:
            raise NotAvailable("it is not a fan: " + fan_problem_message(
                check.errors[0], lambda x: fmt_vec(value.space.from_coords(x))))
        return self.fan_facts(value)

    # -- polytopes and Hilbert series ----------------------------------------------------
    def polytope_data(self, P):
        """h* and the lattice points (listed up to ``geometry.polytope.LIST_LIMIT``) of a
        polytope: one half-open triangulation of the cone over it."""
        from ..geometry import polytope
        return self.cached("polytope_lattice_data", polytope.lattice_data, P, polytope.LIST_LIMIT)

    def normalized_volume(self, P):
        from ..geometry import polytope
        return self.cached("normalized_volume", polytope.normalized_volume, P)

    def f_vector(self, P):
        from ..geometry import polytope
        return self.cached("f_vector", polytope.f_vector, P)

    def grading(self, value):
        """The grading of a cone value: its ``grading`` section, or the default rule of
        :func:`conelang.geometry.polytope.default_grading` (from the Hilbert basis)."""
        from ..geometry import polytope
        self.require_pointed(value.cone)
        if value.grading is not None:
            return value.grading
        return self.cached("default_grading", lambda c, budget: polytope.default_grading(c, self.hilbert_basis(c)),
                           value.cone)

    def hilbert_series(self, value):
        """The Hilbert series (a :class:`conelang.geometry.polytope.HilbertSeries`) of the monoid
        of a pointed cone value, for its grading."""
        from ..geometry import polytope
        w = self.grading(value)
        return self.cached("hilbert_series", polytope.hilbert_series, value.cone, w)


def guard(errors: list, what: str, fn):
    """Run a heavy computation; on failure record why and return None."""
    try:
        return fn()
    except Cancelled:
        raise
    except NotPointed:
        errors.append(f"{what}: the cone is not pointed")
    except BudgetExceeded as exc:
        errors.append(f"{what}: {budget_message(exc)}; {budget_advice(exc)}")
    except NotAvailable as exc:
        errors.append(f"{what}: {exc}")
    except Exception as exc:  # never lose the other facts to one bug
        errors.append(f"{what}: internal error ({type(exc).__name__}: {exc})")
    return None
