"""The conelang language server: ``conelang serve`` runs :func:`main` on stdio.

See :mod:`conelang.server.app` for the handlers and :mod:`conelang.server.worker` for the
process that does the heavy computations.
"""
from __future__ import annotations


def main(argv=None) -> None:
    """Run the language server on stdio until the client says ``exit``."""
    from .app import main as run
    run(argv)
