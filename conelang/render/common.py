"""Small helpers shared by the renderers."""
from __future__ import annotations


def vec(v) -> str:
    """``[1, "1/2"]`` → ``(1, 1/2)``."""
    return "(" + ", ".join(str(x) for x in v) + ")"


def vecs(vs, empty: str = "none") -> str:
    return " ".join(vec(v) for v in vs) if vs else empty


def yesno(b) -> str:
    if b is None:
        return "unknown"
    return "yes" if b else "no"


def cone_summary(o: dict) -> str:
    """One line: ``dim 3 · pointed · simplicial · 8 generators · Gorenstein``."""
    parts = [f"dim {o['dim']}"]
    parts.append("pointed" if o.get("pointed") else "not pointed")
    if o.get("simplicial"):
        parts.append("simplicial")
    var = o.get("variety")
    if var:
        r = len(var["generators"])
        parts.append(f"{r} generator{'s' * (r != 1)}")
        if var.get("smooth"):
            parts.append("smooth")
        elif var.get("gorenstein"):
            parts.append("Gorenstein")
        elif var.get("gorenstein_index"):
            parts.append(f"Gorenstein index {var['gorenstein_index']}")
    return " · ".join(parts)


def torus_action_lines(var: dict) -> list[str]:
    return [f"z{i} ↦ {m}·z{i}" for i, m in enumerate(var.get("torus_action", []), 1)]


def missing_equations(o: dict) -> str:
    """Why a cone's variety has no ``equations`` key: over budget (an ``errors`` entry) or not
    yet computed (the editor shows the cheap facts first).

    >>> missing_equations({"errors": ["equations: too large"]})
    'not computed (see the errors below)'
    >>> missing_equations({})
    'still being computed'
    """
    if any(e.startswith("equations:") for e in o.get("errors", [])):
        return "not computed (see the errors below)"
    return "still being computed"
