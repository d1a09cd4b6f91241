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
from .diagnostics import Related
from .engine import NotAvailable, NotPointed

BOOL, INT, GROUP, OPT_INT, INTS = "yes/no", "integer", "abelian group", "integer or none", "list of integers"
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
def violation_message(v) -> str | None:
    """Why the map of a morphism value does not send the source into the target (user
    coordinates: the ray, its image, the violated inequality or equation and its value), or
    None when it does."""
    from ..geometry import maps
    from .analysis import fmt_vec
    bad = maps.first_violation(v.map.matrix, v.source.cone, v.target.cone)
    if bad is None:
        return None
    ray, img, normal, val, is_eq = bad
    rv = fmt_vec(v.source.space.from_coords(ray))
    iv = fmt_vec(v.target.space.from_coords(img))
    nv = fmt_vec(v.target.space.dual().from_coords(normal))
    if is_eq:
        what = (f"which violates the equation <{nv}, v> = 0 of the span of '{v.target_name}': "
                f"<{nv}, {iv}> = {val} ≠ 0")
    else:
        what = (f"which violates the inequality <{nv}, v> ≥ 0 of '{v.target_name}': "
                f"<{nv}, {iv}> = {val} < 0")
    return (f"'{v.map_name}' does not send '{v.source_name}' into '{v.target_name}': it sends the ray "
            f"{rv} of '{v.source_name}' to {iv}, {what}")


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
    check = a.engine.fan_check(v)
    if not check.valid:
        from .analysis import fmt_vec
        raise NotAvailable("it is not a fan: " + check.errors[0].message(lambda x: fmt_vec(v.space.from_coords(x))))
    return a.engine.fan_facts(v)


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
    return len(_fan_invariants(a, v).maximal_cones)


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


# ---- checking -------------------------------------------------------------------------------
def parse_group(text: str):
    """Parse ``"Z^2 + Z/3"`` into ``(free_rank, invariant factors)``; None when malformed.

    >>> parse_group("Z/2 + Z/3"), parse_group("0"), parse_group("Z^2+Z/4")
    ((0, (6,)), (0, ()), (2, (4,)))
    """
    text = text.replace(" ", "")
    if text in ("0", ""):
        return (0, ())
    free, torsion = 0, []
    for term in text.split("+"):
        if term == "Z":
            free += 1
        elif term.startswith("Z^") and term[2:].isdigit():
            free += int(term[2:])
        elif term.startswith("Z/") and term[2:].isdigit() and int(term[2:]) > 0:
            torsion.append(int(term[2:]))
        elif term == "0":
            continue
        else:
            return None
    diag = [[t if i == j else 0 for j in range(len(torsion))] for i, t in enumerate(torsion)]
    inv = linalg.snf_invariants(diag, len(torsion)) if torsion else ()
    return (free, tuple(d for d in inv if d != 1))


def group_string(g) -> str:
    free, inv = g
    return linalg.abelian_group_string(inv, free)


def show_result(value) -> str:
    if value is None:
        return "none"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, tuple) and len(value) == 2 and isinstance(value[1], tuple):
        return f'"{group_string(value)}"'
    if isinstance(value, tuple):
        return "(" + ", ".join(map(str, value)) + ")"
    return str(value)


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
        from .analysis import EvalError
        try:
            other = analysis._cone_expr(ex.cone)
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
        known = ", ".join(q.name for q in properties_for(kind)) or "none yet"
        sink.error(ex.prop.span, "unknown-property", f"'{pname}' is not a property of a {kind}; known: {known}")
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
        sink.error(ex.span, "budget", f"cannot check '{pname}' of '{subject}': {exc}; raise it with --budget")
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
    from .analysis import fmt_vec
    return fmt_vec(value.space.from_coords(coords))


def _difference(analysis, left, right) -> str:
    """Say how two cones in the same lattice differ: a ray of one outside the other."""
    from .analysis import fmt_vec
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

_singularities.register(prop, BOOL, INT, GROUP)
