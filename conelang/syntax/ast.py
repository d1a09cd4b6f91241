"""Typed syntax tree of a ``.cone`` file.  Every node carries its source span.

Spans are half-open character offsets ``(start, end)`` into the file text; turn them into
lines and columns with :class:`conelang.syntax.text.LineIndex`.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Union

Span = tuple[int, int]


@dataclass(frozen=True)
class Name:
    text: str
    span: Span


@dataclass(frozen=True)
class Number:
    value: Fraction
    span: Span


@dataclass(frozen=True)
class Vector:
    entries: tuple[Fraction, ...]
    span: Span


# ---- lattice expressions ---------------------------------------------------------------
@dataclass(frozen=True)
class LatticeName:
    name: Name
    span: Span


@dataclass(frozen=True)
class StandardLattice:
    """``Z^d``; ``symbol`` is the name written before ``^`` (must be ``Z``)."""
    symbol: Name
    rank: int
    span: Span


@dataclass(frozen=True)
class DualLattice:
    inner: "LatticeExpr"
    span: Span


LatticeExpr = Union[LatticeName, StandardLattice, DualLattice]


@dataclass(frozen=True)
class Glue:
    """``+ c (v)``: the glue vector c·v (c defaults to 1)."""
    coefficient: Fraction
    vector: Vector
    span: Span


@dataclass(frozen=True)
class Overlattice:
    base: StandardLattice
    glue: tuple[Glue, ...]
    span: Span


# ---- cone expressions ------------------------------------------------------------------
@dataclass(frozen=True)
class ConeRef:
    name: Name
    span: Span


@dataclass(frozen=True)
class DualCone:
    inner: "ConeExpr"
    span: Span


@dataclass(frozen=True)
class FaceCone:
    inner: "ConeExpr"
    functional: Vector
    span: Span


@dataclass(frozen=True)
class MeetCone:
    left: "ConeExpr"
    right: "ConeExpr"
    span: Span


@dataclass(frozen=True)
class ImageCone:
    map: Name
    inner: "ConeExpr"
    span: Span


@dataclass(frozen=True)
class PreimageCone:
    map: Name
    inner: "ConeExpr"
    span: Span


@dataclass(frozen=True)
class ConeOver:
    """``over P``: the cone over a lattice polytope, cone((v, 1) : v in P)."""
    polytope: Name
    span: Span


ConeExpr = Union[ConeRef, DualCone, FaceCone, MeetCone, ImageCone, PreimageCone, ConeOver]


# ---- statements ------------------------------------------------------------------------
@dataclass(frozen=True)
class Section:
    """A keyword followed by vectors: ``rays``, ``halfspaces``, ``equations``, ``images``, ``rows``."""
    keyword: Name
    vectors: tuple[Vector, ...]
    span: Span


@dataclass(frozen=True)
class LatticeStmt:
    keyword: Name
    name: Name
    body: Union[LatticeExpr, Overlattice]
    span: Span
    kind = "lattice"


@dataclass(frozen=True)
class ConeDef:
    keyword: Name
    name: Name
    lattice: LatticeExpr
    sections: tuple[Section, ...]
    span: Span
    kind = "cone"


@dataclass(frozen=True)
class ConeLet:
    keyword: Name
    name: Name
    expr: ConeExpr
    span: Span
    kind = "cone"


@dataclass(frozen=True)
class MapStmt:
    keyword: Name
    name: Name
    source: LatticeExpr
    target: LatticeExpr
    section: Section
    span: Span
    kind = "map"


@dataclass(frozen=True)
class MorphismDef:
    keyword: Name
    name: Name
    map: Name
    source: Name
    target: Name
    span: Span
    kind = "morphism"


@dataclass(frozen=True)
class MorphismCompose:
    """``morphism h = g ∘ f`` (also ``g after f``): apply the rightmost first."""
    keyword: Name
    name: Name
    parts: tuple[Name, ...]
    span: Span
    kind = "morphism"


@dataclass(frozen=True)
class CharactersStmt:
    keyword: Name
    name: Name
    lattice: LatticeExpr
    vectors: tuple[Vector, ...]
    span: Span
    kind = "characters"


@dataclass(frozen=True)
class IndexList:
    indices: tuple[tuple[int, Span], ...]
    span: Span


@dataclass(frozen=True)
class FanDef:
    keyword: Name
    name: Name
    lattice: LatticeExpr
    rays: tuple[Vector, ...]
    cones: tuple[IndexList, ...]
    span: Span
    kind = "fan"


@dataclass(frozen=True)
class FanResolve:
    """``fan R = resolve σ`` (a smooth refinement) or ``resolve crepant σ`` (the crepant partial
    resolution of a Gorenstein cone: the subdivision at the lattice points of height one)."""
    keyword: Name
    name: Name
    cone: Name
    span: Span
    crepant: bool = False
    kind = "fan"


@dataclass(frozen=True)
class FanSubdivide:
    """``fan F = star X at v`` (the star subdivision of the cone or fan X at v) or
    ``fan F = refine X by v1, v2, …`` (star subdivisions at v1, v2, … in order)."""
    keyword: Name
    name: Name
    base: Name
    vectors: tuple[Vector, ...]
    span: Span
    star: bool = True
    kind = "fan"


@dataclass(frozen=True)
class Expect:
    """``expect X prop``, ``expect X not prop``, ``expect X prop = value``, ``expect X == expr``."""
    keyword: Name
    subject: Name
    negated: bool
    prop: Name | None
    value: Union[Number, Vector, "StringValue", None]
    cone: ConeExpr | None
    span: Span
    kind = "expect"


@dataclass(frozen=True)
class StringValue:
    text: str
    span: Span


# ---- lattice polytopes -----------------------------------------------------------------
@dataclass(frozen=True)
class Halfspace:
    """``(u) >= b``: the halfspace {x : <u, x> >= b}."""
    normal: Vector
    bound: Number
    span: Span


@dataclass(frozen=True)
class PolySection:
    """``vertices v1 v2 …`` or ``halfspaces (u) >= b …``."""
    keyword: Name
    vectors: tuple[Vector, ...]
    halfspaces: tuple[Halfspace, ...]
    span: Span


@dataclass(frozen=True)
class PolytopeDef:
    keyword: Name
    name: Name
    lattice: LatticeExpr
    sections: tuple[PolySection, ...]
    span: Span
    kind = "polytope"


@dataclass(frozen=True)
class PolytopeRef:
    name: Name
    span: Span


@dataclass(frozen=True)
class PolarPolytope:
    inner: "PolytopeExpr"
    span: Span


@dataclass(frozen=True)
class PolytopeFace:
    """``face P at u``: where the functional u is smallest on P."""
    inner: "PolytopeExpr"
    functional: Vector
    span: Span


@dataclass(frozen=True)
class Dilation:
    factor: int
    inner: "PolytopeExpr"
    span: Span


@dataclass(frozen=True)
class PolytopeBinary:
    """``P + Q`` (Minkowski sum), ``P * Q`` (product), ``hull(P, Q)`` (convex hull)."""
    op: str                      # "sum", "product" or "hull"
    left: "PolytopeExpr"
    right: "PolytopeExpr"
    span: Span


PolytopeExpr = Union[PolytopeRef, PolarPolytope, PolytopeFace, Dilation, PolytopeBinary]


@dataclass(frozen=True)
class PolytopeLet:
    keyword: Name
    name: Name
    expr: PolytopeExpr
    span: Span
    kind = "polytope"


@dataclass(frozen=True)
class FanOfPolytope:
    """``fan F = normal P`` (the inner normal fan, in the dual lattice) or ``fan F = over P``
    (the face fan: the cones over the faces)."""
    keyword: Name
    name: Name
    polytope: Name
    which: str                   # "normal" or "face"
    span: Span
    kind = "fan"


@dataclass(frozen=True)
class UseItem:
    """``wedge`` or ``wedge as w`` in the list of a ``use`` statement."""
    name: Name                   # the name in the other file
    alias: Name | None           # the local name, when renamed
    span: Span

    @property
    def local(self) -> Name:
        return self.alias or self.name


@dataclass(frozen=True)
class UseStmt:
    """``use "path.cone"`` (every public name) or ``use "path.cone" (a, b as c)``."""
    keyword: Name
    path: str                    # as written between the quotes
    path_span: Span              # the quoted string, quotes included
    items: tuple[UseItem, ...] | None     # None: every public name of the file
    span: Span
    kind = "use"


Definition = Union[LatticeStmt, ConeDef, ConeLet, MapStmt, MorphismDef, MorphismCompose,
                   CharactersStmt, FanDef, FanResolve, PolytopeDef, PolytopeLet, FanOfPolytope,
                   FanSubdivide]
Statement = Union[Definition, Expect, UseStmt]


def is_definition(st) -> bool:
    """True for a statement that defines a name (not an ``expect`` or a ``use``)."""
    return not isinstance(st, (Expect, UseStmt))


@dataclass(frozen=True)
class SyntaxError_:
    """A statement that did not parse: ``message`` says what was expected; ``defines`` is the
    name the statement was going to define (None when unknown or for an expectation)."""
    message: str
    span: Span
    statement_span: Span
    defines: str | None = None


@dataclass
class Module:
    statements: list = field(default_factory=list)
    errors: list = field(default_factory=list)
