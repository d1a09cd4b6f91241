"""Independent reference computations shared by tests (deliberately naive, no project code)."""
from __future__ import annotations


def hirzebruch_jung(n: int, q: int) -> list[int]:
    """[b1, b2, ...] with n/q = b1 - 1/(b2 - 1/...), every b_i >= 2, for 0 < q < n, by the
    defining recursion (Fulton, Introduction to Toric Varieties, §2.6 (from memory)).

    >>> hirzebruch_jung(7, 3)
    [3, 2, 2]
    """
    out = []
    while q:
        b = -(-n // q)
        out.append(b)
        n, q = q, b * q - n
    return out


def magic_square_constraints(n: int) -> tuple[list[tuple[int, ...]], list[tuple[int, ...]]]:
    """``(inequalities, equations)`` in Z^(n^2) of the n x n magic squares: entries >= 0, and
    every row, column and both diagonals with the sum of the first row.

    >>> ineqs, eqs = magic_square_constraints(3)
    >>> len(ineqs), len(eqs), eqs[0]
    (9, 7, (1, 1, 1, -1, -1, -1, 0, 0, 0))
    """
    d = n * n
    lines = [[i * n + j for j in range(n)] for i in range(n)] + [[i * n + j for i in range(n)] for j in range(n)]
    lines += [[i * n + i for i in range(n)], [i * n + n - 1 - i for i in range(n)]]
    eqs = [tuple((k in lines[0]) - (k in line) for k in range(d)) for line in lines[1:]]
    return [tuple(int(k == m) for k in range(d)) for m in range(d)], eqs
