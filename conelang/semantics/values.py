"""Values that definitions evaluate to.  Immutable; geometry data in lattice coordinates.

A :class:`Space` is a lattice as the user wrote it (``N``, ``dual N``, ``Z^3``): a
:class:`conelang.geometry.lattice.Lattice` plus a side (the lattice itself or its dual), so
that user ("ambient") coordinates and lattice coordinates can be converted both ways.
"""
from __future__ import annotations

import functools
from dataclasses import dataclass, field
from fractions import Fraction

from ..geometry import lattice as glat
from ..geometry.cone import Cone
from ..geometry.polytope import Polytope

Vec = tuple[int, ...]


@dataclass(frozen=True)
class Space:
    key: str                 # identity of the underlying lattice (its defining name, or "Z^d")
    lattice: glat.Lattice
    is_dual: bool = False

    @property
    def rank(self) -> int:
        return self.lattice.rank

    @property
    def label(self) -> str:
        return f"dual {self.key}" if self.is_dual else self.key

    def dual(self) -> "Space":
        return Space(self.key, self.lattice, not self.is_dual)

    @functools.cached_property
    def _standard(self) -> bool:
        return self.lattice.is_standard

    def to_coords(self, v) -> Vec | None:
        """Lattice coordinates of the user vector ``v``; None when ``v`` is not in the lattice."""
        if self._standard:          # Z^d and its dual: the coordinates are the entries
            if all(Fraction(x).denominator == 1 for x in v):
                return tuple(int(x) for x in v)
            return None
        if self.is_dual:
            return glat.dual_to_coords(self.lattice, v)
        return glat.to_coords(self.lattice, v)

    def from_coords(self, x) -> tuple[Fraction, ...]:
        if self._standard:
            return tuple(Fraction(c) for c in x)
        if self.is_dual:
            return glat.dual_from_coords(self.lattice, x)
        return glat.from_coords(self.lattice, x)

    @property
    def is_standard(self) -> bool:
        return self.lattice.is_standard

    @property
    def coordinate_basis(self) -> tuple[tuple[Fraction, ...], ...]:
        """The user coordinates of the basis in which lattice coordinates are taken."""
        return tuple(self.from_coords(tuple(int(i == j) for j in range(self.rank))) for i in range(self.rank))


@dataclass(frozen=True)
class ConeValue:
    space: Space
    cone: Cone
    grading: tuple[int, ...] | None = None   # the ``grading`` section (dual lattice coordinates)
    # positions in the defining ``rays`` (or ``halfspaces``) section of the entries that are
    # redundant, found while evaluating (the editor's hover reads them); not part of the value
    redundant: tuple[int, ...] = field(default=(), compare=False)


@dataclass(frozen=True)
class MapValue:
    source: Space
    target: Space
    matrix: tuple[Vec, ...]          # lattice coordinates: target_rank rows, source_rank columns
    ambient_rows: tuple[tuple[Fraction, ...], ...]   # as written (user coordinates)


@dataclass(frozen=True)
class MorphismValue:
    map_name: str
    map: MapValue
    source_name: str
    target_name: str
    source: ConeValue
    target: ConeValue


@dataclass(frozen=True)
class CharactersValue:
    space: Space                      # the lattice whose dual holds the characters (T = T_space)
    characters: tuple[Vec, ...]       # in lattice coordinates of the dual of ``space``


@dataclass(frozen=True)
class FanValue:
    space: Space
    rays: tuple[Vec, ...]             # lattice coordinates, primitive
    cones: tuple[tuple[int, ...], ...]  # 0-based index lists into rays
    source_cone: str | None = None    # for ``resolve``: the cone that was resolved
    crepant: bool = False             # ``resolve crepant``: the crepant partial resolution
    subdivides: str | None = None     # ``star X at v`` / ``refine X by …``: the cone or fan X


@dataclass(frozen=True)
class PolytopeValue:
    space: Space
    polytope: "Polytope"              # lattice coordinates (geometry.polytope.Polytope)


@dataclass(frozen=True)
class LatticeValue:
    space: Space
