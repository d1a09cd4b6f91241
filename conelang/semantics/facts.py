"""The computed facts of each object, as plain JSON-ready data (the ``objects`` of docs/language.md).

Every renderer (text, Markdown, LaTeX, JSON, hover) formats these dictionaries, so a fact
is computed in one place.  Vectors are in user coordinates: lists of ints, or of strings
``"p/q"`` where a coordinate is not an integer.  Heavy parts that fail (budget, not pointed)
are left out and explained in the object's ``"errors"`` list.
"""
from __future__ import annotations

from fractions import Fraction

from ..geometry import linalg
from ..geometry import maps as gmaps
from ..geometry.budget import BudgetExceeded, Cancelled
from . import values as V
from .engine import NotAvailable, NotPointed
from .properties import group_string
from .engine import guard as _guard
from .imports import Imported
from .pictures import window_radius
from .forms import fan_problem_message, fmt_vec, jnum, jvec  # noqa: F401 (jnum, jvec: also used by the renderers' callers)


def _user(space: V.Space, coords) -> list:
    return jvec(space.from_coords(coords))


def object_facts(analysis, name: str, heavy: bool = True, equations: bool = True) -> dict | None:
    """The facts of the definition ``name`` (None when it has errors).  ``heavy=False`` leaves
    out everything that may be slow; ``equations=False`` leaves out only the binomial equations
    of a cone's variety (the editor shows the rest first)."""
    entry = analysis.defs.get(name)
    if isinstance(entry, Imported):          # the facts of the file that defines it
        return object_facts(entry.source, entry.source_name, heavy, equations)
    value = analysis.value(name)
    if value is None:
        return None
    if isinstance(value, V.LatticeValue):
        return lattice_facts(value)
    if isinstance(value, V.ConeValue):
        return cone_facts(analysis, value, heavy, equations)
    if isinstance(value, V.MapValue):
        return map_facts(value, analysis.defs[name])
    if isinstance(value, V.MorphismValue):
        return morphism_facts(analysis, value, heavy)
    if isinstance(value, V.CharactersValue):
        return characters_facts(analysis, value, heavy)
    if isinstance(value, V.FanValue):
        return fan_facts(analysis, value, heavy)
    if isinstance(value, V.PolytopeValue):
        return polytope_facts(analysis, value, heavy)
    return None


def lattice_facts(value: V.LatticeValue) -> dict:
    s = value.space
    out = {"kind": "lattice", "rank": s.rank}
    if not s.is_standard or s.is_dual:
        out["basis"] = [jvec(b) for b in s.coordinate_basis]
    if s.is_dual:
        out["dual_of"] = s.key
    return out


def cone_facts(analysis, value: V.ConeValue, heavy: bool = True, equations: bool = True) -> dict:
    s, c = value.space, value.cone
    dual_space = s.dual()
    out = {
        "kind": "cone", "lattice": s.label, "ambient_dim": c.ambient_dim, "dim": c.dim,
        "pointed": c.pointed, "full": c.full, "simplicial": c.simplicial,
        "rays": [_user(s, r) for r in c.rays],
        "lineality": [_user(s, l) for l in c.lineality],
        "facets": [_user(dual_space, u) for u in c.facets],
        "linear_equations": [_user(dual_space, e) for e in c.equations],
    }
    if not c.pointed:
        from ..geometry import cone as gcone
        out["line"] = _user(s, gcone.a_line_in(c))
    if not heavy:
        return out
    errors: list[str] = []
    hb = _guard(errors, "Hilbert basis", lambda: analysis.engine.hilbert_basis(c))
    if hb is not None:
        out["hilbert_basis"] = [_user(s, h) for h in hb]
    if c.pointed:
        out["variety"] = variety_facts(analysis, value, errors, equations)
    if c.pointed and len(c.rays) > HILBERT_SERIES_MAX_RAYS:
        errors.append(f"Hilbert series: not computed for a cone with {len(c.rays)} rays (more than "
                      f"{HILBERT_SERIES_MAX_RAYS}); 'expect … hilbert_numerator = …' computes it within the budget")
    elif c.pointed:
        hs = _guard(errors, "Hilbert series", lambda: hilbert_series_facts(analysis, value))
        if hs is not None:
            out["hilbert_series"] = hs
    if c.ambient_dim == 2:
        out.update(window_facts(value, out))
    if errors:
        out["errors"] = errors
    return out


def variety_facts(analysis, value: V.ConeValue, errors: list, equations: bool = True) -> dict | None:
    """The affine toric variety's facts, field by field: its coordinates (the Hilbert basis of
    σ^∨), torus action and invariants never wait for the equations, and equations that are over
    budget leave out only ``equations`` and ``binomials`` (with an ``errors`` entry)."""
    from ..geometry.toric import laurent_monomial_string
    s, c = value.space, value.cone
    eng = analysis.engine
    gens = _guard(errors, "affine toric variety", lambda: eng.coordinates(c))
    if gens is None:
        return None
    inv = lambda name: _guard(errors, name.replace("_", " "), lambda: eng.invariant(name, c))
    gi = inv("gorenstein_index")
    cg = inv("class_group")
    out = {
        "generators": [_user(s.dual(), g) for g in gens],
        "dimension": c.ambient_dim,
        "embedding_dimension": len(gens),
        "smooth": inv("is_smooth"),
        "simplicial": c.simplicial,
        "gorenstein": gi == 1,
        "qgorenstein": gi is not None,
        "gorenstein_index": gi,
        "class_group": group_string(cg) if cg is not None else None,
        "multiplicity": inv("multiplicity"),
        "torus_action": [laurent_monomial_string(u) for u in gens],
    }
    var = _guard(errors, "equations", lambda: eng.variety(c)) if equations else None
    if var is not None:       # the keys in their documented order: generators, equations, binomials, …
        eqs = {"equations": list(var.equations),
               "binomials": [[list(p), list(m)] for p, m in var.binomials]}
        out = {"generators": out.pop("generators"), **eqs, **out}
    if out["multiplicity"] is None:
        del out["multiplicity"]
    from .singularities import singularity_facts
    out.update(singularity_facts(analysis, value, errors))
    return out


def map_facts(value: V.MapValue, st) -> dict:
    return {"kind": "map", "source": value.source.label, "target": value.target.label,
            "rows": [jvec(r) for r in value.ambient_rows],
            "lattice_matrix": [list(r) for r in value.matrix],
            "injective": gmaps.is_injective(value.matrix, value.source.rank),
            "surjective": gmaps.is_surjective(value.matrix, value.source.rank),
            **_map_extra(value)}


def _map_extra(value):
    from .singularities import map_extra_facts
    return map_extra_facts(value)


def morphism_facts(analysis, value: V.MorphismValue, heavy: bool = True) -> dict:
    """``compatible`` is computed (a morphism kept for ``expect … not compatible`` is not);
    an incompatible one gets ``violation`` (the message) and nothing else.  ``lattice_matrix``
    is the map in lattice coordinates (useful for a composite ``g ∘ f``, which has no map
    definition of its own); the heavy part adds ``pullbacks``, ``pullback_exponents``,
    ``torus``, ``kinds`` and ``degree`` (from :meth:`Engine.morphism`): ``pullbacks`` the
    target coordinates w_j as monomials in the source coordinates z_i, ``torus`` t'_k as
    Laurent monomials in t_i."""
    from .properties import violation_message
    violation = violation_message(value)
    out = {"kind": "morphism", "map": value.map_name, "source": value.source_name,
           "target": value.target_name, "compatible": violation is None,
           "lattice_matrix": [list(r) for r in value.map.matrix]}
    if violation is not None:
        out["violation"] = violation
        return out
    if not heavy:
        return out
    errors: list[str] = []
    mor = _guard(errors, "induced morphism", lambda: analysis.engine.morphism(value))
    if mor is not None:
        kinds, exps = mor
        out.update({"pullbacks": [gmaps.monomial_string(a) for a in exps],
                    "pullback_exponents": [list(a) for a in exps],
                    "torus": list(gmaps.torus_map(value.map.matrix, value.map.source.rank)),
                    "kinds": list(kinds.kinds()),
                    "degree": kinds.degree})
    if errors:
        out["errors"] = errors
    return out


def characters_facts(analysis, value: V.CharactersValue, heavy: bool = True) -> dict:
    out = {"kind": "characters", "lattice": value.space.label,
           "characters": [_user(value.space.dual(), u) for u in value.characters]}
    if not heavy:
        return out
    errors: list[str] = []
    ch = _guard(errors, "characters", lambda: analysis.engine.characters(value))
    if ch is not None:
        dual_space = value.space.dual()
        out.update({
            "normal": ch.normal,
            "group_rank": ch.group_rank,
            "cone": {"rays": [_user(dual_space, r) for r in ch.cone.rays],
                     "lineality": [_user(dual_space, r) for r in ch.cone.lineality]},
            "limits_cone": {"rays": [_user(value.space, r) for r in ch.limit_cone.rays],
                            "lineality": [_user(value.space, r) for r in ch.limit_cone.lineality]},
            "holes": [_user(dual_space, h) for h in ch.holes],
            "equations": list(ch.equations),
            "binomials": [[list(p), list(m)] for p, m in ch.binomials],
        })
    if errors:
        out["errors"] = errors
    return out


def fan_facts(analysis, value: V.FanValue, heavy: bool = True) -> dict:
    """Facts of a fan: validity (with the problems of an invalid one), completeness,
    smoothness, orbits, Picard and class groups, self-intersections (smooth surfaces), the
    data of a resolution (``resolves``), and the affine charts of the maximal cones."""
    s = value.space
    out = {"kind": "fan", "lattice": s.label,
           "rays": [_user(s, r) for r in value.rays],
           "cones": [[i + 1 for i in c] for c in value.cones]}
    if value.source_cone:
        out["resolves"] = value.source_cone
    errors: list[str] = []
    eng = analysis.engine
    check = _guard(errors, "fan", lambda: eng.fan_check(value))
    if check is not None:
        out["valid"] = check.valid
        if not check.valid:
            fmt = lambda x: fmt_vec(s.from_coords(x))
            out["problems"] = [{"code": p.code, "message": fan_problem_message(p, fmt)} for p in check.errors]
    if heavy and check is not None and check.valid:
        inv = _guard(errors, "fan invariants", lambda: eng.fan_facts(value))
        if inv is not None:
            out.update({
                "complete": inv.complete, "smooth": inv.smooth, "simplicial": inv.simplicial,
                "orbits": list(inv.orbits),
                "picard_group": group_string(inv.picard_group),
                "class_group": group_string(inv.class_group),
                "picard_index": inv.picard_index,
                "maximal_cones": [[i + 1 for i in check.cones[ci]] for ci in check.maximal],
            })
            if inv.self_intersections is not None:
                out["self_intersections"] = list(inv.self_intersections)
        from .singularities import fan_extra_facts
        out.update(fan_extra_facts(analysis, value, inv, errors))
        if value.source_cone:
            res = _guard(errors, "resolution", lambda: _resolution_of(analysis, value))
            if res is not None:
                out["resolution"] = "crepant partial resolution" if value.crepant else res.method
                if res.continued_fraction is not None:
                    out["continued_fraction"] = list(res.continued_fraction)
                    out["cyclic_quotient"] = list(res.cyclic_quotient)
                if res.crepant_rays is not None:
                    out["crepant_rays"] = [_user(s, r) for r in res.crepant_rays]
                    out["crepant_cones"] = [[i + 1 for i in c] for c in res.crepant_cones]
                    out["crepant_smooth"] = res.crepant_smooth
        out["charts"] = _charts(analysis, value, check, errors)
    if errors:
        out["errors"] = errors
    return out


MAX_CHARTS = 64


def _resolution_of(analysis, value: V.FanValue):
    cone = analysis.value(value.source_cone)
    if cone is None:
        raise NotAvailable(f"'{value.source_cone}' has errors")
    return analysis.engine.resolve(cone.cone)


def _charts(analysis, value: V.FanValue, check, errors: list) -> list:
    """The affine chart U_σ of each maximal cone σ: coordinates z_i = χ^{m_i} and equations."""
    charts = []
    dual_space = value.space.dual()
    for ci in check.maximal[:MAX_CHARTS]:
        cone = check.geometry[ci]
        label = "[" + " ".join(str(i + 1) for i in check.cones[ci]) + "]"
        var = _guard(errors, f"chart of the cone {label}", lambda: analysis.engine.variety(cone))
        if var is None:
            continue
        charts.append({"cone": [i + 1 for i in check.cones[ci]],
                       "generators": [_user(dual_space, g) for g in var.generators],
                       "equations": list(var.equations)})
    if len(check.maximal) > MAX_CHARTS:
        errors.append(f"charts: only the first {MAX_CHARTS} of {len(check.maximal)} maximal cones are shown")
    return charts


WINDOW_MIN, WINDOW_MAX = 3, 8


def _window_points(space: V.Space, cone, radius: int) -> list:
    """The lattice points of ``cone`` (lattice coordinates, a cone in ``space``) whose user
    coordinates lie in ``[-radius, radius]^2``, in user coordinates, sorted."""
    from ..geometry import cone as gcone
    basis = space.coordinate_basis                       # user coordinates of the lattice basis
    inv = linalg.inverse_rational(basis)                 # x = v · inv
    bounds = [sum(abs(inv[i][j]) for i in range(2)) * radius for j in range(2)]
    bounds = [int(b) + 1 for b in bounds]
    pts = []
    for x0 in range(-bounds[0], bounds[0] + 1):
        for x1 in range(-bounds[1], bounds[1] + 1):
            v = space.from_coords((x0, x1))
            if all(abs(c) <= radius for c in v) and gcone.contains(cone, (x0, x1)):
                pts.append(tuple(Fraction(c) for c in v))
    return [jvec(p) for p in sorted(pts)]


def window_facts(value: V.ConeValue, facts: dict) -> dict:
    """For a cone in a lattice of rank 2 (the pictures): the lattice points of σ and of σ^∨
    in the window ``[-R, R]^2`` of user coordinates, R just large enough for the rays and the
    Hilbert bases (between 3 and 8)."""
    vecs = list(facts.get("rays", [])) + list(facts.get("hilbert_basis", []))
    var = facts.get("variety") or {}
    vecs += list(var.get("generators", [])) + list(facts.get("facets", []))
    radius = window_radius(vecs, WINDOW_MIN, WINDOW_MAX)
    from ..geometry import cone as gcone
    return {"lattice_window": radius,
            "lattice_points": _window_points(value.space, value.cone, radius),
            "dual_lattice_points": _window_points(value.space.dual(), gcone.dual(value.cone), radius)}


HILBERT_SERIES_MAX_RAYS = 40     # larger cones: the series is left to `expect`, not shown


def hilbert_series_facts(analysis, value: V.ConeValue) -> dict:
    """The Hilbert series of the monoid σ ∩ N: ``grading`` (dual lattice, user coordinates),
    ``numerator`` (coefficients, constant term first) over ``denominator`` (the exponents e_i of
    Π (1 - t^e_i)), ``multiplicity``, and ``quasi_polynomial`` (one coefficient list per residue
    modulo ``period``, valid from degree ``valid_from``) or ``polynomial`` when the period is 1."""
    hs = analysis.engine.hilbert_series(value)
    out = {"grading": _user(value.space.dual(), hs.grading),
           "grading_given": value.grading is not None,
           "numerator": list(hs.numerator), "denominator": list(hs.denominator),
           "multiplicity": jnum(hs.multiplicity), "valid_from": hs.valid_from}
    if hs.period == 1:
        out["polynomial"] = jvec(hs.quasi_polynomial[0])
    else:
        out["period"] = hs.period
        out["quasi_polynomial"] = [jvec(q) for q in hs.quasi_polynomial]
    return out


def polytope_facts(analysis, value: V.PolytopeValue, heavy: bool = True) -> dict:
    """Facts of a lattice polytope (user coordinates): ``vertices``, ``facets`` as
    ``{"normal": u, "offset": c}`` for ``<u, x> >= -c`` (u in the dual lattice),
    ``equations`` of the affine hull (same form, ``= -c``), ``f_vector``, ``reflexive``,
    ``gorenstein_index``, ``origin_interior``; the heavy part adds ``lattice_points`` (the count),
    ``points`` (the list, up to a limit), ``interior_points`` (count), ``interior``
    (the list), ``boundary_points``, ``volume`` (normalized), ``h_star`` and ``ehrhart``
    (coefficients, constant term first)."""
    from ..geometry import polytope as gp
    s, P = value.space, value.polytope
    dual = s.dual()
    out = {"kind": "polytope", "lattice": s.label, "ambient_dim": P.ambient_dim, "dim": P.dim,
           "vertices": [_user(s, v) for v in P.vertices],
           "facets": [{"normal": _user(dual, u), "offset": c} for u, c in P.facets],
           "equations": [{"normal": _user(dual, u), "offset": c} for u, c in P.equations],
           "reflexive": gp.is_reflexive(P), "gorenstein_index": gp.gorenstein_index(P),
           "origin_interior": gp.origin_in_interior(P)}
    errors: list[str] = []
    fv = _guard(errors, "f-vector", lambda: analysis.engine.f_vector(P))
    if fv is not None:
        out["f_vector"] = list(fv)
    vol = _guard(errors, "volume", lambda: analysis.engine.normalized_volume(P))
    if vol is not None:
        out["volume"] = vol
    if heavy:
        data = _guard(errors, "lattice points", lambda: analysis.engine.polytope_data(P))
        if data is not None:
            h, e = data.h_star, P.dim
            count = (e + 1) * h[0] + (h[1] if len(h) > 1 else 0)
            inner = h[e] if len(h) > e else 0
            out.update({"lattice_points": count, "interior_points": inner, "boundary_points": count - inner,
                        "h_star": list(h),
                        "ehrhart": jvec(gp.ehrhart_from_h_star(h, e))})
            if data.points is not None:
                out["points"] = [_user(s, x) for x in data.points]
                out["interior"] = [_user(s, x) for x in data.points if gp.in_interior(P, x)]
            else:
                errors.append(f"points: more than {gp.LIST_LIMIT} lattice points, only counted")
    if errors:
        out["errors"] = errors
    return out
