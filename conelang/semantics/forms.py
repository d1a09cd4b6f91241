"""User-facing forms: how numbers, vectors, fan cones, groups and results are written in
messages, hovers and ``expect`` lines.

Every module of the analysis that speaks to the user takes its forms from here, so one value is
written one way everywhere.  Nothing here knows about an analysis; this module imports only
geometry (for the group normal form and the first violated inequality of a morphism).

>>> fmt_vec((1, -2, "3/2")), fan_cone_label((0, 2)), show_result((0, (2, 4)))
('(1, -2, 3/2)', '[1 3]', '"Z/2 + Z/4"')
"""
from __future__ import annotations

from fractions import Fraction

from ..geometry import linalg
from ..geometry import maps as gmaps


def fmt_number(x) -> str:
    """An integer as itself, a rational as ``p/q``.

    >>> fmt_number(Fraction(6, 4)), fmt_number(3)
    ('3/2', '3')
    """
    x = Fraction(x)
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"


def fmt_vec(v) -> str:
    """A vector as the user writes it.

    >>> fmt_vec([Fraction(1, 7), 3])
    '(1/7, 3)'
    """
    return "(" + ", ".join(fmt_number(x) for x in v) + ")"


def fan_cone_label(indices) -> str:
    """A cone of a fan as the user writes it: 0-based indices shown 1-based, ``[1 2]``."""
    return "[" + " ".join(str(i + 1) for i in indices) + "]"


def fan_problem_message(p, fmt=None) -> str:
    """The sentence of a :class:`conelang.geometry.fan.FanProblem`: rays and cones are
    numbered from 1, ``fmt`` writes a lattice vector (default: as it is; the analysis passes
    one that writes it in user coordinates).

    >>> from conelang.geometry.fan import check_fan
    >>> print(fan_problem_message(check_fan([(1, 0), (0, 1), (1, 1)], [(0, 1), (2,)], 2).problems[0]))
    cones [3] and [1 2] do not meet in a common face: their intersection cone((1, 1)) is not a face of [1 2]; e.g. the vector (1, 1) lies in both cones but in no common face (it is in the relative interior of [3] and of [1 2])
    """
    fmt = fmt or fmt_vec
    c = p.cones
    name = lambda i: fan_cone_label(c[i])
    if p.code == "fan-duplicate-ray":
        return f"ray {p.ray + 1} is the same ray as ray {p.other_ray + 1}: a fan lists each ray once"
    if p.code == "fan-unused-ray":
        return f"ray {p.ray + 1} is in no listed cone; it is a one-dimensional cone of the fan by itself"
    if p.code == "fan-not-pointed":
        return (f"cone {name(p.cone)} is not pointed: it contains the line through "
                f"{fmt(p.vector)}, so it is not a cone of a fan")
    if p.code == "fan-not-ray":
        return (f"ray {p.ray + 1} is not an extremal ray of cone {name(p.cone)}: it lies in the "
                f"relative interior of its face {fan_cone_label(p.face)}; list only the extremal rays")
    if p.code == "fan-redundant-cone":
        if c[p.cone] == c[p.other] or set(c[p.cone]) == set(c[p.other]):
            return f"cone {name(p.cone)} is listed twice"
        return (f"cone {name(p.cone)} is a face of cone {name(p.other)}, which is listed: "
                f"faces of listed cones are in the fan anyway")
    if p.code == "fan-overlap":
        meet = "cone(" + ", ".join(fmt(r) for r in p.meet) + ")" if p.meet else "{0}"

        def inside(face, ci):
            return name(ci) if set(face) == set(c[ci]) else f"its face {fan_cone_label(face)} of {name(ci)}"

        return (f"cones {name(p.cone)} and {name(p.other)} do not meet in a common face: their "
                f"intersection {meet} is not a face of {name(p.not_face_of)}; e.g. the vector "
                f"{fmt(p.vector)} lies in both cones but in no common face (it is in the relative "
                f"interior of {inside(p.face, p.cone)} and of {inside(p.other_face, p.other)})")
    return p.code


def group_string(g) -> str:
    """An abelian group ``(free rank, invariant factors)`` in invariant-factor form.

    >>> group_string((1, (3,))), group_string((0, ()))
    ('Z + Z/3', '0')
    """
    free, inv = g
    return linalg.abelian_group_string(inv, free)


def show_result(value) -> str:
    """A property value as it is written on the right of ``expect … =``.

    >>> show_result(None), show_result(True), show_result((3, 3, 1)), show_result(8)
    ('none', 'yes', '(3, 3, 1)', '8')
    """
    if value is None:
        return "none"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, tuple) and len(value) == 2 and isinstance(value[1], tuple):
        return f'"{group_string(value)}"'
    if isinstance(value, tuple):
        return "(" + ", ".join(map(str, value)) + ")"
    return str(value)       # Fractions print as p/q


def violation_message(v) -> str | None:
    """Why the map of a morphism value does not send the source into the target (user
    coordinates: the ray, its image, the violated inequality or equation and its value), or
    None when it does."""
    bad = gmaps.first_violation(v.map.matrix, v.source.cone, v.target.cone)
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


def budget_message(exc) -> str:
    """What a :class:`~conelang.geometry.budget.BudgetExceeded` says: the computation, the
    limit and what was too large (the advice, :func:`budget_advice`, follows it).

    >>> from conelang.geometry.budget import BudgetExceeded
    >>> budget_message(BudgetExceeded("Hilbert basis", 1000, "about 5000 lattice points"))
    'Hilbert basis is too large for the work budget of 1000 steps (about 5000 lattice points)'
    """
    msg = f"{exc.what} is too large for the work budget of {exc.limit} steps"
    return msg + f" ({exc.detail})" if exc.detail else msg


def budget_advice(exc) -> str:
    """What to pass to ``--budget`` after a :class:`~conelang.geometry.budget.BudgetExceeded`:
    the estimate rounded up to one significant digit when the computation was refused up front,
    ten times the limit when it ran out on the way; the one wording of every budget message.
    An estimate beyond 10^12 steps (weeks of work) is said to be out of reach instead.

    >>> from conelang.geometry.budget import BudgetExceeded
    >>> budget_advice(BudgetExceeded("Hilbert basis", 1000, needed=23_456))
    'raise it with --budget 30000 (or --budget none)'
    >>> budget_advice(BudgetExceeded("Hilbert basis", 20_000_000))
    'raise it with --budget 200000000 or more (or --budget none)'
    >>> budget_advice(BudgetExceeded("Hilbert basis", 1000, needed=10 ** 16))
    'out of reach for any --budget (about 10^16 steps)'
    """
    needed = getattr(exc, "needed", None)
    if needed and needed > 10 ** 12:
        return f"out of reach for any --budget (about 10^{len(str(needed)) - 1} steps)"
    if needed:
        unit = 10 ** (len(str(needed)) - 1)
        return f"raise it with --budget {-(-needed // unit) * unit} (or --budget none)"
    return f"raise it with --budget {10 * exc.limit} or more (or --budget none)"


def jnum(x):
    """A number for JSON: an int, or the string ``"p/q"``.

    >>> jnum(Fraction(6, 4)), jnum(3)
    ('3/2', 3)
    """
    x = Fraction(x)
    return x.numerator if x.denominator == 1 else fmt_number(x)


def jvec(v) -> list:
    """A vector for JSON (see :func:`jnum`)."""
    return [jnum(x) for x in v]


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
