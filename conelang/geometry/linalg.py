"""Exact integer linear algebra on tuples of ints.

Conventions: a vector ``Vec`` is a tuple of Python ints; a matrix is a sequence of row
vectors.  Functions that may receive an empty list of rows take the number of columns as an
explicit argument where it cannot be inferred.  All results are tuples (immutable).

Hermite normal form (HNF) here is the *row* Hermite normal form: upper triangular (echelon),
positive pivots, entries above a pivot reduced into ``[0, pivot)``, zero rows dropped.  It is a
canonical basis of the lattice spanned by the rows.

>>> hnf([(2, 4), (3, 5)])
((1, 1), (0, 2))
>>> kernel_basis([(1, 1, 1)], 3)
((1, 0, -1), (0, 1, -1))
"""
from __future__ import annotations

import functools

from fractions import Fraction
from math import gcd
from typing import Iterable, Sequence

import flint

Vec = tuple[int, ...]
Matrix = tuple[Vec, ...]

__all__ = [
    "Vec", "Matrix", "gcd_vec", "primitive", "is_primitive", "dot", "rank", "kernel_basis",
    "hnf", "hnf_with_transform", "snf_invariants", "smith", "saturate", "orthogonal_complement",
    "solve_rational", "solve_integer", "det", "inverse_rational", "abelian_group_string",
    "transpose", "mat_mul", "mat_vec", "vec_mat", "identity", "is_in_row_span", "lattice_index",
]


# ---------------------------------------------------------------------------------------------
# vectors


def gcd_vec(v: Iterable[int]) -> int:
    """Non-negative gcd of the entries (0 for the zero or empty vector).

    >>> gcd_vec((4, -6, 10))
    2
    >>> gcd_vec((0, 0))
    0
    """
    g = 0
    for x in v:
        g = gcd(g, int(x))
    return g


def primitive(v: Iterable[int]) -> Vec:
    """The primitive integer vector on the ray through ``v`` (divide by the gcd).

    Raises ``ValueError`` for the zero vector.

    >>> primitive((4, -6, 10))
    (2, -3, 5)
    """
    v = tuple(int(x) for x in v)
    g = gcd_vec(v)
    if g == 0:
        raise ValueError("the zero vector has no primitive generator")
    return tuple(x // g for x in v)


def is_primitive(v: Iterable[int]) -> bool:
    """True iff the gcd of the entries is 1.

    >>> is_primitive((2, 3)), is_primitive((2, 4)), is_primitive((0, 0))
    (True, False, False)
    """
    return gcd_vec(v) == 1


def dot(u: Sequence, v: Sequence):
    """Standard pairing ``sum u_i v_i`` (works for ints and Fractions).

    >>> dot((1, 2, 3), (4, 5, 6))
    32
    """
    if len(u) != len(v):
        raise ValueError(f"vectors of different lengths {len(u)} and {len(v)}")
    return sum(a * b for a, b in zip(u, v))


def transpose(rows: Sequence[Sequence], ncols: int | None = None) -> tuple[tuple, ...]:
    """Transpose of a matrix given by rows (``ncols`` needed only when there are no rows).

    >>> transpose([(1, 2, 3), (4, 5, 6)])
    ((1, 4), (2, 5), (3, 6))
    >>> transpose([], 2)
    ((), ())
    """
    n = _ncols(rows, ncols)
    return tuple(tuple(r[j] for r in rows) for j in range(n))


def mat_mul(a: Sequence[Sequence], b: Sequence[Sequence], ncols: int | None = None) -> tuple:
    """Matrix product ``a * b`` (``ncols`` = columns of ``b`` when ``b`` has no rows).

    >>> mat_mul([(1, 2)], [(3, 4), (5, 6)])
    ((13, 16),)
    """
    n = _ncols(b, ncols)
    bt = transpose(b, n)
    return tuple(tuple(sum(x * y for x, y in zip(row, col)) for col in bt) for row in a)


def mat_vec(a: Sequence[Sequence], v: Sequence) -> tuple:
    """``a * v`` for a column vector ``v``.

    >>> mat_vec([(1, 2), (3, 4)], (1, 1))
    (3, 7)
    """
    return tuple(dot(row, v) for row in a)


def vec_mat(v: Sequence, a: Sequence[Sequence], ncols: int | None = None) -> tuple:
    """``v * a`` for a row vector ``v`` (a combination of the rows of ``a``).

    >>> vec_mat((1, 1), [(1, 2), (3, 4)])
    (4, 6)
    """
    n = _ncols(a, ncols)
    if len(v) != len(a):
        raise ValueError("length mismatch in vec_mat")
    out = [0] * n
    for c, row in zip(v, a):
        if c:
            for j in range(n):
                out[j] += c * row[j]
    return tuple(out)


def identity(n: int) -> Matrix:
    """The n x n identity matrix.

    >>> identity(2)
    ((1, 0), (0, 1))
    """
    return tuple(tuple(1 if i == j else 0 for j in range(n)) for i in range(n))


def _ncols(rows: Sequence[Sequence], ncols: int | None) -> int:
    if ncols is not None:
        for r in rows:
            if len(r) != ncols:
                raise ValueError(f"row of length {len(r)} in a matrix with {ncols} columns")
        return ncols
    if not rows:
        raise ValueError("number of columns needed for an empty matrix")
    n = len(rows[0])
    for r in rows:
        if len(r) != n:
            raise ValueError("rows of different lengths")
    return n


def _int_rows(rows: Sequence[Sequence], ncols: int | None) -> tuple[int, list[list[int]]]:
    n = _ncols(rows, ncols)
    out = []
    for r in rows:
        row = []
        for x in r:
            if isinstance(x, Fraction):
                if x.denominator != 1:
                    raise ValueError(f"non-integer entry {x}")
                x = x.numerator
            row.append(int(x))
        out.append(row)
    return n, out


def _flint(rows: list[list[int]], n: int) -> flint.fmpz_mat:
    return flint.fmpz_mat(len(rows), n, [x for r in rows for x in r])


def _from_flint(m: flint.fmpz_mat) -> list[list[int]]:
    return [[int(m[i, j]) for j in range(m.ncols())] for i in range(m.nrows())]


# ---------------------------------------------------------------------------------------------
# rank, HNF, kernels


def rank(rows: Sequence[Sequence], ncols: int | None = None) -> int:
    """Rank over Q of an integer (or rational) matrix.

    >>> rank([(1, 2), (2, 4)])
    1
    >>> rank([], 3)
    0
    """
    if not rows:
        return 0
    n = _ncols(rows, ncols)
    if n == 0:
        return 0
    if any(isinstance(x, Fraction) for r in rows for x in r):
        return _rref(rows, n)[1].__len__()
    _, ir = _int_rows(rows, n)
    return int(_flint(ir, n).rank())


def hnf(rows: Sequence[Sequence[int]], ncols: int | None = None) -> Matrix:
    """Row Hermite normal form with zero rows dropped: canonical basis of the row lattice.

    >>> hnf([(2, 4, 4), (-6, 6, 12), (10, 4, 16)])
    ((2, 0, 120), (0, 2, 20), (0, 0, 156))
    >>> hnf([(0, -3), (0, 6)])
    ((0, 3),)
    """
    if not rows:
        return ()
    n, ir = _int_rows(rows, ncols)
    if n == 0:
        return ()
    h = _from_flint(_flint(ir, n).hnf())
    return tuple(tuple(r) for r in h if any(r))


def hnf_with_transform(rows: Sequence[Sequence[int]], ncols: int | None = None
                       ) -> tuple[Matrix, Matrix, int]:
    """Return ``(H, T, r)`` with ``T`` unimodular, ``T * A = H`` in row HNF (zero rows kept at
    the bottom) and ``r`` the rank.  The last ``m - r`` rows of ``T`` are a basis of the left
    kernel lattice ``{y : y A = 0}``.

    >>> H, T, r = hnf_with_transform([(1, 2), (2, 4)])
    >>> H, r
    (((1, 2), (0, 0)), 1)
    >>> mat_mul(T, [(1, 2), (2, 4)]) == H
    True
    """
    n, A = _int_rows(rows, ncols)
    m = len(A)
    T = [[1 if i == j else 0 for j in range(m)] for i in range(m)]
    r = 0
    for c in range(n):
        if r == m:
            break
        while True:
            nz = [i for i in range(r, m) if A[i][c] != 0]
            if not nz:
                break
            p = min(nz, key=lambda i: abs(A[i][c]))
            A[r], A[p] = A[p], A[r]
            T[r], T[p] = T[p], T[r]
            piv = A[r][c]
            clean = True
            for i in range(r + 1, m):
                if A[i][c]:
                    q = A[i][c] // piv
                    if q:
                        Ai, Ar, Ti, Tr = A[i], A[r], T[i], T[r]
                        for j in range(c, n):
                            Ai[j] -= q * Ar[j]
                        for j in range(m):
                            Ti[j] -= q * Tr[j]
                    if A[i][c]:
                        clean = False
            if clean:
                break
        if A[r][c] == 0:
            continue
        if A[r][c] < 0:
            A[r] = [-x for x in A[r]]
            T[r] = [-x for x in T[r]]
        piv = A[r][c]
        for i in range(r):
            q = A[i][c] // piv
            if q:
                for j in range(c, n):
                    A[i][j] -= q * A[r][j]
                for j in range(m):
                    T[i][j] -= q * T[r][j]
        r += 1
    return tuple(map(tuple, A)), tuple(map(tuple, T)), r


def kernel_basis(rows: Sequence[Sequence[int]], ncols: int) -> Matrix:
    """Canonical (HNF) basis of the kernel lattice ``{x in Z^n : A x = 0}`` (saturated).

    >>> kernel_basis([(1, 2, 3)], 3)
    ((1, 1, -1), (0, 3, -2))
    >>> kernel_basis([], 2)
    ((1, 0), (0, 1))
    >>> kernel_basis([(1, 0), (0, 1)], 2)
    ()
    """
    n, A = _int_rows(rows, ncols)
    if n == 0:
        return ()
    At = [list(col) for col in transpose(A, n)] if A else [[] for _ in range(n)]
    _, T, r = hnf_with_transform(At, len(A))
    return hnf(T[r:], n)


def orthogonal_complement(rows: Sequence[Sequence[int]], n: int) -> Matrix:
    """Saturated canonical basis of ``{u in Z^n : <u, r> = 0 for every row r}``.

    >>> orthogonal_complement([(1, -1, 0)], 3)
    ((1, 1, 0), (0, 0, 1))
    """
    return kernel_basis(rows, n)


def saturate(rows: Sequence[Sequence[int]], ncols: int | None = None) -> Matrix:
    """Canonical (HNF) basis of ``span_Q(rows) ∩ Z^n``.

    >>> saturate([(2, 0), (0, 2)])
    ((1, 0), (0, 1))
    >>> saturate([(2, 4, 6)])
    ((1, 2, 3),)
    """
    if not rows:
        return ()
    n, ir = _int_rows(rows, ncols)
    return kernel_basis(kernel_basis(ir, n), n)


def reduce_mod_hnf(v: Sequence[int], basis: Sequence[Sequence[int]]) -> Vec:
    """The canonical representative of ``v + L`` for the lattice ``L`` with row Hermite basis
    ``basis``: each pivot coordinate brought into ``[0, pivot)``, top row first (later rows do
    not change earlier pivot columns, so the result is unique).

    >>> reduce_mod_hnf((5, 7), [(2, 3)])
    (1, 1)
    >>> reduce_mod_hnf((1, -1), [(1, 1)])
    (0, -2)
    """
    w = [int(x) for x in v]
    for row in basis:
        p = next(i for i, x in enumerate(row) if x)
        q = w[p] // row[p]
        if q:
            w = [a - q * b for a, b in zip(w, row)]
    return tuple(w)


def primitive_mod(v: Sequence[int], basis: Sequence[Sequence[int]], ncols: int) -> Vec:
    """The primitive generator of the ray through the class of ``v`` in ``Z^n / L``, where
    ``L`` is the saturated lattice with Hermite basis ``basis`` and ``v`` is not in ``span(L)``,
    as the canonical representative of its class (:func:`reduce_mod_hnf`).

    ``Z^n / L`` is free, and its dual is the lattice ``L^⊥`` of functionals vanishing on ``L``;
    so ``x ↦ (<e_i, x>)_i`` for a basis ``e`` of ``L^⊥`` is onto ``Z^k`` with kernel ``L``.  The
    class of ``v`` is ``g`` times the primitive class ``P v / g`` (``g`` the gcd of ``P v``),
    lifted by a fixed section ``S`` (``P S = 1``) and reduced.  Without ``L`` it is
    :func:`primitive`.

    >>> primitive_mod((1, 0), [(1, 1)], 2)       # in Z^2/Z(1,1) the class of (1,0) is primitive
    (0, -1)
    >>> primitive_mod((2, 4, 1), [(0, 1, 0)], 3), primitive_mod((6, 4), [], 2)
    ((2, 0, 1), (3, 2))
    """
    if not basis:
        return primitive(v)
    lat, P, S = _quotient_map(tuple(tuple(int(x) for x in r) for r in basis), ncols)
    image = [dot(e, v) for e in P]
    g = gcd_vec(image)
    if g == 0:
        raise ValueError(f"{tuple(v)} lies in the lattice it is taken modulo")
    t = [x // g for x in image]
    w = [sum(S[j][i] * t[i] for i in range(len(t))) for j in range(ncols)]
    return reduce_mod_hnf(w, lat)


@functools.lru_cache(maxsize=4096)
def _quotient_map(basis: tuple, ncols: int):
    """For a saturated lattice L (any basis): its Hermite basis, a basis P of L^⊥ (the map
    Z^n → Z^k with kernel L) and a section S with P S = 1 (columns: lifts of the unit vectors)."""
    lat = hnf(basis, ncols)
    P = kernel_basis(lat, ncols)
    cols = [solve_integer(P, tuple(int(i == j) for i in range(len(P))), ncols) for j in range(len(P))]
    S = tuple(tuple(c[j] for c in cols) for j in range(ncols))
    return lat, P, S


def is_in_row_span(v: Sequence, rows: Sequence[Sequence], ncols: int | None = None) -> bool:
    """True iff ``v`` is a rational combination of the rows.

    >>> is_in_row_span((2, 4), [(1, 2)]), is_in_row_span((1, 0), [(1, 2)])
    (True, False)
    """
    if not rows:
        return not any(v)
    n = _ncols(rows, ncols)
    return rank(list(rows) + [tuple(v)], n) == rank(rows, n)


def lattice_index(rows: Sequence[Sequence[int]], ncols: int | None = None) -> int:
    """Index of the lattice spanned by the rows inside its saturation.

    >>> lattice_index([(2, 0), (1, 3)])
    6
    >>> lattice_index([(2, 4)])
    2
    """
    inv = snf_invariants(rows, ncols)
    out = 1
    for d in inv:
        out *= d
    return out


# ---------------------------------------------------------------------------------------------
# Smith normal form


def snf_invariants(rows: Sequence[Sequence[int]], ncols: int | None = None) -> tuple[int, ...]:
    """Nonzero invariant factors ``d1 | d2 | ...`` of an integer matrix.

    >>> snf_invariants([(2, 4, 4), (-6, 6, 12), (10, 4, 16)])
    (2, 2, 156)
    >>> snf_invariants([(0, 0)])
    ()
    """
    if not rows:
        return ()
    n, ir = _int_rows(rows, ncols)
    if n == 0:
        return ()
    s = _flint(ir, n).snf()
    k = min(len(ir), n)
    return tuple(abs(int(s[i, i])) for i in range(k) if s[i, i] != 0)


def smith(rows: Sequence[Sequence[int]], ncols: int | None = None
          ) -> tuple[Matrix, Matrix, Matrix]:
    """Smith normal form with transforms: ``(D, U, V)`` with ``U A V = D``, ``U`` (m x m) and
    ``V`` (n x n) unimodular, ``D`` diagonal with ``d1 | d2 | ... `` (nonnegative).

    Pivot by pivot (:class:`_Smith`): bring the smallest nonzero entry of the rest to the
    diagonal, clear its row and column by Euclidean steps, and when an entry of the rest is
    not divisible by the pivot, add its row to the pivot's and start the pivot again.

    >>> A = [(2, 4), (6, 8)]
    >>> D, U, V = smith(A)
    >>> D
    ((2, 0), (0, 4))
    >>> mat_mul(mat_mul(U, A), V) == D
    True
    """
    n, A = _int_rows(rows, ncols)
    work = _Smith(A, n)
    t = 0
    while t < min(work.m, n) and work.pivot_smallest(t):
        work.reduce_pivot(t)
        t += 1
    return tuple(map(tuple, work.A)), tuple(map(tuple, work.U)), tuple(map(tuple, work.V))


class _Smith:
    """The matrix of :func:`smith` under way, with the row transform ``U`` and the column
    transform ``V`` applied along (``U A0 V = A`` throughout)."""

    def __init__(self, A: list[list[int]], n: int):
        self.A, self.n, self.m = A, n, len(A)
        m = self.m
        self.U = [[1 if i == j else 0 for j in range(m)] for i in range(m)]
        self.V = [[1 if i == j else 0 for j in range(n)] for i in range(n)]

    def swap_rows(self, i, j):
        A, U = self.A, self.U
        A[i], A[j] = A[j], A[i]
        U[i], U[j] = U[j], U[i]

    def swap_cols(self, i, j):
        for row in self.A:
            row[i], row[j] = row[j], row[i]
        for row in self.V:
            row[i], row[j] = row[j], row[i]

    def add_row(self, dst, src, q):  # row_dst += q * row_src
        A, U = self.A, self.U
        A[dst] = [a + q * b for a, b in zip(A[dst], A[src])]
        U[dst] = [a + q * b for a, b in zip(U[dst], U[src])]

    def add_col(self, dst, src, q):  # col_dst += q * col_src
        for row in self.A:
            row[dst] += q * row[src]
        for row in self.V:
            row[dst] += q * row[src]

    def pivot_smallest(self, t: int) -> bool:
        """Move the smallest nonzero entry of rows and columns ``>= t`` to ``(t, t)``; False
        when they are all zero."""
        A, best = self.A, None
        for i in range(t, self.m):
            for j in range(t, self.n):
                if A[i][j] and (best is None or abs(A[i][j]) < abs(A[best[0]][best[1]])):
                    best = (i, j)
        if best is None:
            return False
        self.swap_rows(t, best[0])
        self.swap_cols(t, best[1])
        return True

    def clear(self, t: int) -> bool:
        """Reduce row and column ``t`` modulo the pivot; True when a remainder is left (it
        is then moved to the pivot)."""
        A, piv, changed = self.A, self.A[t][t], False
        for i in range(t + 1, self.m):
            if A[i][t]:
                self.add_row(i, t, -(A[i][t] // piv))
                changed = changed or bool(A[i][t])
        for j in range(t + 1, self.n):
            if A[t][j]:
                self.add_col(j, t, -(A[t][j] // piv))
                changed = changed or bool(A[t][j])
        if changed:
            # bring the smallest nonzero remainder of row/column t to the pivot
            cand = [(abs(A[i][t]), i, t) for i in range(t + 1, self.m) if A[i][t]]
            cand += [(abs(A[t][j]), t, j) for j in range(t + 1, self.n) if A[t][j]]
            _, i, j = min(cand)
            if j == t:
                self.swap_rows(t, i)
            else:
                self.swap_cols(t, j)
        return changed

    def indivisible_row(self, t: int) -> int | None:
        """A row below ``t`` with an entry (right of ``t``) that the pivot does not divide."""
        A, piv = self.A, self.A[t][t]
        for i in range(t + 1, self.m):
            for j in range(t + 1, self.n):
                if A[i][j] % piv:
                    return i
        return None

    def reduce_pivot(self, t: int) -> None:
        """Make ``(t, t)`` a positive pivot dividing every later entry, alone in its row and
        column."""
        while True:
            if self.clear(t):
                continue
            bad = self.indivisible_row(t)
            if bad is None:
                break
            self.add_row(t, bad, 1)
        if self.A[t][t] < 0:
            self.A[t] = [-x for x in self.A[t]]
            self.U[t] = [-x for x in self.U[t]]


# ---------------------------------------------------------------------------------------------
# solving


def _rref(rows: Sequence[Sequence], n: int) -> tuple[list[list[Fraction]], list[int]]:
    """Reduced row echelon form over Q; returns (nonzero rows, pivot columns)."""
    M = [[Fraction(x) for x in r] for r in rows]
    pivots: list[int] = []
    r = 0
    for c in range(n):
        p = next((i for i in range(r, len(M)) if M[i][c] != 0), None)
        if p is None:
            continue
        M[r], M[p] = M[p], M[r]
        inv = 1 / M[r][c]
        M[r] = [x * inv for x in M[r]]
        for i in range(len(M)):
            if i != r and M[i][c] != 0:
                f = M[i][c]
                M[i] = [a - f * b for a, b in zip(M[i], M[r])]
        pivots.append(c)
        r += 1
    return M[:r], pivots


def solve_rational(A: Sequence[Sequence], b: Sequence, ncols: int | None = None
                   ) -> tuple[Fraction, ...] | None:
    """One rational solution ``x`` of ``A x = b`` (free variables set to 0), or None.

    >>> solve_rational([(1, 1), (1, -1)], (3, 1))
    (Fraction(2, 1), Fraction(1, 1))
    >>> solve_rational([(1, 1), (2, 2)], (1, 3)) is None
    True
    """
    n = _ncols(A, ncols)
    if len(b) != len(A):
        raise ValueError("right-hand side of the wrong length")
    aug = [list(r) + [bi] for r, bi in zip(A, b)]
    R, piv = _rref(aug, n + 1)
    if n in piv:
        return None
    x = [Fraction(0)] * n
    for row, c in zip(R, piv):
        x[c] = row[n]
    return tuple(x)


def solve_integer(A: Sequence[Sequence[int]], b: Sequence[int], ncols: int | None = None
                  ) -> Vec | None:
    """One integer solution of ``A x = b``, or None if there is none.

    >>> x = solve_integer([(2, 4)], (6,)); 2 * x[0] + 4 * x[1]
    6
    >>> solve_integer([(2, 4)], (3,)) is None
    True
    """
    n, ir = _int_rows(A, ncols)
    if len(b) != len(ir):
        raise ValueError("right-hand side of the wrong length")
    D, U, V = smith(ir, n)
    c = mat_vec(U, tuple(int(x) for x in b)) if U else ()
    y = [0] * n
    for i in range(len(ir)):
        d = D[i][i] if i < n else 0
        if d == 0:
            if c[i] != 0:
                return None
        else:
            if c[i] % d:
                return None
            y[i] = c[i] // d
    return mat_vec(V, tuple(y)) if n else ()


def det(square: Sequence[Sequence[int]]) -> int:
    """Determinant of a square integer matrix (1 for the empty matrix).

    >>> det([(1, 2), (3, 4)])
    -2
    """
    m = len(square)
    if m == 0:
        return 1
    n, ir = _int_rows(square, None)
    if n != m:
        raise ValueError("determinant of a non-square matrix")
    return int(_flint(ir, n).det())


def inverse_rational(square: Sequence[Sequence]) -> tuple[tuple[Fraction, ...], ...]:
    """Inverse over Q of a square matrix; ValueError if singular.

    >>> inverse_rational([(2, 0), (0, 4)])
    ((Fraction(1, 2), Fraction(0, 1)), (Fraction(0, 1), Fraction(1, 4)))
    """
    m = len(square)
    if m == 0:
        return ()
    _ncols(square, m)
    aug = [list(r) + [1 if i == j else 0 for j in range(m)] for i, r in enumerate(square)]
    R, piv = _rref(aug, 2 * m)
    if len(piv) < m or piv[m - 1] >= m:
        raise ValueError("singular matrix has no inverse")
    return tuple(tuple(row[m:]) for row in R)


# ---------------------------------------------------------------------------------------------
# abelian groups


def abelian_group_string(invariants: Iterable[int], free_rank: int) -> str:
    """Format ``Z^r + Z/d1 + Z/d2 + ...`` (free part first, torsion ``d1 | d2 | ...``, units
    dropped, "0" for the trivial group).  The invariants are normalised through their
    Smith form, so any finite list of orders is accepted.

    >>> abelian_group_string([], 0), abelian_group_string([], 1), abelian_group_string([1], 2)
    ('0', 'Z', 'Z^2')
    >>> abelian_group_string([5], 0), abelian_group_string([4, 2], 0)
    ('Z/5', 'Z/2 + Z/4')
    >>> abelian_group_string([3], 2), abelian_group_string([2, 3], 0)
    ('Z^2 + Z/3', 'Z/6')
    """
    if free_rank < 0:
        raise ValueError("negative free rank")
    inv = [abs(int(x)) for x in invariants]
    if any(x == 0 for x in inv):
        raise ValueError("invariant 0 belongs to the free rank")
    k = len(inv)
    diag = snf_invariants([tuple(inv[i] if i == j else 0 for j in range(k)) for i in range(k)],
                          k) if k else ()
    parts = []
    if free_rank == 1:
        parts.append("Z")
    elif free_rank > 1:
        parts.append(f"Z^{free_rank}")
    parts += [f"Z/{d}" for d in diag if d != 1]
    return " + ".join(parts) if parts else "0"
