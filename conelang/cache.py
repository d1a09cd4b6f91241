"""The one cache of the analysis: results keyed by the content they are computed from.

Every layer that remembers work (parse trees of statement texts, typed statements, statement
evaluations, heavy geometry results) keeps it in a named :class:`ContentCache` made here, so
there is one mechanism — least recently used entries go first, a lock makes it safe for the
language server's threads — and one place to clear it or see how full it is.  Keys are
contents (texts, fingerprints, hashable mathematical values), never object identities, so an
entry can never be mistaken for another after an object dies.

This module imports nothing of conelang: every layer may use it.

>>> c = ContentCache("example", 2)
>>> c.put("a", 1); c.put("b", 2); c.get("a"); c.put("c", 3)
1
>>> c.get("b") is None, c.get("a"), len(c)
(True, 1, 2)
>>> stats()["example"]
2
"""
from __future__ import annotations

import threading
from collections import OrderedDict

_MISSING = object()
CACHES: "dict[str, ContentCache]" = {}


class ContentCache:
    """A bounded least-recently-used map; registered under ``name`` (see :func:`clear_all`)."""

    def __init__(self, name: str, size: int):
        self.name = name
        self.size = size
        self._items: "OrderedDict[object, object]" = OrderedDict()
        self._lock = threading.Lock()
        CACHES[name] = self

    def get(self, key, default=None):
        with self._lock:
            value = self._items.get(key, _MISSING)
            if value is _MISSING:
                return default
            self._items.move_to_end(key)
            return value

    def put(self, key, value) -> None:
        with self._lock:
            self._items[key] = value
            self._items.move_to_end(key)
            while len(self._items) > self.size:
                self._items.popitem(last=False)

    def __contains__(self, key) -> bool:
        with self._lock:
            return key in self._items

    def __len__(self) -> int:
        return len(self._items)

    def clear(self) -> None:
        with self._lock:
            self._items.clear()


def clear_all() -> None:
    """Forget everything every cache remembers (tests; a long session that wants memory back)."""
    for cache in list(CACHES.values()):
        cache.clear()


def stats() -> dict[str, int]:
    """How many entries each cache holds, by name."""
    return {name: len(cache) for name, cache in CACHES.items()}
