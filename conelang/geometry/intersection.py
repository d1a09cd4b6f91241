"""Intersection theory on a complete simplicial toric variety X_Σ (pure, exact rationals).

Divisors are the torus-invariant prime divisors ``D_ρ`` of the rays (0-based indices into the
rays).  For a complete simplicial fan in Z^d (Cox–Little–Schenck §12.5, Fulton §5.1 (from
memory)):

* ``D_{ρ_1} ⋯ D_{ρ_d} = 1 / mult(σ)`` when the distinct rays ρ_1 … ρ_d span a cone σ of Σ,
  and 0 when distinct rays span no cone;
* a repeated divisor is removed with a linear equivalence: for ``m ∈ M_Q`` with
  ``<m, v_i> = 1`` and ``<m, v_j> = 0`` on the other rays of the product,
  ``D_i ~ -Σ_{ρ outside} <m, v_ρ> D_ρ`` (from ``div χ^m = Σ <m, v_ρ> D_ρ ~ 0``); each step
  adds a ray to the support, so the recursion ends.

Curves: the torus-invariant curves are ``V(τ)`` for the walls τ (cones of dimension d - 1), with
``V(τ) = mult(τ) · Π_{ρ ∈ τ} D_ρ``; they generate the Mori cone NE(X) (CLS Thm 6.3.20 (from
memory)) and the nef cone is its dual.  X is projective iff the nef cone has interior (an ample
class), i.e. iff the Mori cone is pointed (CLS Thm 6.3.22 (from memory)).

Coordinates.  ``N^1(X)_Q = Q^{Σ(1)} / M_Q``.  The basis used is the classes of the divisors
``D_b`` for the rays b *not* in the first maximal cone σ_0 (in the order of the cones as
given, sorted): a class ``Σ a_ρ D_ρ`` has coordinates ``a_b - <m, v_b>`` with m fixed by
``<m, v_ρ> = a_ρ`` on σ_0.  ``N_1(X)_Q`` has the dual basis, so a curve C has coordinates
``(D_b · C)_b``.  Cone rays are given as primitive integer vectors in these coordinates.

>>> p2 = IntersectionRing([(1, 0), (0, 1), (-1, -1)], [(0, 1), (1, 2), (0, 2)], 2)
>>> p2.top((0, 0)), p2.top((0, 1)), p2.anticanonical_degree()
(Fraction(1, 1), Fraction(1, 1), Fraction(9, 1))
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import lcm, prod
from typing import Sequence

from . import linalg
from .budget import Budget, ensure
from .cone import Cone, cone_from_rays, dual
from .linalg import Vec, dot

__all__ = ["IntersectionRing", "MoriData", "mori_data", "primitive_direction"]


def primitive_direction(v: Sequence[Fraction]) -> Vec:
    """The primitive integer vector on the ray of a nonzero rational vector.

    >>> primitive_direction((Fraction(1, 2), Fraction(-3, 4)))
    (2, -3)
    """
    den = lcm(*(Fraction(x).denominator for x in v)) if v else 1
    return linalg.primitive(tuple(int(Fraction(x) * den) for x in v))


class IntersectionRing:
    """Top intersection products of the ``D_ρ`` on a complete simplicial fan (the caller checks
    completeness and simpliciality).  ``rays`` primitive in Z^d, ``maximal`` 0-based index
    tuples of the d-dimensional cones."""

    def __init__(self, rays: Sequence[Vec], maximal: Sequence[Sequence[int]], d: int,
                 budget: Budget | None = None):
        self.rays = tuple(tuple(r) for r in rays)
        self.maximal = tuple(sorted(tuple(sorted(c)) for c in maximal))
        self.d = d
        self.budget = ensure(budget)
        self._sets = [frozenset(c) for c in self.maximal]
        self._memo: dict[tuple[int, ...], Fraction] = {}

    def is_cone(self, indices) -> bool:
        """Do the distinct rays ``indices`` span a cone of the fan?

        >>> IntersectionRing([(1, 0), (0, 1), (-1, -1)], [(0, 1), (1, 2), (0, 2)], 2).is_cone({0, 2})
        True
        """
        s = frozenset(indices)
        return any(s <= c for c in self._sets)

    def multiplicity(self, indices) -> int:
        """``mult`` of the simplicial cone spanned by the rays ``indices``: the index of the
        lattice they span in the lattice points of their span.

        >>> IntersectionRing([(1, 0), (1, 2)], [(0, 1)], 2).multiplicity((0, 1))
        2
        """
        rows = [self.rays[i] for i in sorted(set(indices))]
        return prod(linalg.snf_invariants(rows, self.d)) if rows else 1

    def top(self, indices: Sequence[int]) -> Fraction:
        """``D_{i_1} ⋯ D_{i_d}`` for d ray indices (repeats allowed)."""
        key = tuple(sorted(indices))
        if len(key) != self.d:
            raise ValueError(f"a top product needs {self.d} divisors")
        hit = self._memo.get(key)
        if hit is None:
            hit = self._memo[key] = self._top(key)
        return hit

    def _top(self, key: tuple[int, ...]) -> Fraction:
        self.budget.tick(len(self.rays) * self.d, "intersection numbers",
                         f"{len(self.rays)} divisors in dimension {self.d}")
        support = sorted(set(key))
        if not self.is_cone(support):
            return Fraction(0)
        if len(support) == self.d:
            return Fraction(1, self.multiplicity(support))
        i = next(j for j in support if key.count(j) > 1)
        rows = [self.rays[j] for j in support]
        m = linalg.solve_rational(rows, tuple(int(j == i) for j in support), self.d)
        rest = list(key)
        rest.remove(i)
        total = Fraction(0)
        for rho, v in enumerate(self.rays):
            if rho in support:
                continue
            c = dot(m, v)
            if c and self.is_cone(support + [rho]):
                total -= c * self.top(rest + [rho])
        return total

    def walls(self) -> tuple[tuple[int, ...], ...]:
        """The cones of dimension d - 1 (index tuples, sorted)."""
        out = set()
        for c in self.maximal:
            for i in range(len(c)):
                out.add(c[:i] + c[i + 1:])
        return tuple(sorted(out))

    def curve_vector(self, wall: Sequence[int]) -> tuple[Fraction, ...]:
        """``(D_ρ · V(τ))_ρ`` for the wall τ, over all rays ρ.

        The line on P^2 meets every D_ρ once:

        >>> IntersectionRing([(1, 0), (0, 1), (-1, -1)], [(0, 1), (1, 2), (0, 2)], 2).curve_vector((0,))
        (Fraction(1, 1), Fraction(1, 1), Fraction(1, 1))
        """
        mu = self.multiplicity(wall)
        return tuple(mu * self.top(list(wall) + [rho]) for rho in range(len(self.rays)))

    def anticanonical_degree(self) -> Fraction:
        """``(-K)^d = (Σ_ρ D_ρ)^d`` by the multinomial expansion."""
        from itertools import combinations_with_replacement
        from math import factorial
        total = Fraction(0)
        for key in combinations_with_replacement(range(len(self.rays)), self.d):
            coef = factorial(self.d)
            for j in set(key):
                coef //= factorial(key.count(j))
            total += coef * self.top(key)
        return total


@dataclass(frozen=True)
class MoriData:
    """Basis of N^1 (ray indices), the torus-invariant curves (wall, coordinates in N_1), the
    Mori cone in N_1, the nef cone in N^1, and projectivity (see the module docstring)."""

    basis: tuple[int, ...]
    curves: tuple[tuple[tuple[int, ...], tuple[Fraction, ...]], ...]
    mori: Cone
    nef: Cone
    projective: bool


def mori_data(ring: IntersectionRing, budget: Budget | None = None) -> MoriData:
    """Mori and nef cones of a complete simplicial fan.

    P^1 × P^1: both cones are the positive quadrant (CLS Example 6.3.21 (from memory)).

    >>> r = IntersectionRing([(1, 0), (0, 1), (-1, 0), (0, -1)], [(0, 1), (1, 2), (2, 3), (0, 3)], 2)
    >>> md = mori_data(r)
    >>> md.basis, md.mori.rays, md.nef.rays, md.projective
    ((2, 3), ((0, 1), (1, 0)), ((0, 1), (1, 0)), True)
    """
    budget = ensure(budget)
    first = set(ring.maximal[0])
    basis = tuple(i for i in range(len(ring.rays)) if i not in first)
    curves = []
    for w in ring.walls():
        vec = ring.curve_vector(w)
        curves.append((w, tuple(vec[b] for b in basis)))
    k = len(basis)
    gens = [primitive_direction(c) for _, c in curves if any(c)]
    mori = cone_from_rays(gens, k, budget=budget)
    nef = dual(mori)
    return MoriData(basis, tuple(curves), mori, nef, nef.dim == k)
