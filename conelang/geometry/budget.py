"""Work budgets for computations that can explode.

A :class:`Budget` counts abstract work units.  Heavy algorithms call :meth:`Budget.tick`
inside their loops; when the count passes ``limit`` a :class:`BudgetExceeded` is raised that
names the computation that was too large (``what``, a short noun phrase, and ``detail``).  A
budget can also be cancelled from outside (the language server does this when the text
changes): the next ``tick`` raises :class:`Cancelled`.

>>> b = Budget(limit=10)
>>> b.tick(5, "example")
>>> try:
...     b.tick(6, "Hilbert basis")
... except BudgetExceeded as e:
...     print(e.what)
Hilbert basis
"""
from __future__ import annotations

import threading

DEFAULT_LIMIT = 20_000_000


class BudgetExceeded(Exception):
    """The computation ``what`` needed more than ``limit`` work units."""

    def __init__(self, what: str, limit: int, detail: str = "", needed: int | None = None):
        self.what = what
        self.limit = limit
        self.detail = detail
        self.needed = needed       # the estimated total, when the refusal came from an estimate
        super().__init__(what, limit, detail)      # worded by semantics.forms.budget_message


class Cancelled(Exception):
    """The computation was cancelled from outside."""


class Budget:
    """A mutable work counter shared by one evaluation (not a value: never cached)."""

    __slots__ = ("limit", "used", "_cancel")

    def __init__(self, limit: int | None = DEFAULT_LIMIT, cancel: threading.Event | None = None):
        self.limit = limit
        self.used = 0
        self._cancel = cancel

    def tick(self, n: int = 1, what: str = "computation", detail: str = "") -> None:
        self.used += n
        if self._cancel is not None and self._cancel.is_set():
            raise Cancelled(what)
        if self.limit is not None and self.used > self.limit:
            raise BudgetExceeded(what, self.limit, detail)

    def check(self, estimate: int, what: str, detail: str = "") -> None:
        """Refuse up front when an estimated cost alone is over the remaining budget."""
        if self.limit is not None and self.used + estimate > self.limit:
            raise BudgetExceeded(what, self.limit, detail or f"estimated {estimate} steps",
                                 needed=self.used + estimate)


UNLIMITED = None


def ensure(budget: Budget | None) -> Budget:
    """Return ``budget`` or a fresh unlimited one."""
    return budget if budget is not None else Budget(limit=None)
