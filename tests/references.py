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
