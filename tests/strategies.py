"""Reusable hypothesis strategies for lattice vectors, integer matrices and cones.

Import with ``from strategies import ...`` (``tests/`` is put on ``sys.path`` by the
``conftest.py`` of the test folders that use it).  Keep the sizes small: every strategy here
produces inputs on which the exact engine answers in milliseconds.
"""
from __future__ import annotations

from hypothesis import strategies as st

from conelang.geometry.cone import Cone, cone_from_inequalities, cone_from_rays

SMALL = 3  # entries in [-SMALL, SMALL]


def vectors(d: int, lo: int = -SMALL, hi: int = SMALL, nonzero: bool = False):
    """Integer vectors of length ``d`` with entries in ``[lo, hi]``."""
    s = st.tuples(*[st.integers(lo, hi) for _ in range(d)])
    return s.filter(any) if nonzero and d > 0 else s


def matrices(rows_max: int = 4, cols_min: int = 1, cols_max: int = 4, lo: int = -SMALL,
             hi: int = SMALL, rows_min: int = 0):
    """``(rows, ncols)`` for a small integer matrix (possibly without rows)."""
    return st.integers(cols_min, cols_max).flatmap(
        lambda n: st.tuples(st.lists(vectors(n, lo, hi), min_size=rows_min, max_size=rows_max),
                            st.just(n)))


def generator_lists(d: int, max_size: int = 8, min_size: int = 0):
    """Lists of (possibly zero, possibly repeated) generators in Z^d."""
    return st.lists(vectors(d), min_size=min_size, max_size=max_size)


def pointed_full_generators(d: int, max_size: int = 8):
    """Generators with last coordinate >= 1 (so the cone is pointed) spanning Q^d."""
    last = vectors(d - 1).flatmap(lambda head: st.integers(1, SMALL).map(lambda t: head + (t,)))
    return st.lists(last, min_size=d, max_size=max(d, max_size)).filter(_spans(d))


def _spans(d: int):
    from conelang.geometry.linalg import rank

    return lambda gens: rank(gens, d) == d


def dims(lo: int = 2, hi: int = 4):
    return st.integers(lo, hi)


def cone_inputs(lo: int = 2, hi: int = 4, max_gens: int = 7, max_lineality: int = 1):
    """``(gens, lineality, d)`` for arbitrary cones (maybe not pointed, maybe not full)."""
    return dims(lo, hi).flatmap(lambda d: st.tuples(
        generator_lists(d, max_gens), st.lists(vectors(d), max_size=max_lineality), st.just(d)))


def cones(lo: int = 2, hi: int = 4, max_gens: int = 7, max_lineality: int = 1) -> st.SearchStrategy[Cone]:
    """Arbitrary cones given by generators (and lineality vectors)."""
    return cone_inputs(lo, hi, max_gens, max_lineality).map(
        lambda t: cone_from_rays(t[0], t[2], t[1]))


def pointed_full_cones(lo: int = 2, hi: int = 4, max_gens: int = 8) -> st.SearchStrategy[Cone]:
    """Pointed full-dimensional cones."""
    return dims(lo, hi).flatmap(
        lambda d: pointed_full_generators(d, max_gens).map(lambda g: cone_from_rays(g, d)))


def inequality_inputs(lo: int = 2, hi: int = 4, max_ineqs: int = 7, max_eqs: int = 1):
    """``(ineqs, eqs, d)`` for cones given by inequalities and equations."""
    return dims(lo, hi).flatmap(lambda d: st.tuples(
        generator_lists(d, max_ineqs), st.lists(vectors(d), max_size=max_eqs), st.just(d)))


def cones_from_inequalities(lo: int = 2, hi: int = 4, max_ineqs: int = 7, max_eqs: int = 1):
    return inequality_inputs(lo, hi, max_ineqs, max_eqs).map(
        lambda t: cone_from_inequalities(t[0], t[1], t[2]))
