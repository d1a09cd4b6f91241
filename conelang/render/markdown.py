"""Markdown output: ``conelang show --format markdown`` and the editor's hover."""
from __future__ import annotations

from .common import cone_summary, torus_action_lines, vec, vecs, yesno


def render(doc: dict) -> str:
    parts = [f"# {doc['file']}", ""]
    for name, o in doc["objects"].items():
        parts.append(render_object(name, o, level=2))
        parts.append("")
    return "\n".join(parts).rstrip() + "\n"


def _code(s: str) -> str:
    return f"`{s}`"


def render_object(name: str, o: dict, level: int = 2) -> str:
    h = "#" * level
    kind = o["kind"]
    L: list[str] = []
    if kind == "lattice":
        L.append(f"{h} lattice `{name}` — rank {o['rank']}")
        if "basis" in o:
            L.append(f"basis: {_code(vecs(o['basis']))}")
    elif kind == "cone":
        L.append(f"{h} cone `{name}` in `{o['lattice']}`")
        L.append(f"*{cone_summary(o)}*")
        L.append("")
        L.append("| | |\n|---|---|")
        L.append(f"| rays | {_code(vecs(o['rays']))} |")
        if o["lineality"]:
            L.append(f"| lineality | {_code(vecs(o['lineality']))} |")
        L.append(f"| facets (inner normals) | {_code(vecs(o['facets']))} |")
        if o["linear_equations"]:
            L.append(f"| linear span equations | {_code(vecs(o['linear_equations']))} |")
        if "hilbert_basis" in o:
            L.append(f"| Hilbert basis of σ ∩ N | {_code(vecs(o['hilbert_basis']))} |")
        var = o.get("variety")
        if var:
            L.append("")
            L.append(f"**U_{name} = Spec C[σ^∨ ∩ M] ⊂ C^{var['embedding_dimension']}**, dimension {var['dimension']}")
            L.append("")
            L.append("generators of σ^∨ ∩ M: " + ", ".join(f"z{i} = χ^{vec(g)}" for i, g in enumerate(var["generators"], 1)))
            L.append("")
            if var["equations"]:
                L.append("equations:\n```\n" + "\n".join(var["equations"]) + "\n```")
            else:
                L.append("equations: none (U is an affine space times a torus)")
            L.append("torus action: " + ", ".join(_code(x) for x in torus_action_lines(var)))
            L.append("")
            gi = var["gorenstein_index"]
            inv = [f"smooth {yesno(var['smooth'])}", f"Gorenstein {yesno(var['gorenstein'])}",
                   f"index {gi if gi is not None else 'none (not Q-Gorenstein)'}",
                   f"class group {_code(var['class_group'])}"]
            if "multiplicity" in var:
                inv.append(f"multiplicity {var['multiplicity']}")
            L.append(" · ".join(inv))
    elif kind == "map":
        L.append(f"{h} map `{name}`: `{o['source']}` → `{o['target']}`")
        L.append("```\n" + "\n".join(vec(r) for r in o["rows"]) + "\n```")
        L.append(f"injective {yesno(o['injective'])} · surjective {yesno(o['surjective'])}")
    elif kind == "morphism":
        L.append(f"{h} morphism `{name}` = `{o['map']}`: `{o['source']}` → `{o['target']}`")
        if not o.get("compatible", True):
            L.append(f"**not compatible:** {o.get('violation', '')}")
        if o.get("kinds"):
            L.append("*" + ", ".join(k.replace("_", " ") for k in o["kinds"]) + "*"
                     + (f" · degree {o['degree']}" if o.get("degree") is not None else ""))
        if "pullbacks" in o:
            L.append("")
            L.append(f"pullbacks (w_j on U_{o['target']} in terms of z_i on U_{o['source']}): "
                     + ", ".join(_code(f"w{j} ↦ {p}") for j, p in enumerate(o["pullbacks"], 1)))
        if "torus" in o:
            L.append("")
            L.append("torus: " + ", ".join(_code(f"t'{k} ↦ {m}") for k, m in enumerate(o["torus"], 1)))
    elif kind == "characters":
        L.append(f"{h} characters `{name}` of `{o['lattice']}`")
        L.append(f"{_code(vecs(o['characters']))}")
        if "normal" in o:
            L.append(f"\nnormal: {yesno(o['normal'])}; monoid cone rays {_code(vecs(o['cone']['rays']))}; "
                     f"one-parameter subgroups with a limit: rays {_code(vecs(o['limits_cone']['rays']))}")
            if o["holes"]:
                L.append(f"\nholes: {_code(vecs(o['holes']))}")
            if o["equations"]:
                L.append("\nequations of the orbit closure:\n```\n" + "\n".join(o["equations"]) + "\n```")
    elif kind == "fan":
        L.append(f"{h} fan `{name}` in `{o['lattice']}`")
        L.append(f"rays {_code(vecs(o['rays']))}; cones " + " ".join(_code(str(c)) for c in o["cones"]))
        flags = [f"{k} {yesno(o[k])}" for k in ("valid", "complete", "smooth", "simplicial") if k in o]
        if flags:
            L.append(" · ".join(flags))
        for key in ("orbits", "picard_group", "class_group", "self_intersections"):
            if key in o:
                L.append(f"{key.replace('_', ' ')}: {_code(str(o[key]))}")
    for err in o.get("errors", []):
        L.append(f"\n*not computed:* {err}")
    return "\n".join(L)
