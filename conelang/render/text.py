"""Plain text output of the computed facts (``conelang show``)."""
from __future__ import annotations

from .common import cone_summary, torus_action_lines, vec, vecs, yesno


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
        var = o.get("variety")
        if var:
            lines.append(f"  affine toric variety U_{name} in C^{var['embedding_dimension']} (dimension {var['dimension']})")
            for i, g in enumerate(var["generators"], 1):
                lines.append(f"    z{i} = χ^{vec(g)}")
            lines.append("    equations: " + (", ".join(var["equations"]) or "none"))
            lines.append("    torus action: " + ", ".join(torus_action_lines(var)))
            lines.append(f"    smooth: {yesno(var['smooth'])}, simplicial: {yesno(var['simplicial'])}, "
                         f"Gorenstein: {yesno(var['gorenstein'])}, Gorenstein index: "
                         f"{var['gorenstein_index'] if var['gorenstein_index'] is not None else 'none (not Q-Gorenstein)'}")
            lines.append(f"    class group: {var['class_group']}"
                         + (f", multiplicity: {var['multiplicity']}" if "multiplicity" in var else ""))
    elif kind == "map":
        lines.append(f"map {name}: {o['source']} -> {o['target']}")
        lines.append(f"  rows: {vecs(o['rows'])}")
        lines.append(f"  injective: {yesno(o['injective'])}, surjective: {yesno(o['surjective'])}")
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
        lines.append(f"fan {name} in {o['lattice']}: {len(o['rays'])} rays, {len(o['cones'])} maximal cones")
        lines.append(f"  rays: {vecs(o['rays'])}")
        lines.append("  cones: " + " ".join("[" + " ".join(map(str, c)) + "]" for c in o["cones"]))
        for key in ("valid", "complete", "smooth", "simplicial"):
            if key in o:
                lines.append(f"  {key}: {yesno(o[key])}")
        for key in ("orbits", "picard_group", "class_group", "self_intersections"):
            if key in o:
                lines.append(f"  {key.replace('_', ' ')}: {o[key]}")
    for err in o.get("errors", []):
        lines.append(f"  (not computed: {err})")
    return lines
