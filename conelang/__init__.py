"""conelang: a declarative language for lattice cones, lattice maps and fans."""
__version__ = "0.1.0"


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
