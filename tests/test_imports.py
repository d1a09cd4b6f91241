"""The modules of ``conelang/semantics`` import each other without a circle, counting the
imports inside functions too (a function-local import is how a circle hides)."""
from __future__ import annotations

import ast
from pathlib import Path

SEMANTICS = Path(__file__).parent.parent / "conelang" / "semantics"


def import_graph() -> dict[str, set[str]]:
    """module -> the sibling modules it imports (``from .x import …`` anywhere in the file)."""
    names = {p.stem for p in SEMANTICS.glob("*.py")}
    graph: dict[str, set[str]] = {}
    for path in SEMANTICS.glob("*.py"):
        deps = set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.level == 1:
                if node.module:
                    deps.add(node.module.split(".")[0])
                else:
                    deps |= {a.name for a in node.names}
        graph[path.stem] = {d for d in deps if d in names and d != path.stem}
    return graph


def find_cycle(graph: dict[str, set[str]]) -> list[str] | None:
    """A cycle of the directed graph as a list of nodes, or None (depth-first search).

    >>> find_cycle({"a": {"b"}, "b": {"a"}}), find_cycle({"a": {"b"}, "b": set()})
    (['a', 'b', 'a'], None)
    """
    state: dict[str, int] = {}
    path: list[str] = []

    def visit(n):
        state[n] = 1
        path.append(n)
        for m in sorted(graph.get(n, ())):
            if state.get(m) == 1:
                return path[path.index(m):] + [m]
            if m not in state:
                found = visit(m)
                if found:
                    return found
        path.pop()
        state[n] = 2
        return None

    for n in sorted(graph):
        if n not in state:
            found = visit(n)
            if found:
                return found
    return None


def test_find_cycle_finds_a_planted_circle():
    # brute force on a small case: a chain has no cycle until its ends are joined
    chain = {str(i): {str(i + 1)} for i in range(5)}
    assert find_cycle(chain) is None
    chain["5"] = {"2"}
    assert find_cycle(chain) == ["2", "3", "4", "5", "2"]


def test_semantics_has_no_import_circle():
    graph = import_graph()
    assert "analysis" in graph and "properties" in graph["analysis"]
    cycle = find_cycle(graph)
    assert cycle is None, "import circle in conelang/semantics: " + " -> ".join(cycle)
