"""The properties that ``expect`` knows, one registry for every kind of object.

To add a property: write a function ``(analysis, value) -> result`` and register it with
:func:`prop`; ``expect``, the completion list in the editor and the docs read this registry.
Results are ``bool``, ``int``, ``None`` (for "not defined", e.g. the Gorenstein index of a
cone that is not Q-Gorenstein) or an abelian group ``(free_rank, invariant_factors)``.

Incompatible morphisms.  ``morphism phi = f : σ -> τ`` with ``f(σ) ⊄ τ`` is an
``incompatible-morphism`` error, unless the file itself states ``expect phi not compatible``:
then the analysis keeps the value (with no flag: ``compatible`` is recomputed from the map and
the cones), reports nothing at the definition, and the expectation holds.  Every other
morphism property of such a value reports that it cannot be checked (there is no morphism of
varieties), its facts carry ``"compatible": false`` and the ``violation``, and composing it is
an error.  See the morphism section below.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Callable

from ..geometry import cone as gcone
from ..geometry import linalg
from ..geometry import maps as gmaps
from ..geometry.budget import BudgetExceeded, Cancelled
from ..syntax import ast as A
from ..syntax.text import closest_word
from .diagnostics import EvalError, Related
from .engine import NotAvailable, NotPointed
from .forms import (budget_advice, budget_message, fmt_vec, group_string, parse_group,  # noqa: F401 (also used by facts)
                    show_result, violation_message)

BOOL, INT, GROUP, OPT_INT, INTS = "yes/no", "integer", "abelian group", "integer or none", "list of integers"
NUMS, NUM = "list of numbers", "number"
QUOTIENT = "quotient type"          # see semantics/singularities.py


@dataclass(frozen=True)
class Property:
    name: str
    kind: str              # the kind of object it applies to
    type: str
    doc: str
    compute: Callable[[Any, Any], Any]


REGISTRY: dict[tuple[str, str], Property] = {}


def prop(kind: str, name: str, type_: str, doc: str):
    def register(fn):
        REGISTRY[(kind, name)] = Property(name, kind, type_, doc, fn)
        return fn
    return register


def properties_for(kind: str) -> list[Property]:
    return [p for (k, _), p in REGISTRY.items() if k == kind]


# ---- cones -------------------------------------------------------------------------------
@prop("cone", "pointed", BOOL, "contains no line (strongly convex)")
def _pointed(a, v):
    return v.cone.pointed


@prop("cone", "full", BOOL, "full-dimensional in its lattice")
def _full(a, v):
    return v.cone.full


@prop("cone", "simplicial", BOOL, "the ray generators are linearly independent")
def _simplicial(a, v):
    return v.cone.simplicial


@prop("cone", "dim", INT, "dimension of the linear span")
def _dim(a, v):
    return v.cone.dim


@prop("cone", "rays", INT, "number of extremal rays")
def _rays(a, v):
    return len(v.cone.rays)


@prop("cone", "facets", INT, "number of facets")
def _facets(a, v):
    return len(v.cone.facets)


@prop("cone", "smooth", BOOL, "U_σ is smooth: the rays are part of a lattice basis")
def _smooth(a, v):
    return a.engine.invariant("is_smooth", v.cone)


@prop("cone", "gorenstein", BOOL, "U_σ is Gorenstein: some m in M has <m, v_i> = 1 on every ray")
def _gorenstein(a, v):
    return a.engine.invariant("gorenstein_index", v.cone) == 1


@prop("cone", "qgorenstein", BOOL, "U_σ is Q-Gorenstein: some m in M_Q has <m, v_i> = 1 on every ray")
def _qgorenstein(a, v):
    return a.engine.invariant("gorenstein_index", v.cone) is not None


@prop("cone", "index", OPT_INT, "Gorenstein index: least k with k·K Cartier (none if not Q-Gorenstein)")
def _index(a, v):
    return a.engine.invariant("gorenstein_index", v.cone)


@prop("cone", "generators", INT, "size of the Hilbert basis of σ^∨ ∩ M (embedding dimension of U_σ)")
def _generators(a, v):
    a.engine.require_pointed(v.cone)
    return len(a.engine.hilbert_basis(a.engine.dual(v.cone)))   # no need for the equations


@prop("cone", "equations", INT, "number of minimal binomial equations of U_σ")
def _equations(a, v):
    return len(a.engine.variety(v.cone).binomials)


@prop("cone", "multiplicity", OPT_INT, "index of the lattice spanned by the rays (simplicial cones)")
def _multiplicity(a, v):
    return a.engine.invariant("multiplicity", v.cone)


@prop("cone", "class_group", GROUP, "class group of U_σ: Z^rays / M")
def _class_group(a, v):
    return a.engine.invariant("class_group", v.cone)


# ---- characters ----------------------------------------------------------------------------
@prop("characters", "normal", BOOL, "the monoid they generate is saturated in the group they generate")
def _normal(a, v):
    return a.engine.characters(v).normal


# ---- maps ---------------------------------------------------------------------------------
# Properties of the lattice map f : N -> N' itself (lattice coordinates, exact).
def _map_property(name: str, type_: str, doc: str, fn) -> None:
    """A property of the lattice map itself: ``fn(matrix, source_rank)`` from geometry.maps."""
    prop("map", name, type_, doc)(lambda a, v: fn(v.matrix, v.source.rank))


for _name, _type, _doc, _fn in (
        ("injective", BOOL, "f : N → N' is injective", gmaps.is_injective),
        ("surjective", BOOL, "f : N → N' is surjective (onto the lattice, not just of full rank)", gmaps.is_surjective),
        ("isomorphism", BOOL, "f : N → N' is an isomorphism of lattices", gmaps.is_isomorphism),
        ("rank", INT, "rank of f (dimension of its image)", gmaps.rank),
        ("cokernel", GROUP, "the cokernel N'/f(N), e.g. \"Z/7\" or \"Z\"", gmaps.cokernel)):
    _map_property(_name, _type, _doc, _fn)


# ---- morphisms ----------------------------------------------------------------------------
# A morphism whose map does not send the source cone into the target cone is an
# `incompatible-morphism` error, except when the file says so itself: if some
# `expect phi not compatible` names it, the analysis keeps the value (compatibility is
# recomputed from the map and the cones, there is no flag), reports nothing at the
# definition, and this expectation holds.  Such a value is not a morphism of varieties:
# every other morphism property then reports that it cannot be checked, and composing it
# is an error.  The kinds of morphism are decided by `conelang.geometry.maps.classify`.
@prop("morphism", "compatible", BOOL, "the map sends the source cone into the target cone (f(σ) ⊆ τ)")
def _compatible(a, v):
    from ..geometry import maps
    return maps.is_compatible(v.map.matrix, v.source.cone, v.target.cone)


def _kind_prop(name: str, doc: str):
    def compute(a, v):
        return getattr(a.engine.morphism_kinds(v), name)
    prop("morphism", name, OPT_INT if name == "degree" else BOOL, doc)(compute)


for _name, _doc in (
        ("isomorphism", "f is a lattice isomorphism with f(σ) = τ: U_σ ≅ U_τ"),
        ("open_embedding", "f is a lattice isomorphism and f(σ) is a face of τ: U_σ is an open affine piece of U_τ"),
        ("closed_embedding", "f^*(τ^∨ ∩ M') = σ^∨ ∩ M: the pullback of coordinate rings is onto"),
        ("quotient", "f is injective of finite index and f(σ) = τ: U_τ = U_σ / (N'/f(N))"),
        ("finite", "σ = f^-1(τ): the morphism is finite (proper)"),
        ("birational", "f is a lattice isomorphism: the morphism is an isomorphism of tori"),
        ("subdivision_piece", "f is a lattice isomorphism and f(σ) ⊆ τ is not a face: a chart of a subdivision of τ"),
        ("dominant", "f has full rank: the image is dense in U_τ"),
        ("surjective", "the morphism U_σ → U_τ is onto (dominant and every face of τ is hit by a face of σ)"),
        ("injective", "the morphism U_σ → U_τ is one-to-one on points (faces go to distinct faces, orbit maps injective)"),
        ("lattice_injective", "the lattice map f : N → N' is injective"),
        ("lattice_surjective", "the lattice map f : N → N' is surjective"),
        ("degree", "|N'/f(N)| = degree of the morphism when f is square of full rank (none otherwise)")):
    _kind_prop(_name, _doc)
del _name, _doc


# ---- fans -----------------------------------------------------------------------------------
def _fan_invariants(a, v):
    """The invariants of a fan value; NotAvailable (saying why) when it is not a fan."""
    return a.engine.valid_fan_facts(v)


@prop("fan", "valid", BOOL, "the cones form a fan: pointed, listed rays extremal, any two meet in a common face")
def _fan_valid(a, v):
    return a.engine.fan_check(v).valid


@prop("fan", "complete", BOOL, "the support is the whole space (X_Σ is complete)")
def _fan_complete(a, v):
    return _fan_invariants(a, v).complete


@prop("fan", "smooth", BOOL, "every cone is generated by part of a lattice basis (X_Σ is smooth)")
def _fan_smooth(a, v):
    return _fan_invariants(a, v).smooth


@prop("fan", "simplicial", BOOL, "every cone is simplicial (X_Σ is Q-factorial)")
def _fan_simplicial(a, v):
    return _fan_invariants(a, v).simplicial


@prop("fan", "rays", INT, "number of rays (torus-invariant prime divisors)")
def _fan_rays(a, v):
    return len(v.rays)


@prop("fan", "cones", INT, "number of maximal cones")
def _fan_cones(a, v):
    check = a.engine.fan_check(v)               # counting needs no invariants (Picard group)
    if not check.valid:
        _fan_invariants(a, v)                   # raises NotAvailable, saying why
    return len(check.maximal)


@prop("fan", "fixed_points", INT, "number of torus-fixed points (full-dimensional cones)")
def _fan_fixed_points(a, v):
    return _fan_invariants(a, v).orbits[0]


@prop("fan", "class_group", GROUP, "class group of X_Σ: Z^rays / M")
def _fan_class_group(a, v):
    return _fan_invariants(a, v).class_group


@prop("fan", "picard_group", GROUP, "Picard group of X_Σ: T-Cartier divisors / M")
def _fan_picard_group(a, v):
    return _fan_invariants(a, v).picard_group


@prop("fan", "orbits", INTS, "number of torus orbits of dimension 0, 1, …, n, written (3, 3, 1)")
def _fan_orbits(a, v):
    return tuple(_fan_invariants(a, v).orbits)


@prop("fan", "picard_rank", INT, "rank of the Picard group of X_Σ")
def _fan_picard_rank(a, v):
    return _fan_invariants(a, v).picard_group[0]


# ---- Hilbert series of cone monoids ----------------------------------------------------------
@prop("cone", "hilbert_numerator", INTS, "numerator of the Hilbert series of σ ∩ N for its grading, constant term first")
def _hilbert_numerator(a, v):
    return a.engine.hilbert_series(v).numerator


@prop("cone", "hilbert_denominator", INTS, "the exponents e_i of the denominator Π (1 - t^e_i) of the Hilbert series")
def _hilbert_denominator(a, v):
    return a.engine.hilbert_series(v).denominator


@prop("cone", "hilbert_multiplicity", NUM, "multiplicity of the graded monoid σ ∩ N: numerator(1) / Π e_i")
def _hilbert_multiplicity(a, v):
    return a.engine.hilbert_series(v).multiplicity


@prop("cone", "grading", INTS, "the grading of the Hilbert series: the `grading` section or the default rule")
def _grading(a, v):
    return tuple(a.engine.grading(v))


# ---- polytopes ------------------------------------------------------------------------------
def _h(a, v):
    return a.engine.polytope_data(v.polytope).h_star


def _polytope_prop(name: str, type_: str, doc: str, fn) -> None:
    prop("polytope", name, type_, doc)(fn)


def _ehrhart(a, v):
    from ..geometry import polytope as gp
    return gp.ehrhart_from_h_star(_h(a, v), v.polytope.dim)


def _lattice_count(a, v):
    h = _h(a, v)
    return (v.polytope.dim + 1) * h[0] + (h[1] if len(h) > 1 else 0)


def _interior_count(a, v):
    h = _h(a, v)
    return h[v.polytope.dim] if len(h) > v.polytope.dim else 0


def _gorenstein_index(a, v):
    from ..geometry import polytope as gp
    return gp.gorenstein_index(v.polytope)


def _reflexive(a, v):
    from ..geometry import polytope as gp
    return gp.is_reflexive(v.polytope)


for _name, _type, _doc, _fn in (
        ("dim", INT, "dimension of the polytope (of its affine hull)", lambda a, v: v.polytope.dim),
        ("full", BOOL, "full-dimensional in its lattice", lambda a, v: v.polytope.full),
        ("vertices", INT, "number of vertices", lambda a, v: len(v.polytope.vertices)),
        ("facets", INT, "number of facets", lambda a, v: len(v.polytope.facets)),
        ("f_vector", INTS, "numbers of faces of dimension 0, 1, …, dim − 1, written (3, 3)",
         lambda a, v: a.engine.f_vector(v.polytope)),
        ("lattice_points", INT, "number of lattice points", _lattice_count),
        ("interior_points", INT, "number of lattice points in the (relative) interior", _interior_count),
        ("boundary_points", INT, "number of lattice points on the (relative) boundary",
         lambda a, v: _lattice_count(a, v) - _interior_count(a, v)),
        ("volume", INT, "normalized volume dim!·vol in the lattice of the affine hull (= h*(1))",
         lambda a, v: a.engine.normalized_volume(v.polytope)),
        ("h_star", INTS, "the h*-vector: Σ L(n) t^n = h*(t) / (1 − t)^(dim+1), written (1, 4, 1)", _h),
        ("ehrhart", NUMS, "Ehrhart polynomial L(n) = #(nP ∩ N), coefficients from the constant term, "
                          "written (1, 3/2, 1/2)", _ehrhart),
        ("reflexive", BOOL, "full-dimensional with every facet <u, x> ≥ −1 (u primitive): the polar is a lattice polytope",
         _reflexive),
        ("gorenstein", BOOL, "r·P is reflexive up to a lattice translation for some r ≥ 1",
         lambda a, v: _gorenstein_index(a, v) is not None),
        ("gorenstein_index", OPT_INT, "the least such r (none if P is not Gorenstein)", _gorenstein_index)):
    _polytope_prop(_name, _type, _doc, _fn)
del _name, _type, _doc, _fn


# ---- checking -------------------------------------------------------------------------------
def compute(analysis, kind: str, name: str, value):
    """Evaluate one registered property (may raise NotPointed, BudgetExceeded, NotAvailable)."""
    return REGISTRY[(kind, name)].compute(analysis, value)


def check_expect(analysis, ex: A.Expect) -> None:
    sink = analysis.sink
    subject = ex.subject.text
    kind = analysis.kind_of(subject)
    if kind is None:
        return                                   # unknown name: already reported
    value = analysis.value(subject)
    if value is None:
        return                                   # the definition has errors: already reported
    if ex.cone is not None:
        if kind != "cone":
            sink.error(ex.subject.span, "wrong-kind", f"'==' compares cones, but '{subject}' is a {kind}")
            return
        try:
            other = analysis.cone_expr(ex.cone)
        except EvalError:
            return
        if other.space != value.space:
            sink.error(ex.span, "expect-failed",
                       f"'{subject}' lives in {value.space.label}, the right-hand side in {other.space.label}")
        elif other.cone != value.cone:
            sink.error(ex.span, "expect-failed", f"the cones differ: {_difference(analysis, value, other)}")
        return
    pname = ex.prop.text
    p = REGISTRY.get((kind, pname))
    if p is None:
        names = [q.name for q in properties_for(kind)]
        guess = closest_word(pname, names)
        hint = f"; did you mean '{guess}'?" if guess else ""
        sink.error(ex.prop.span, "unknown-property",
                   f"'{pname}' is not a property of a {kind}{hint} (known: {', '.join(names) or 'none yet'})")
        return
    if ex.value is None and p.type != BOOL:
        sink.error(ex.prop.span, "expect-needs-value",
                   f"'{pname}' is {'an' if p.type[0] in 'aeiou' else 'a'} {p.type}: write 'expect {subject} {pname} = …'")
        return
    if ex.value is not None and p.type == BOOL:
        sink.error(ex.value.span, "expect-bad-value",
                   f"'{pname}' is yes/no: write 'expect {subject} {pname}' or 'expect {subject} not {pname}'")
        return
    wanted = _expected_value(analysis, ex, p)
    if wanted is _BAD:
        return
    try:
        got = p.compute(analysis, value)
    except NotPointed as exc:
        line = _fmt(analysis, value, exc.line)
        sink.error(ex.span, "not-pointed",
                   f"'{subject}' is not pointed (it contains the line through {line}), so it does not define "
                   f"an affine toric variety and '{pname}' is not defined",
                   related=(Related(analysis.defs[subject].span, f"'{subject}' is defined here"),))
        return
    except BudgetExceeded as exc:
        sink.error(ex.span, "budget", f"cannot check '{pname}' of '{subject}': {budget_message(exc)}; {budget_advice(exc)}")
        return
    except NotAvailable as exc:
        sink.error(ex.span, getattr(exc, "code", "not-computed-yet"), f"cannot check '{pname}' of '{subject}': {exc}")
        return
    except Cancelled:
        raise
    if p.type == BOOL:
        ok = bool(got) != ex.negated
        if not ok:
            sink.error(ex.span, "expect-failed",
                       f"expected '{subject}' {'not ' if ex.negated else ''}to be {pname}, but it is "
                       f"{'' if got else 'not '}{pname}")
        return
    if got != wanted:
        sink.error(ex.span, "expect-failed",
                   f"expected {pname} = {show_result(wanted)} for '{subject}', computed {show_result(got)}")


_BAD = object()


def _expected_value(analysis, ex: A.Expect, p: Property):
    sink = analysis.sink
    v = ex.value
    if p.type == BOOL:
        return None                              # `expect X p` / `expect X not p`: no value to read
    if p.type in (INT, OPT_INT):
        if isinstance(v, A.StringValue) and p.type == OPT_INT and v.text == "none":
            return None
        if not isinstance(v, A.Number) or v.value.denominator != 1:
            sink.error(v.span, "expect-bad-value", f"'{p.name}' is an integer")
            return _BAD
        return int(v.value)
    if p.type == GROUP:
        if isinstance(v, A.Number) and v.value == 0:
            return (0, ())
        if not isinstance(v, A.StringValue) or parse_group(v.text) is None:
            sink.error(v.span, "expect-bad-value",
                       f"'{p.name}' is an abelian group written like \"Z/4\", \"Z/2 + Z/4\", \"Z^2 + Z/3\" or \"0\"")
            return _BAD
        return parse_group(v.text)
    if p.type == INTS:
        if not isinstance(v, A.Vector) or any(x.denominator != 1 for x in v.entries):
            sink.error(v.span, "expect-bad-value", f"'{p.name}' is a list of integers written like (3, 3, 1)")
            return _BAD
        return tuple(int(x) for x in v.entries)
    if p.type == NUMS:
        if not isinstance(v, A.Vector):
            sink.error(v.span, "expect-bad-value", f"'{p.name}' is a list of numbers written like (1, 3/2, 1/2)")
            return _BAD
        return tuple(v.entries)
    if p.type == NUM:
        if not isinstance(v, A.Number):
            sink.error(v.span, "expect-bad-value", f"'{p.name}' is a number such as 3 or 5/2")
            return _BAD
        return v.value
    if p.type == QUOTIENT:
        from .singularities import parse_quotient
        q = parse_quotient(v.text) if isinstance(v, A.StringValue) else None
        if q is None:
            sink.error(v.span, "expect-bad-value",
                       f"'{p.name}' is a quotient type written like \"1/7(1,2,4)\", \"smooth\" or a group \"Z/2 + Z/2\"")
            return _BAD
        return q
    return _BAD


def _fmt(analysis, value, coords) -> str:
    return fmt_vec(value.space.from_coords(coords))


def _difference(analysis, left, right) -> str:
    """Say how two cones in the same lattice differ: a ray of one outside the other."""
    for a, b, an, bn in ((left, right, "left", "right"), (right, left, "right", "left")):
        for r in a.cone.rays + a.cone.lineality:
            if not gcone.contains(b.cone, r):
                return f"the ray {fmt_vec(a.space.from_coords(r))} of the {an} side is not in the {bn} side"
        for l in a.cone.lineality:
            neg = tuple(-x for x in l)
            if not gcone.contains(b.cone, neg):
                return f"the ray {fmt_vec(a.space.from_coords(neg))} of the {an} side is not in the {bn} side"
    return "they have different descriptions"


# ---- quotient singularities, discrepancies, intersection theory (semantics/singularities.py) ---
from . import singularities as _singularities  # noqa: E402

_singularities.register(prop, BOOL, INT, GROUP, QUOTIENT, NUMS)
