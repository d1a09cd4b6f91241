"""Lattices of full rank in Q^d: Z^d and overlattices ``Z^d + 1/r (a_1, ..., a_d) + ...``.

A :class:`Lattice` stores a canonical basis (rows in Q^d, "ambient" or user coordinates):
the row Hermite normal form of the generators scaled to integers by a common denominator,
divided back.  Lattice coordinates of an ambient vector ``v`` are the integer ``x`` with
``v = sum x_i b_i``; the dual lattice ``M = {u : <u, v> in Z for all v in L}`` gets the dual
basis, so that the pairing is the standard one in both coordinate systems:
``<u, v> = <dual_to_coords(L, u), to_coords(L, v)>``.

>>> from fractions import Fraction as F
>>> L = overlattice(2, [(F(1, 7), F(3, 7))])
>>> index_over_standard(L)
7
>>> to_coords(L, (F(1, 7), F(3, 7))) is not None, contains(L, (F(1, 7), 0))
(True, False)
"""
from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from fractions import Fraction
from math import lcm
from typing import Sequence

from . import linalg

QVec = tuple[Fraction, ...]

__all__ = [
    "Lattice", "standard", "overlattice", "to_coords", "from_coords", "contains",
    "dual_basis", "dual_to_coords", "dual_from_coords", "index_over_standard",
]


@dataclass(frozen=True)
class Lattice:
    """A full-rank lattice in Q^d given by a canonical basis (rows, Fractions).

    >>> standard(2).basis
    ((Fraction(1, 1), Fraction(0, 1)), (Fraction(0, 1), Fraction(1, 1)))
    """

    dim: int
    basis: tuple[QVec, ...]

    @property
    def rank(self) -> int:
        """The rank d (these lattices always have full rank).

        >>> standard(3).rank
        3
        """
        return self.dim

    @property
    def is_standard(self) -> bool:
        """True iff this is Z^d with its standard basis.

        >>> standard(2).is_standard, overlattice(2, [(Fraction(1, 2), 0)]).is_standard
        (True, False)
        """
        return self.basis == standard(self.dim).basis

    def __post_init__(self):
        if len(self.basis) != self.dim or any(len(b) != self.dim for b in self.basis):
            raise ValueError("a lattice basis must be a square matrix of full rank")


def _frac(x) -> Fraction:
    if isinstance(x, float):
        raise TypeError("floats are not exact: use int or Fraction")
    return Fraction(x)


def standard(d: int) -> Lattice:
    """The lattice Z^d.

    >>> standard(1)
    Lattice(dim=1, basis=((Fraction(1, 1),),))
    """
    if d < 0:
        raise ValueError("negative dimension")
    return Lattice(d, tuple(tuple(Fraction(int(i == j)) for j in range(d)) for i in range(d)))


def overlattice(d: int, glue: Sequence[Sequence]) -> Lattice:
    """The lattice ``Z^d + Z g_1 + ... + Z g_k`` for rational glue vectors ``g_i``.

    >>> L = overlattice(2, [(Fraction(1, 7), Fraction(3, 7))])
    >>> [tuple(str(x) for x in b) for b in L.basis]
    [('1/7', '3/7'), ('0', '1')]
    """
    gens = [tuple(_frac(x) for x in g) for g in glue]
    for g in gens:
        if len(g) != d:
            raise ValueError(f"glue vector of length {len(g)} in a lattice of rank {d}")
    if d == 0:
        return Lattice(0, ())
    den = 1
    for g in gens:
        for x in g:
            den = lcm(den, x.denominator)
    rows = [tuple(den if i == j else 0 for j in range(d)) for i in range(d)]
    rows += [tuple(int(x * den) for x in g) for g in gens]
    H = linalg.hnf(rows, d)
    assert len(H) == d
    return Lattice(d, tuple(tuple(Fraction(x, den) for x in r) for r in H))


@lru_cache(maxsize=256)
def _inverse(L: Lattice):
    return linalg.inverse_rational(L.basis)


def to_coords(L: Lattice, v: Sequence) -> linalg.Vec | None:
    """Integer coordinates ``x`` with ``v = sum x_i b_i``, or None if ``v`` is not in L.

    >>> L = overlattice(2, [(Fraction(1, 7), Fraction(3, 7))])
    >>> to_coords(L, (Fraction(2, 7), Fraction(6, 7)))
    (2, 0)
    >>> to_coords(L, (Fraction(1, 7), 0)) is None
    True
    """
    v = tuple(_frac(x) for x in v)
    if len(v) != L.dim:
        raise ValueError(f"vector of length {len(v)} in a lattice of rank {L.dim}")
    if L.is_standard:
        return tuple(x.numerator for x in v) if all(x.denominator == 1 for x in v) else None
    x = linalg.vec_mat(v, _inverse(L), L.dim)
    if any(Fraction(c).denominator != 1 for c in x):
        return None
    return tuple(int(c) for c in x)


def from_coords(L: Lattice, x: Sequence[int]) -> QVec:
    """Ambient vector ``sum x_i b_i`` of lattice coordinates ``x``.

    >>> L = overlattice(2, [(Fraction(1, 7), Fraction(3, 7))])
    >>> tuple(str(c) for c in from_coords(L, (1, 1)))
    ('1/7', '10/7')
    """
    if len(x) != L.dim:
        raise ValueError(f"coordinates of length {len(x)} in a lattice of rank {L.dim}")
    return tuple(Fraction(c) for c in linalg.vec_mat(tuple(x), L.basis, L.dim))


def contains(L: Lattice, v: Sequence) -> bool:
    """Membership test.

    >>> contains(overlattice(1, [(Fraction(1, 2),)]), (Fraction(3, 2),))
    True
    """
    return to_coords(L, v) is not None


def dual_basis(L: Lattice) -> tuple[QVec, ...]:
    """Basis ``u_1..u_d`` of the dual lattice with ``<u_i, b_j> = delta_ij`` (ambient dual
    coordinates; rows of the inverse transpose of the basis matrix).

    >>> L = overlattice(2, [(Fraction(1, 7), Fraction(3, 7))])
    >>> [tuple(int(x) for x in u) for u in dual_basis(L)]
    [(7, 0), (-3, 1)]
    """
    inv = _inverse(L)
    return tuple(tuple(Fraction(x) for x in col) for col in linalg.transpose(inv, L.dim))


def dual_to_coords(L: Lattice, u: Sequence) -> linalg.Vec | None:
    """Dual coordinates ``y_i = <u, b_i>`` of ``u``, or None if ``u`` is not in the dual.

    >>> L = overlattice(2, [(Fraction(1, 7), Fraction(3, 7))])
    >>> dual_to_coords(L, (1, 1)) is None, dual_to_coords(L, (-3, 1))
    (True, (0, 1))
    """
    u = tuple(_frac(x) for x in u)
    if len(u) != L.dim:
        raise ValueError(f"vector of length {len(u)} in a lattice of rank {L.dim}")
    y = tuple(linalg.dot(u, b) for b in L.basis)
    if any(c.denominator != 1 for c in y):
        return None
    return tuple(int(c) for c in y)


def dual_from_coords(L: Lattice, y: Sequence[int]) -> QVec:
    """Ambient dual vector ``sum y_i u_i`` of dual coordinates ``y``.

    >>> L = overlattice(2, [(Fraction(1, 7), Fraction(3, 7))])
    >>> tuple(int(c) for c in dual_from_coords(L, (0, 1)))
    (-3, 1)
    """
    if len(y) != L.dim:
        raise ValueError(f"coordinates of length {len(y)} in a lattice of rank {L.dim}")
    return tuple(Fraction(c) for c in linalg.vec_mat(tuple(y), dual_basis(L), L.dim))


def index_over_standard(L: Lattice) -> int:
    """The index ``|L / Z^d|`` = ``1 / |det basis|`` of an overlattice of Z^d.

    >>> index_over_standard(overlattice(2, [(Fraction(1, 2), Fraction(1, 2)), (Fraction(1, 3), 0)]))
    6
    """
    if L.dim == 0:
        return 1
    den = 1
    for b in L.basis:
        for x in b:
            den = lcm(den, x.denominator)
    scaled = [tuple(int(x * den) for x in b) for b in L.basis]
    d = abs(linalg.det(scaled))
    # det(L) = d / den^dim ; index over Z^d = 1/det(L) when Z^d ⊆ L
    q = Fraction(den ** L.dim, d)
    if q.denominator != 1:
        raise ValueError("the lattice does not contain Z^d")
    return q.numerator
