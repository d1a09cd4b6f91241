"""Facts and ``expect`` properties of the next layer: quotient singularities, discrepancies and
the classes of singularities of cones, intersection numbers / Mori and nef cones of fans, and
the kernel / image / cokernel of maps.

Kept in one module so that ``facts.py`` and ``properties.py`` each need a single hook:
``facts.variety_facts`` calls :func:`singularity_facts`, ``facts.fan_facts`` calls
:func:`fan_extra_facts`, ``facts.map_facts`` calls :func:`map_extra_facts`, and the properties
are registered when ``properties.py`` imports this module at its end.
"""
from __future__ import annotations

from fractions import Fraction

from ..geometry import cone as gcone
from ..geometry import intersection as ginter
from ..geometry import linalg
from ..geometry import maps as gmaps
from ..geometry import singularities as gsing
from . import values as V
from .engine import NotAvailable
from .engine import guard as _guard
from .forms import jnum, jvec

MAX_ELEMENTS = 64          # group elements listed in the facts (all ages are counted)
MAX_INTERSECTIONS = 400    # top products listed in the facts of a fan


class NotSimplicial(NotAvailable):
    code = "not-simplicial"


class NotQGorenstein(NotAvailable):
    code = "not-qgorenstein"


class NotCompleteSimplicial(NotAvailable):
    code = "not-complete"


# ---- cones ------------------------------------------------------------------------------------
def quotient_of(analysis, cone):
    """The :class:`geometry.singularities.QuotientGroup` of a pointed cone (NotSimplicial)."""
    analysis.engine.require_pointed(cone)
    q = analysis.engine.cached("quotient_group", gsing.quotient_group, cone)
    if q is None:
        raise NotSimplicial("the cone is not simplicial, so it is not a quotient of affine space "
                            "by N/N' (its rays are linearly dependent)")
    return q


def classes_of(analysis, cone):
    """The :class:`geometry.singularities.SingularityClass` of a pointed cone (NotQGorenstein)."""
    analysis.engine.require_pointed(cone)
    s = analysis.engine.cached("singularity_class", gsing.singularity_class, cone)
    if s is None:
        raise NotQGorenstein("the cone is not Q-Gorenstein (no m in M_Q takes the value 1 on every "
                             "ray), so K is not Q-Cartier and discrepancies are not defined")
    return s


class QuotientValue:
    """The value of the property ``quotient``: equal to another one when they are the same
    singularity (``1/5(1,2)`` equals ``1/5(1,3)`` and ``1/5(2,1)``: same weights up to a unit
    and the order of the coordinates), or, when either is written as a group (``"Z/2 + Z/2"``),
    the same group."""

    def __init__(self, text: str, cyclic=None, invariants=None):
        self.text = text
        self.cyclic = cyclic              # (r, weights) or None
        self.invariants = invariants      # group invariants (d_i > 1), or None if not known

    def _group(self):
        if self.invariants is not None:
            return tuple(self.invariants)
        r, _ = self.cyclic
        return (r,) if r > 1 else ()

    def __eq__(self, other):
        if not isinstance(other, QuotientValue):
            return NotImplemented
        if self.cyclic is not None and other.cyclic is not None:
            (r, a), (s, b) = self.cyclic, other.cyclic
            if r == 1 or s == 1:
                return r == s
            return len(a) == len(b) and gsing.normal_form(r, a) == gsing.normal_form(s, b)
        return self._group() == other._group()

    def __hash__(self):
        return hash(self._group())

    def __str__(self):
        return f'"{self.text}"'


def parse_quotient(text: str) -> QuotientValue | None:
    """Read what a user writes for ``quotient``: ``"1/7(1,2,4)"``, ``"smooth"`` or a group."""
    from .forms import parse_group
    t = text.strip()
    if t == "smooth":
        return QuotientValue(t, (1, ()))
    typ = gsing.parse_type(t)
    if typ is not None:
        return QuotientValue(t, typ)
    g = parse_group(t)
    if g is not None and g[0] == 0:
        return QuotientValue(t, None, g[1])
    return None


def quotient_value(analysis, cone) -> QuotientValue:
    q = quotient_of(analysis, cone)
    return QuotientValue(gsing.type_string(q), q.cyclic, q.invariants)


def singularity_facts(analysis, value: V.ConeValue, errors: list) -> dict:
    """The cone's ``variety`` keys of this layer (see DEVELOPERS.md, JSON keys): quotient data
    for simplicial cones, the classes of singularities for Q-Gorenstein cones."""
    s, c = value.space, value.cone
    user = lambda x: jvec(s.from_coords(x))
    out: dict = {}
    if c.simplicial:
        q = _guard(errors, "quotient group", lambda: quotient_of(analysis, c))
        if q is not None:
            ages: dict[str, int] = {}
            for e in q.elements:
                ages[str(jnum(e.age))] = ages.get(str(jnum(e.age)), 0) + 1
            out.update({
                "quotient": gsing.type_string(q),
                "quotient_group": linalg.abelian_group_string(q.invariants, 0),
                "quotient_order": q.order,
                "quotient_rays": [user(r) for r in q.rays],
                "quotient_generators": [jvec(g) for g in q.generators],
                "ages": ages,
                "junior": [user(e.point) for e in q.junior],
            })
            if q.order - 1 <= MAX_ELEMENTS:
                out["group_elements"] = [{"weights": jvec(e.weights), "age": jnum(e.age),
                                          "point": user(e.point)} for e in q.elements]
    sc = _guard(errors, "classes of singularities",
                lambda: analysis.engine.cached("singularity_class", gsing.singularity_class, c))
    if sc is not None:
        out.update({"canonical_functional": jvec(s.dual().from_coords(sc.functional)),
                    "terminal": sc.terminal, "canonical": sc.canonical, "log_terminal": sc.log_terminal})
        witnesses = {}
        if sc.terminal_witness is not None:
            witnesses["terminal"] = user(sc.terminal_witness)
        if sc.canonical_witness is not None:
            witnesses["canonical"] = user(sc.canonical_witness)
        if witnesses:
            out["witnesses"] = witnesses
    return out


# ---- fans -------------------------------------------------------------------------------------
def _base_cones(analysis, value: V.FanValue):
    """The cones that the fan refines (a resolved cone, or the cone or fan subdivided), or ()."""
    name = value.source_cone or getattr(value, "subdivides", None)
    if not name:
        return ()
    base = analysis.value(name)
    if isinstance(base, V.ConeValue):
        return (base.cone,)
    if isinstance(base, V.FanValue):
        check = analysis.engine.fan_check(base)
        if check.valid:
            return tuple(check.geometry[i] for i in check.maximal)
    return ()


def ray_discrepancies(analysis, value: V.FanValue):
    """For each ray of a refinement, ``a(E) = <m_K, v_E> - 1`` with m_K of the cone of the
    refined object containing it (None where that cone is not Q-Gorenstein); () when the fan
    refines nothing."""
    bases = _base_cones(analysis, value)
    if not bases:
        return ()
    out = []
    for v in value.rays:
        a = None
        for b in bases:
            if gcone.contains(b, v):
                m = gsing.canonical_functional(b.rays, b.ambient_dim)
                a = gsing.discrepancy(m, v) if m is not None else None
                break
        out.append(a)
    return tuple(out)


class NotARefinement(NotAvailable):
    code = "not-a-refinement"


def _crepant(analysis, value: V.FanValue) -> bool:
    return all(a == 0 for a in _discrepancies(analysis, value))


def intersection_ring(analysis, value: V.FanValue):
    """The :class:`geometry.intersection.IntersectionRing` of a complete simplicial fan."""
    inv = analysis.engine.valid_fan_facts(value)
    if not (inv.complete and inv.simplicial):
        raise NotCompleteSimplicial("intersection numbers and the Mori cone need a complete simplicial fan"
                                    f" (this one is {'not complete' if not inv.complete else 'not simplicial'})")
    d = value.space.rank
    maximal = tuple(c for c in inv.maximal_cones if len(c) == d)
    return ginter.IntersectionRing(value.rays, maximal, d, analysis.engine.budget())


def _mori(rays, maximal, d, budget):
    return ginter.mori_data(ginter.IntersectionRing(rays, maximal, d, budget), budget)


def mori_of(analysis, value: V.FanValue):
    ring = intersection_ring(analysis, value)
    return analysis.engine.cached("mori_data", _mori, ring.rays, ring.maximal, ring.d)


def fan_extra_facts(analysis, value: V.FanValue, inv, errors: list) -> dict:
    """``discrepancies`` of a refinement; for complete simplicial fans ``intersections``,
    ``anticanonical_degree``, ``divisor_basis``, ``curves``, ``mori_rays``, ``nef_rays`` and
    ``projective``."""
    out: dict = {}
    if getattr(value, "subdivides", None):
        out["subdivides"] = value.subdivides
    disc = _guard(errors, "discrepancies", lambda: ray_discrepancies(analysis, value))
    if disc:
        out["discrepancies"] = [jnum(a) if a is not None else None for a in disc]
    if inv is None or not (inv.complete and inv.simplicial):
        return out
    ring = _guard(errors, "intersection numbers", lambda: intersection_ring(analysis, value))
    if ring is None:
        return out

    def products():
        from itertools import combinations_with_replacement
        listed = {}
        for n, key in enumerate(combinations_with_replacement(range(len(ring.rays)), ring.d)):
            if n >= MAX_INTERSECTIONS:
                errors.append(f"intersections: only the first {MAX_INTERSECTIONS} products are listed")
                break
            x = ring.top(key)
            if x:
                listed["*".join(f"D{i + 1}" for i in key)] = jnum(x)
        return listed

    tops = _guard(errors, "intersection numbers", products)
    if tops is not None:
        out["intersections"] = tops
    deg = _guard(errors, "anticanonical degree", ring.anticanonical_degree)
    if deg is not None:
        out["anticanonical_degree"] = jnum(deg)
    md = _guard(errors, "Mori cone", lambda: mori_of(analysis, value))
    if md is not None:
        out.update({
            "divisor_basis": [b + 1 for b in md.basis],
            "curves": [{"wall": [i + 1 for i in w], "classes": jvec(cv)} for w, cv in md.curves],
            "mori_rays": [list(r) for r in md.mori.rays],
            "mori_lineality": [list(r) for r in md.mori.lineality],
            "nef_rays": [list(r) for r in md.nef.rays],
            "projective": md.projective,
        })
    return out


# ---- maps -------------------------------------------------------------------------------------
def map_extra_facts(value: V.MapValue) -> dict:
    """``rank``, ``kernel`` (a basis, source coordinates), ``image`` (a basis of f(N), target
    coordinates), ``cokernel`` (the group N'/f(N)).

    >>> from .values import Space
    >>> from ..geometry import lattice as glat
    >>> Z2 = Space("Z^2", glat.standard(2))
    >>> f = V.MapValue(Z2, Z2, ((1, 1), (1, -2)), ((1, 1), (1, -2)))
    >>> d = map_extra_facts(f); d["rank"], d["cokernel"], d["image"]
    (2, 'Z/3', [[1, 1], [0, 3]])
    """
    n = value.source.rank
    cols = [tuple(value.matrix[i][j] for i in range(len(value.matrix))) for j in range(n)]
    image = linalg.hnf([c for c in cols if any(c)], value.target.rank) if any(any(c) for c in cols) else ()
    kernel = linalg.kernel_basis(value.matrix, n) if value.matrix else linalg.identity(n)
    free, tors = gmaps.cokernel(value.matrix, n)
    return {"rank": gmaps.rank(value.matrix, n),
            "kernel": [jvec(value.source.from_coords(k)) for k in kernel],
            "image": [jvec(value.target.from_coords(r)) for r in image if any(r)],
            "cokernel": linalg.abelian_group_string(tors, free)}


# ---- properties -------------------------------------------------------------------------------
def _discrepancies(analysis, value: V.FanValue) -> tuple:
    disc = ray_discrepancies(analysis, value)
    if not disc:
        raise NotARefinement("it refines nothing: discrepancies are defined for fans made by "
                             "'resolve', 'star' or 'refine'")
    if any(a is None for a in disc):
        raise NotQGorenstein("the refined cone or fan is not Q-Gorenstein, so discrepancies are not defined")
    return disc


def register(prop, BOOL, INT, GROUP, QUOTIENT, NUMS=None) -> None:
    """Register this layer's ``expect`` properties (called by ``properties.py``)."""

    prop("cone", "quotient", QUOTIENT,
         "type of the quotient singularity, \"1/r(a_1,…,a_n)\" (or the group N/N' when not cyclic)")(
        lambda a, v: quotient_value(a, v.cone))
    prop("cone", "quotient_group", GROUP, "the group N/N' of a simplicial cone (N' spanned by the rays)")(
        lambda a, v: (0, quotient_of(a, v.cone).invariants))
    prop("cone", "junior", INT, "number of junior elements (age 1) of N/N' (simplicial cones)")(
        lambda a, v: len(quotient_of(a, v.cone).junior))
    if NUMS is not None:
        prop("cone", "ages", NUMS, "the ages of the nonzero elements of N/N', smallest first, "
             "written (3/5, 4/5, 6/5, 7/5) (simplicial cones)")(
            lambda a, v: tuple(sorted(e.age for e in quotient_of(a, v.cone).elements)))
        prop("fan", "discrepancies", NUMS, "the discrepancy a(D) = <m_K, v> - 1 of each ray of a refinement "
             "(resolve, star, refine), in the order of its rays")(
            lambda a, v: _discrepancies(a, v))
    prop("cone", "terminal", BOOL, "U_σ is terminal: the only lattice points of height ≤ 1 are 0 and the rays")(
        lambda a, v: classes_of(a, v.cone).terminal)
    prop("cone", "canonical", BOOL, "U_σ is canonical: no nonzero lattice point of σ has height < 1")(
        lambda a, v: classes_of(a, v.cone).canonical)
    prop("cone", "log_terminal", BOOL, "U_σ is log terminal (always, when Q-Gorenstein)")(
        lambda a, v: classes_of(a, v.cone).log_terminal)
    prop("fan", "crepant", BOOL,
         "a refinement (resolve, star, refine) with every discrepancy 0: K pulls back to K")(
        lambda a, v: _crepant(a, v))
    prop("fan", "projective", BOOL, "X_Σ is projective: the nef cone has interior (complete simplicial fans)")(
        lambda a, v: mori_of(a, v).projective)
    prop("fan", "mori_rays", INT, "number of extremal rays of the Mori cone NE(X_Σ) (complete simplicial fans)")(
        lambda a, v: len(mori_of(a, v).mori.rays))
    prop("fan", "nef_rays", INT, "number of extremal rays of the nef cone of X_Σ (complete simplicial fans)")(
        lambda a, v: len(mori_of(a, v).nef.rays))


def expected_quotient(text: str):
    """The expected value of ``quotient`` from the text after ``=``; None when malformed."""
    return parse_quotient(text)
