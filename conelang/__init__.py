"""conelang: a declarative language for lattice cones, lattice maps and fans.

The Python API (:mod:`conelang.api`) is exported here lazily, so ``import conelang`` (and the
start of the ``conelang`` command) does not load the engine: ``conelang.load(path)``,
``conelang.loads(text)``, and the constructors ``conelang.cone(...)``, ``conelang.map(...)``,
``conelang.fan(...)``, ``conelang.lattice(...)``, ``conelang.polytope(...)``,
``conelang.characters(...)``.
"""
__version__ = "0.1.0"

_API = ("load", "loads", "lattice", "cone", "map", "fan", "polytope", "characters",
        "Document", "Object", "Section", "Diagnostic", "ConelangError", "DEFAULT_BUDGET")
__all__ = list(_API)


def __getattr__(name: str):
    if name in _API:
        from . import api
        return getattr(api, name)
    raise AttributeError(f"module 'conelang' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(_API))


def _source_checkout_layout() -> None:
    """In the wheel, ``server/`` and ``grammar/`` are installed as ``conelang.server`` and
    ``conelang.grammar``.  When this package is imported straight from a source checkout (say
    ``python -m conelang.cli serve`` run in the repository), find them beside it instead."""
    from pathlib import Path
    here = Path(__file__).resolve().parent
    root = here.parent
    if not (here / "server").is_dir() and (root / "server" / "__init__.py").is_file() \
            and (root / "grammar" / "conelang.lark").is_file():
        __path__.append(str(root))  # noqa: F821 (the package's own search path)


_source_checkout_layout()
