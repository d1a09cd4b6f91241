"""Sentences for the facts of quotient singularities, discrepancies, intersection theory and
maps (see ``semantics/singularities.py``), shared by the text, Markdown and LaTeX renderers."""
from __future__ import annotations

from .common import vec, vecs, yesno

MAX_LISTED = 24


def _short(items: list[str]) -> str:
    if len(items) > MAX_LISTED:
        return ", ".join(items[:MAX_LISTED]) + f", … ({len(items)} in all)"
    return ", ".join(items)


def cone_lines(var: dict) -> list[str]:
    """The quotient and the classes of singularities of a cone's ``variety`` facts.

    >>> cone_lines({"quotient": "1/3(1,1,1)", "quotient_group": "Z/3", "quotient_rays": [[1, 0]],
    ...             "quotient_generators": [["1/3"]], "ages": {"1": 1, "2": 1}, "junior": [[0, 1]]})[0]
    'quotient singularity 1/3(1,1,1): N/N′ = Z/3, weights in the order of the rays (1, 0)'
    """
    out = []
    if "quotient" in var:
        out.append(f"quotient singularity {var['quotient']}: N/N′ = {var['quotient_group']}, "
                   f"weights in the order of the rays {vecs(var['quotient_rays'])}")
        if var.get("quotient_generators"):
            out.append("generators (weights): " + vecs(var["quotient_generators"]))
        if var.get("ages"):
            out.append("ages of the nonzero elements: "
                       + ", ".join(f"{a} (×{n})" for a, n in var["ages"].items()))
        out.append("junior elements (age 1): "
                   + (_short([vec(p) for p in var["junior"]]) if var["junior"] else "none"))
    if "terminal" in var:
        w = var.get("witnesses", {})
        t = "yes" if var["terminal"] else f"no (the lattice point {vec(w['terminal'])} has height ≤ 1)"
        c = "yes" if var["canonical"] else f"no (the lattice point {vec(w['canonical'])} has height < 1)"
        out.append(f"terminal: {t}; canonical: {c}; log terminal: {yesno(var['log_terminal'])}; "
                   f"canonical functional {vec(var['canonical_functional'])} (value 1 on every ray)")
    return out


def fan_lines(o: dict) -> list[str]:
    """Subdivision, discrepancies and intersection theory of a fan's facts."""
    out = []
    if o.get("subdivides"):
        out.append(f"a refinement of '{o['subdivides']}' by star subdivisions")
    if o.get("discrepancies"):
        out.append("discrepancies: " + _short([f"a(D{i}) = {a if a is not None else 'undefined'}"
                                               for i, a in enumerate(o["discrepancies"], 1)]))
    if "intersections" in o:
        out.append("intersection numbers: "
                   + (_short([f"{k} = {v}" for k, v in o["intersections"].items()]) or "all 0"))
    if "anticanonical_degree" in o:
        out.append(f"(-K)^n = {o['anticanonical_degree']}")
    if "projective" in o:
        basis = ", ".join(f"D{i}" for i in o["divisor_basis"])
        out.append(f"projective: {yesno(o['projective'])}; N^1 basis {basis}; "
                   f"Mori cone rays {vecs(o['mori_rays'])}"
                   + (f", lineality {vecs(o['mori_lineality'])}" if o.get("mori_lineality") else "")
                   + f"; nef cone rays {vecs(o['nef_rays'])}")
    return out


def map_lines(o: dict) -> list[str]:
    """Rank, kernel, image and cokernel of a map's facts."""
    if "rank" not in o:
        return []
    return [f"rank {o['rank']}; kernel: {vecs(o['kernel'], '0')}; image: {vecs(o['image'], '0')}; "
            f"cokernel: {o['cokernel']}"]
