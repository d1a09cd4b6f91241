"""Markdown output: ``conelang show --format markdown`` and the editor's hover."""
from __future__ import annotations

from . import layer
from .common import missing_equations, cone_summary, torus_action_lines, vec, vecs, yesno


def render(doc: dict) -> str:
    parts = [f"# {doc['file']}", ""]
    for name, o in doc["objects"].items():
        parts.append(render_object(name, o, level=2))
        parts.append("")
    return "\n".join(parts).rstrip() + "\n"


def _code(s: str) -> str:
    return f"`{s}`"


def render_object(name: str, o: dict, level: int = 2) -> str:
    """The Markdown of one object's facts under a heading of ``level``: the part of its kind
    (``_KIND_MARKDOWN``), then what could not be computed."""
    h = "#" * level
    part = _KIND_MARKDOWN.get(o["kind"])
    L: list[str] = part(name, o, h) if part else []
    for err in o.get("errors", []):
        L.append(f"\n*not computed:* {err}")
    return "\n".join(L)


def _lattice_markdown(name: str, o: dict, h: str) -> list[str]:
    L = [f"{h} lattice `{name}` — rank {o['rank']}"]
    if "basis" in o:
        L.append(f"basis: {_code(vecs(o['basis']))}")
    return L


def _cone_markdown(name: str, o: dict, h: str) -> list[str]:
    L = [f"{h} cone `{name}` in `{o['lattice']}`", f"*{cone_summary(o)}*", "", "| | |\n|---|---|",
         f"| rays | {_code(vecs(o['rays']))} |"]
    if o["lineality"]:
        L.append(f"| lineality | {_code(vecs(o['lineality']))} |")
    L.append(f"| facets (inner normals) | {_code(vecs(o['facets']))} |")
    if o["linear_equations"]:
        L.append(f"| linear span equations | {_code(vecs(o['linear_equations']))} |")
    if "hilbert_basis" in o:
        L.append(f"| Hilbert basis of σ ∩ N | {_code(vecs(o['hilbert_basis']))} |")
    if "hilbert_series" in o:
        from .polytope import hilbert_text
        L.append(f"| Hilbert series of σ ∩ N | {_code(hilbert_text(o['hilbert_series']))} |")
    if o.get("variety"):
        L.extend(_variety_markdown(name, o))
    return L


def _variety_markdown(name: str, o: dict) -> list[str]:
    """The affine toric variety of a cone: generators, equations, torus action, invariants."""
    var = o["variety"]
    L = ["", f"**U_{name} = Spec C[σ^∨ ∩ M] ⊂ C^{var['embedding_dimension']}**, dimension {var['dimension']}", "",
         "generators of σ^∨ ∩ M: " + ", ".join(f"z{i} = χ^{vec(g)}" for i, g in enumerate(var["generators"], 1)),
         ""]
    if "equations" not in var:
        L.append("equations: " + missing_equations(o))
    elif var["equations"]:
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
    L.extend("\n" + x for x in layer.cone_lines(var))
    return L


def _map_markdown(name: str, o: dict, h: str) -> list[str]:
    L = [f"{h} map `{name}`: `{o['source']}` → `{o['target']}`",
         "```\n" + "\n".join(vec(r) for r in o["rows"]) + "\n```",
         f"injective {yesno(o['injective'])} · surjective {yesno(o['surjective'])}"]
    L.extend("\n" + x for x in layer.map_lines(o))
    return L


def _morphism_markdown(name: str, o: dict, h: str) -> list[str]:
    L = [f"{h} morphism `{name}` = `{o['map']}`: `{o['source']}` → `{o['target']}`"]
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
    return L


def _characters_markdown(name: str, o: dict, h: str) -> list[str]:
    L = [f"{h} characters `{name}` of `{o['lattice']}`", f"{_code(vecs(o['characters']))}"]
    if "normal" in o:
        L.append(f"\nnormal: {yesno(o['normal'])}; monoid cone rays {_code(vecs(o['cone']['rays']))}; "
                 f"one-parameter subgroups with a limit: rays {_code(vecs(o['limits_cone']['rays']))}")
        if o["holes"]:
            L.append(f"\nholes: {_code(vecs(o['holes']))}")
        if o["equations"]:
            L.append("\nequations of the orbit closure:\n```\n" + "\n".join(o["equations"]) + "\n```")
    return L


def _polytope_markdown(name: str, o: dict, h: str) -> list[str]:
    from .polytope import markdown_lines
    return list(markdown_lines(name, o, h))


def _mcones(cs) -> str:
    return " ".join(_code("[" + " ".join(map(str, c)) + "]") for c in cs) or "none"


def fan_markdown(name: str, o: dict, h: str) -> list[str]:
    """Markdown of a fan's facts (validity, invariants, resolution data, charts)."""
    L = [f"{h} fan `{name}` in `{o['lattice']}`"]
    if "resolves" in o:
        L.append(f"*a smooth refinement of `{o['resolves']}`" + (f" ({o['resolution']})*" if "resolution" in o else "*"))
    L.append("")
    L.append("| | |\n|---|---|")
    L.append("| rays | " + (" ".join(f"{i}: {_code(vec(r))}" for i, r in enumerate(o["rays"], 1)) or "none") + " |")
    L.append(f"| cones | {_mcones(o['cones'])} |")
    if o.get("maximal_cones") is not None and o["maximal_cones"] != o["cones"]:
        L.append(f"| maximal cones | {_mcones(o['maximal_cones'])} |")
    if "orbits" in o:
        L.append("| torus orbits by dimension | " + ", ".join(f"{k}: {n}" for k, n in enumerate(o["orbits"])) + " |")
    if "picard_group" in o:
        L.append(f"| Picard group | {_code(o['picard_group'])} |")
        L.append(f"| class group | {_code(o['class_group'])} |")
        if o.get("picard_index") is not None:
            L.append(f"| [Cl : Pic] | {o['picard_index']} |")
    si = o.get("self_intersections")
    if si and any(x is not None for x in si):
        L.append("| self-intersections | " + ", ".join(f"D{i}² = {x}" for i, x in enumerate(si, 1) if x is not None) + " |")
    if o.get("continued_fraction"):
        n, q = o["cyclic_quotient"]
        L.append(f"| singularity | 1/{n}(1, {q}); {n}/{q} = [{', '.join(map(str, o['continued_fraction']))}] |")
    if "crepant_rays" in o:
        L.append(f"| crepant partial resolution | rays {_code(vecs(o['crepant_rays']))}, smooth {yesno(o['crepant_smooth'])} |")
    L.append("")
    flags = [f"{k} {yesno(o[k])}" for k in ("valid", "complete", "smooth", "simplicial") if k in o]
    if flags:
        L.append(" · ".join(flags))
    for p in o.get("problems", []):
        L.append(f"\n**not a fan:** {p['message']} (`{p['code']}`)")
    L.extend("\n" + x for x in layer.fan_lines(o))
    charts = o.get("charts") or []
    if charts:
        L.append("\naffine charts:")
        for ch in charts:
            gens = ", ".join(f"z{i} = χ^{vec(g)}" for i, g in enumerate(ch["generators"], 1))
            eqs = ", ".join(_code(e) for e in ch["equations"]) or "none"
            L.append(f"- U_[{' '.join(map(str, ch['cone']))}]: {gens}; equations: {eqs}")
    return L


_KIND_MARKDOWN = {"lattice": _lattice_markdown, "cone": _cone_markdown, "map": _map_markdown,
                  "morphism": _morphism_markdown, "characters": _characters_markdown,
                  "fan": fan_markdown, "polytope": _polytope_markdown}
