"""The IDE layer: the one API through which the command line, batch, the Python API and the
language server ask about ``.cone`` files.

Hand it text (:meth:`AnalysisHost.apply_change`), ask in files and offsets (diagnostics,
hover, definition, references, rename, completion, code actions, semantic tokens, formatting,
diagnostic lines); it does no I/O (files that ``use`` statements name are read by the loader it
is given, :class:`conelang.project.FileLoader`).
"""
from __future__ import annotations

from .host import AnalysisHost, diagnostic_json, diagnostic_line

__all__ = ["AnalysisHost", "diagnostic_json", "diagnostic_line", "warm_up"]


def warm_up() -> None:
    """Import the engine and build the parser (say, before worker processes fork, so that they
    inherit both)."""
    host = AnalysisHost()
    host.apply_change("mem://warm-up.cone", "lattice N = Z^2\ncone c in N { rays (1,0) (1,2) }\n")
    host.diagnostics("mem://warm-up.cone")
