"""Plain text output of the computed facts (``conelang show``)."""
from __future__ import annotations

from . import layer
from .common import missing_equations, cone_summary, torus_action_lines, vec, vecs, yesno


def render(doc: dict) -> str:
    out = []
    for name, o in doc["objects"].items():
        out.extend(render_object(name, o))
        out.append("")
    return "\n".join(out).rstrip() + "\n"


def render_object(name: str, o: dict) -> list[str]:
    kind = o["kind"]
    lines = []
    if kind == "lattice":
        lines.append(f"lattice {name}: rank {o['rank']}")
        if "basis" in o:
            lines.append(f"  basis: {vecs(o['basis'])}")
    elif kind == "cone":
        lines.append(f"cone {name} in {o['lattice']}: {cone_summary(o)}")
        lines.append(f"  rays: {vecs(o['rays'])}")
        if o["lineality"]:
            lines.append(f"  lineality: {vecs(o['lineality'])}")
        lines.append(f"  facets (inner normals): {vecs(o['facets'])}")
        if o["linear_equations"]:
            lines.append(f"  linear equations: {vecs(o['linear_equations'])}")
        if "hilbert_basis" in o:
            lines.append(f"  Hilbert basis of the cone: {vecs(o['hilbert_basis'])}")
        if "hilbert_series" in o:
            from .polytope import hilbert_text
            lines.append(f"  Hilbert series: {hilbert_text(o['hilbert_series'])}")
        var = o.get("variety")
        if var:
            lines.append(f"  affine toric variety U_{name} in C^{var['embedding_dimension']} (dimension {var['dimension']})")
            for i, g in enumerate(var["generators"], 1):
                lines.append(f"    z{i} = χ^{vec(g)}")
            lines.append("    equations: " + (", ".join(var["equations"]) or "none") if "equations" in var
                         else "    equations: " + missing_equations(o))
            lines.append("    torus action: " + ", ".join(torus_action_lines(var)))
            lines.append(f"    smooth: {yesno(var['smooth'])}, simplicial: {yesno(var['simplicial'])}, "
                         f"Gorenstein: {yesno(var['gorenstein'])}, Gorenstein index: "
                         f"{var['gorenstein_index'] if var['gorenstein_index'] is not None else 'none (not Q-Gorenstein)'}")
            lines.append(f"    class group: {var['class_group']}"
                         + (f", multiplicity: {var['multiplicity']}" if "multiplicity" in var else ""))
            lines.extend("    " + x for x in layer.cone_lines(var))
    elif kind == "polytope":
        from .polytope import text_lines
        lines.extend(text_lines(name, o))
    elif kind == "map":
        lines.append(f"map {name}: {o['source']} -> {o['target']}")
        lines.append(f"  rows: {vecs(o['rows'])}")
        lines.append(f"  injective: {yesno(o['injective'])}, surjective: {yesno(o['surjective'])}")
        lines.extend("  " + x for x in layer.map_lines(o))
    elif kind == "morphism":
        lines.append(f"morphism {name} = {o['map']}: {o['source']} -> {o['target']}")
        if not o.get("compatible", True):
            lines.append(f"  not compatible: {o.get('violation', '')}")
        if o.get("kinds") is not None:
            lines.append("  kinds: " + (", ".join(k.replace("_", " ") for k in o["kinds"]) or "none"))
        if o.get("degree") is not None:
            lines.append(f"  degree: {o['degree']}")
        if "pullbacks" in o:
            lines.append(f"  pullbacks (w_j on U_{o['target']} in terms of z_i on U_{o['source']}):")
            for j, p in enumerate(o["pullbacks"], 1):
                lines.append(f"    w{j} ↦ {p}")
        if "torus" in o:
            lines.append("  torus: " + ", ".join(f"t'{k} ↦ {m}" for k, m in enumerate(o["torus"], 1)))
    elif kind == "characters":
        lines.append(f"characters {name} of {o['lattice']}: {vecs(o['characters'])}")
        if "normal" in o:
            lines.append(f"  normal: {yesno(o['normal'])}")
            lines.append(f"  cone of the monoid: rays {vecs(o['cone']['rays'])}")
            lines.append(f"  one-parameter subgroups with a limit: rays {vecs(o['limits_cone']['rays'])}"
                         + (f", lineality {vecs(o['limits_cone']['lineality'])}" if o['limits_cone']['lineality'] else ""))
            if o["holes"]:
                lines.append(f"  holes: {vecs(o['holes'])}")
            lines.append("  equations: " + (", ".join(o["equations"]) or "none"))
    elif kind == "fan":
        lines.extend(fan_lines(name, o))
    for err in o.get("errors", []):
        lines.append(f"  (not computed: {err})")
    return lines


def _cones(cs) -> str:
    return " ".join("[" + " ".join(map(str, c)) + "]" for c in cs) or "none"


def fan_lines(name: str, o: dict) -> list[str]:
    """The text of a fan's facts (validity, invariants, resolution data, charts)."""
    head = f"fan {name} in {o['lattice']}: {len(o['rays'])} rays, {len(o['cones'])} cones listed"
    if "resolves" in o:
        head += f"; a resolution of '{o['resolves']}'" + (f" ({o['resolution']})" if "resolution" in o else "")
    lines = [head]
    lines.append("  rays: " + (" ".join(f"{i}:{vec(r)}" for i, r in enumerate(o["rays"], 1)) or "none"))
    lines.append(f"  cones: {_cones(o['cones'])}")
    if o.get("maximal_cones") is not None and o["maximal_cones"] != o["cones"]:
        lines.append(f"  maximal cones: {_cones(o['maximal_cones'])}")
    flags = [f"{k}: {yesno(o[k])}" for k in ("valid", "complete", "smooth", "simplicial") if k in o]
    if flags:
        lines.append("  " + ", ".join(flags))
    for p in o.get("problems", []):
        lines.append(f"  not a fan: {p['message']} [{p['code']}]")
    if "orbits" in o:
        lines.append("  torus orbits of dimension " + ", ".join(f"{k}: {n}" for k, n in enumerate(o["orbits"])))
    if "picard_group" in o:
        extra = f"; [Cl : Pic] = {o['picard_index']}" if o.get("picard_index") is not None else ""
        lines.append(f"  Picard group: {o['picard_group']}, class group: {o['class_group']}{extra}")
    si = o.get("self_intersections")
    if si and any(x is not None for x in si):
        lines.append("  self-intersections: " + ", ".join(f"D{i}^2 = {x}" for i, x in enumerate(si, 1) if x is not None))
    if "continued_fraction" in o:
        n, q = o["cyclic_quotient"]
        cf = o["continued_fraction"]
        lines.append(f"  cyclic quotient singularity 1/{n}(1, {q}); Hirzebruch–Jung continued fraction "
                     f"{n}/{q} = [{', '.join(map(str, cf))}]" if cf else f"  the cone is smooth (1/{n}(1, {q}))")
    if "crepant_rays" in o:
        lines.append(f"  crepant partial resolution (lattice points at height one): rays {vecs(o['crepant_rays'])}; "
                     f"smooth: {yesno(o['crepant_smooth'])}")
    lines.extend("  " + x for x in layer.fan_lines(o))
    charts = o.get("charts") or []
    if charts:
        lines.append("  affine charts:")
        for ch in charts:
            label = "U_[" + " ".join(map(str, ch["cone"])) + "]"
            gens = ", ".join(f"z{i} = χ^{vec(g)}" for i, g in enumerate(ch["generators"], 1))
            eqs = ", ".join(ch["equations"]) or "none"
            lines.append(f"    {label}: {gens}; equations: {eqs}")
    return lines
