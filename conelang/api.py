"""The Python API of conelang, for scripts and notebooks.

:func:`load` and :func:`loads` analyse ``.cone`` text exactly as ``conelang show --format json``
does (through :class:`conelang.ide.host.AnalysisHost`, the one entry point of the command line and
the language server) and return a :class:`Document`.  Its objects give the facts of the JSON
document with attribute access; numbers are exact: ``int``, and ``fractions.Fraction`` where
the JSON writes a rational ``"p/q"``; lists become tuples.  The constructors :func:`lattice`,
:func:`cone`, :func:`map`, :func:`fan`, :func:`polytope` and :func:`characters` write ``.cone``
text from Python values (ints and Fractions only, names checked) and go through :func:`loads`
too, so there is no second engine.

>>> doc = loads("lattice N = Z^2\\ncone wedge in N { rays (1,0) (1,2) }")
>>> doc.names
['N', 'wedge']
>>> sorted(doc["wedge"].variety.generators)
[(0, 1), (1, 0), (2, -1)]
>>> doc["wedge"].variety.equations
('z1*z3 - z2^2',)
>>> c = cone(rays=[(1, 0), (Fraction(1, 2), 1)], lattice=lattice(2, glue=[(Fraction(1, 2), 0)]))
>>> c.rays                  # (1, 0) is not primitive in Z^2 + Z·(1/2, 0)
((Fraction(1, 2), 0), (Fraction(1, 2), 1))
>>> [d.code for d in c.document.diagnostics]
['not-primitive']
>>> cone(rays=[(1, 0.5)])
Traceback (most recent call last):
    ...
conelang.api.ConelangError: conelang.cone(): rays: vector 1: coordinate 0.5 is a float; floats are not exact: write an int or a Fraction such as Fraction(1, 2)
"""
from __future__ import annotations

import copy
import os
import re
from collections.abc import Iterable, Iterator, Mapping, Sequence
from dataclasses import dataclass
from fractions import Fraction
from numbers import Integral, Rational
from pathlib import Path
from typing import Any, Union

from .geometry import budget as gbudget
from .ide import AnalysisHost

__all__ = ["load", "loads", "lattice", "cone", "map", "fan", "polytope", "characters",
           "Document", "Object", "Section", "Diagnostic", "ConelangError", "DEFAULT_BUDGET"]

Number = Union[int, Fraction]
Vector = Sequence[Number]
DEFAULT_BUDGET: int = gbudget.DEFAULT_LIMIT
"""The work budget of each heavy computation, as for ``conelang show`` (about a µs a step)."""


class ConelangError(ValueError):
    """Bad input to the Python API: an unreadable file, or a constructor given something it
    cannot write as ``.cone`` text, or text that has errors.  ``diagnostics`` holds the
    diagnostics of the generated text when there are some."""

    def __init__(self, message: str, diagnostics: Iterable[Diagnostic] = ()):
        super().__init__(message)
        self.diagnostics: tuple[Diagnostic, ...] = tuple(diagnostics)


@dataclass(frozen=True)
class Diagnostic:
    """One diagnostic of a document: the same data as an entry of the JSON ``diagnostics``
    (lines and columns 1-based)."""
    line: int
    column: int
    end_line: int
    end_column: int
    severity: str
    code: str
    message: str

    @classmethod
    def from_json(cls, d: Mapping[str, Any]) -> Diagnostic:
        return cls(d["line"], d["column"], d["end_line"], d["end_column"], d["severity"],
                   d["code"], d["message"])

    def __str__(self) -> str:
        return f"{self.line}:{self.column}: {self.severity}: {self.message} [{self.code}]"


# ---------------------------------------------------------------------------------------------
# exact values

_RATIONAL = re.compile(r"-?\d+/\d+")


def exact(value: Any, where: str = "") -> Any:
    """A JSON value as an exact Python value: ``"p/q"`` → ``Fraction``, lists → tuples,
    dictionaries → :class:`Section`; other strings (``"Z/3"``, equations) stay strings.

    >>> exact([1, "-3/4", "Z/3"])
    (1, Fraction(-3, 4), 'Z/3')
    """
    if isinstance(value, str):
        return Fraction(value) if _RATIONAL.fullmatch(value) else value
    if isinstance(value, list):
        return tuple(exact(v, where) for v in value)
    if isinstance(value, dict):
        return Section(value, where)
    return value


class Section(Mapping):
    """A dictionary of facts (an object, or a nested part such as ``variety``) with attribute
    access: ``s.key`` and ``s["key"]`` give the exact value; ``s.facts`` the raw JSON data.
    Keys that are not Python names (``ages["3/2"]``, ``intersections["D1*D2"]``) are read
    with ``s["key"]``; keys stay strings."""

    __slots__ = ("_facts", "_where")

    def __init__(self, facts: dict, where: str):
        self._facts = facts
        self._where = where

    @property
    def facts(self) -> dict:
        """The raw JSON data of this part (a copy)."""
        return copy.deepcopy(self._facts)

    def __getitem__(self, key: str) -> Any:
        try:
            raw = self._facts[key]
        except (KeyError, TypeError):
            raise KeyError(f"{self._where} has no fact {key!r}; it has: {self._available()}") from None
        return exact(raw, f"{self._where}.{key}")

    def __getattr__(self, key: str) -> Any:
        if key.startswith("_"):
            raise AttributeError(key)
        try:
            raw = self._facts[key]
        except KeyError:
            raise AttributeError(f"{self._where} has no fact {key!r}; it has: {self._available()}") from None
        return exact(raw, f"{self._where}.{key}")

    def __iter__(self) -> Iterator[str]:
        return iter(self._facts)

    def __len__(self) -> int:
        return len(self._facts)

    def __dir__(self) -> list[str]:
        return sorted(set(super().__dir__()) | {k for k in self._facts if k.isidentifier()})

    def _available(self) -> str:
        return ", ".join(self._facts) or "nothing"

    def __repr__(self) -> str:
        return f"<facts of {self._where}: {self._available()}>"


class Object(Section):
    """One object of a document (a lattice, cone, map, morphism, characters, fan or polytope):
    its facts as in the JSON, plus ``name`` and ``document``.  In a notebook it shows itself
    as a picture (``_repr_svg_``), LaTeX (``_repr_latex_``) or Markdown (``_repr_markdown_``)."""

    __slots__ = ("name", "document")

    def __init__(self, name: str, facts: dict, document: Document):
        super().__init__(facts, name)
        self.name = name
        self.document = document

    @property
    def kind(self) -> str:
        """``lattice``, ``cone``, ``map``, ``morphism``, ``characters``, ``fan`` or ``polytope``."""
        return self._facts["kind"]

    # -- renderings (the same renderers as ``conelang show --format …``) ---------------------
    def svg(self) -> str | None:
        """The picture of this object as an SVG document, or None when it has none (see
        ``conelang show --format svg``)."""
        from .render import svg
        return svg.render_object(self.document._data, self.name)

    def latex(self) -> str:
        """The facts as a LaTeX fragment (it needs ``amsmath`` and ``amssymb``)."""
        from .render import latex
        return latex.render_object(self.name, self._facts)

    def markdown(self) -> str:
        """The facts as Markdown."""
        from .render import markdown
        return markdown.render_object(self.name, self._facts, level=3)

    def _repr_svg_(self) -> str | None:
        return self.svg()

    def _repr_latex_(self) -> str:
        return self.latex()

    def _repr_markdown_(self) -> str:
        return self.markdown()

    def __repr__(self) -> str:
        return f"<{self.kind} {self.name!r}{_summary(self._facts)}>"


def _summary(o: dict) -> str:
    """A few words about an object for its ``repr``."""
    kind = o.get("kind")
    if kind == "lattice":
        return f": rank {o.get('rank')}"
    if kind == "cone":
        from .render.common import cone_summary
        return f" in {o.get('lattice')}: {cone_summary(o)}"
    if kind == "map":
        return f": {o.get('source')} -> {o.get('target')}" + (f", rank {o['rank']}" if "rank" in o else "")
    if kind == "morphism":
        return f" = {o.get('map')} : {o.get('source')} -> {o.get('target')}"
    if kind == "fan":
        return f" in {o.get('lattice')}: {len(o.get('rays', []))} rays, {len(o.get('cones', []))} cones"
    if kind == "polytope":
        return f" in {o.get('lattice')}: dim {o.get('dim')}, {len(o.get('vertices', []))} vertices"
    if kind == "characters":
        return f" of {o.get('lattice')}: {len(o.get('characters', []))} characters"
    return ""


class Document:
    """The analysis of one ``.cone`` text: its ``diagnostics`` and its objects (``doc[name]``,
    ``doc.names``, ``for obj in doc``).  ``to_json()`` is the document of
    ``conelang show --format json``.  An object whose definition has errors is left out, as in
    the JSON."""

    def __init__(self, data: dict, text: str, uri: str):
        self._data = data
        self.text: str = text
        """The source text."""
        self.uri: str = uri
        """The URI the host knows the text by (``file://…`` for :func:`load`)."""
        self.diagnostics: list[Diagnostic] = [Diagnostic.from_json(d) for d in data["diagnostics"]]
        """Every diagnostic, in the order of the JSON (by position)."""

    @property
    def file(self) -> str:
        """The file as given to :func:`load` (the JSON's ``file``), or the ``name`` of :func:`loads`."""
        return self._data["file"]

    @property
    def errors(self) -> list[Diagnostic]:
        """The diagnostics of severity ``error`` (a failed ``expect`` line is one)."""
        return [d for d in self.diagnostics if d.severity == "error"]

    @property
    def ok(self) -> bool:
        """No error: what makes ``conelang check`` exit 0."""
        return not self.errors

    @property
    def names(self) -> list[str]:
        """The names of the objects, in the order of the file."""
        return list(self._data["objects"])

    def __getitem__(self, name: str) -> Object:
        objects = self._data["objects"]
        if name not in objects:
            if not isinstance(name, str):
                raise KeyError(f"objects are looked up by name (a str), not {type(name).__name__}")
            errors = [str(d) for d in self.errors]
            why = (" (it may have an error: " + "; ".join(errors) + ")") if errors else ""
            raise KeyError(f"{self.file} has no object {name!r}{why}; "
                           f"its objects are: {', '.join(objects) or 'none'}")
        return Object(name, objects[name], self)

    def get(self, name: str, default: Any = None) -> Object | Any:
        return self[name] if name in self else default

    def __contains__(self, name: object) -> bool:
        return isinstance(name, str) and name in self._data["objects"]

    def __iter__(self) -> Iterator[Object]:
        """The objects, in the order of the file."""
        return (self[n] for n in self.names)

    def __len__(self) -> int:
        return len(self._data["objects"])

    def to_json(self) -> dict:
        """The JSON document (``file``, ``diagnostics``, ``objects``), a fresh copy: the same
        dictionary as ``conelang show FILE --format json`` writes."""
        return copy.deepcopy(self._data)

    def markdown(self) -> str:
        """Every object as Markdown, with the diagnostics at the end."""
        from .render import markdown
        out = markdown.render(self._data)
        if self.diagnostics:
            out += "\n**Diagnostics**\n\n" + "".join(f"- line {d.line}, column {d.column}: "
                                                   f"{d.severity}: {d.message} `{d.code}`\n"
                                                   for d in self.diagnostics)
        return out

    def latex(self, whole_document: bool = False) -> str:
        """The LaTeX of ``conelang show --format latex`` (``whole_document``: a complete article)."""
        from .render import latex
        return latex.render(self._data, whole_document=whole_document)

    def svg(self) -> str:
        """The SVG of ``conelang show --format svg``: every picture of the document."""
        from .render import svg
        return svg.render(self._data)

    def _repr_markdown_(self) -> str:
        return self.markdown()

    def __repr__(self) -> str:
        n_err = len(self.errors)
        return (f"<Document {self.file!r}: {len(self)} object{'s' * (len(self) != 1)}, "
                f"{n_err} error{'s' * (n_err != 1)}>")


# ---------------------------------------------------------------------------------------------
# loading: the one place where a host is made

def _open(uri: str, text: str, budget: int | None, files: bool, allow_outside_root: bool) -> AnalysisHost:
    """A host that knows ``text`` as ``uri``; with ``files``, ``use`` statements read other
    files through the loader of the command line (:class:`conelang.project.FileLoader`)."""
    loader = None
    if files:
        from .project import FileLoader
        loader = FileLoader(allow_outside_root)
    host = AnalysisHost(budget, loader=loader)
    host.apply_change(uri, text)
    return host


def _check_budget(budget: Any) -> int | None:
    if budget is None:
        return None
    if isinstance(budget, bool) or not isinstance(budget, Integral) or budget <= 0:
        raise ConelangError(f"budget must be a positive int (work steps) or None for no limit, not {budget!r}")
    return int(budget)


def _document(text: str, uri: str, label: str, budget: Any, files: bool = False,
              allow_outside_root: bool = False) -> Document:
    host = _open(uri, text, _check_budget(budget), files, allow_outside_root)
    return Document(host.document(uri, label=label), text, uri)


def loads(text: str, name: str = "<string>", *, budget: int | None = DEFAULT_BUDGET,
          folder: str | os.PathLike | None = None, allow_outside_root: bool = False) -> Document:
    """Analyse ``.cone`` source text.  ``name`` is the document's ``file``; ``budget`` the
    work budget of each heavy computation (None: no limit), as ``conelang show --budget``.
    Without ``folder`` the text is not a file, so a ``use`` statement in it cannot be resolved
    (it is an error diagnostic); with ``folder``, ``use`` paths are relative to that folder, as
    if the text were a file there (inside its project root unless ``allow_outside_root``).

    >>> import tempfile, pathlib
    >>> d = pathlib.Path(tempfile.mkdtemp()); _ = (d / "conelang.toml").write_text("")
    >>> _ = (d / "shared.cone").write_text("lattice N = Z^2\\n")
    >>> loads('use "shared.cone"\\ncone c in N { rays (1,0) (1,2) }', folder=d)["c"].dim
    2
    """
    if not isinstance(text, str):
        raise ConelangError(f"loads() takes the text of a .cone file as a str, not {type(text).__name__}"
                            + (" (decode the bytes first, or use load(path))" if isinstance(text, bytes) else ""))
    if not isinstance(name, str):
        raise ConelangError(f"the name of a document is a str, not {type(name).__name__}")
    if folder is None:
        return _document(text, name, name, budget)
    if not isinstance(folder, (str, os.PathLike)) or not Path(folder).is_dir():
        raise ConelangError(f"folder= must be an existing folder, not {folder!r}")
    stem = name if _NAME.fullmatch(name or "") else "string"
    uri = (Path(folder).resolve() / f"{stem}.cone").as_uri()
    return _document(text, uri, name, budget, files=True, allow_outside_root=bool(allow_outside_root))


def load(path: str | os.PathLike, *, budget: int | None = DEFAULT_BUDGET,
         allow_outside_root: bool = False) -> Document:
    """Read and analyse a ``.cone`` file (UTF-8), with the files its ``use`` statements name
    (inside the project root unless ``allow_outside_root``, as ``--allow-outside-root``).  The
    document's ``file`` is the path as given, as for ``conelang show``; its ``uri`` the
    ``file://`` URI of the absolute path."""
    if not isinstance(path, (str, os.PathLike)):
        raise ConelangError(f"load() takes a path (str or pathlib.Path), not {type(path).__name__}"
                            + ("; for source text use loads()" if isinstance(path, bytes) else ""))
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise FileNotFoundError(f"{p}: no such file") from None
    except IsADirectoryError:
        raise IsADirectoryError(f"{p}: a folder, not a .cone file") from None
    except UnicodeDecodeError as exc:
        raise ConelangError(f"{p}: not UTF-8 text ({exc.reason} at byte {exc.start})") from None
    except OSError as exc:
        raise OSError(f"{p}: cannot read ({exc.strerror})") from None
    return _document(text, p.resolve().as_uri(), str(p), budget, files=True,
                     allow_outside_root=bool(allow_outside_root))


# ---------------------------------------------------------------------------------------------
# constructors: Python values → .cone text → loads

_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")


class _Bad(Exception):
    """A constructor argument that cannot be written (turned into ConelangError by _build)."""


def _name(name: Any, what: str = "name") -> str:
    from .syntax.parser import KEYWORDS
    if not isinstance(name, str):
        raise _Bad(f"{what} must be a str, not {type(name).__name__}")
    if not _NAME.fullmatch(name):
        raise _Bad(f"{what} {name!r} is not a conelang name (letters, digits and _, not starting with a digit)")
    if name in KEYWORDS:
        raise _Bad(f"{what} {name!r} is a reserved word of the language")
    return name


def _number(x: Any, where: str) -> str:
    if isinstance(x, bool):
        raise _Bad(f"{where}: {x!r} is a bool, not a number")
    if isinstance(x, Integral):
        return str(int(x))
    if isinstance(x, Rational):
        from .semantics.forms import fmt_number
        return fmt_number(Fraction(int(x.numerator), int(x.denominator)))
    if isinstance(x, float):
        raise _Bad(f"{where}: coordinate {x!r} is a float; floats are not exact: "
                   f"write an int or a Fraction such as Fraction(1, 2)")
    raise _Bad(f"{where}: {x!r} is a {type(x).__name__}; coordinates are ints or Fractions")


def _sequence(xs: Any, where: str) -> list:
    if isinstance(xs, (str, bytes, Mapping)) or not isinstance(xs, Iterable):
        raise _Bad(f"{where}: expected a list or tuple, not {type(xs).__name__} {xs!r}")
    return list(xs)


def _vector(v: Any, where: str) -> tuple[str, int]:
    """``(1, 1/2)`` and the length."""
    coords = _sequence(v, where)
    if not coords:
        raise _Bad(f"{where}: a vector needs at least one coordinate")
    return "(" + ", ".join(_number(x, where) for x in coords) + ")", len(coords)


def _vectors(vs: Any, what: str) -> tuple[list[str], int | None]:
    """The vectors written out and their common length (None for no vectors)."""
    items = _sequence(vs, what)
    out, length = [], None
    for i, v in enumerate(items, 1):
        text, n = _vector(v, f"{what}: vector {i}")
        if length is not None and n != length:
            raise _Bad(f"{what}: vector {i} {text} has {n} coordinates, the ones before it {length}")
        out.append(text)
        length = n
    return out, length


class _Source:
    """The lines of the text being built, with the lattices defined so far."""

    def __init__(self, taken: Iterable[str]):
        self.lines: list[str] = []
        self.taken = set(taken)
        self.lattices: dict[tuple, str] = {}   # (name, facts) of a lattice object → its name

    def fresh(self, base: str) -> str:
        name, i = base, 1
        while name in self.taken:
            name, i = f"{base}{i}", i + 1
        self.taken.add(name)
        return name

    def lattice(self, spec: Any, default: str, rank: int | None, what: str) -> str:
        """The name of the lattice ``spec`` (an int rank, a lattice Object, or None: Z^rank
        of the vectors), defining it in the text when needed."""
        if spec is None:
            if rank is None:
                raise _Bad(f"{what}: give the lattice (its rank, or a lattice object) when there are no vectors")
            spec = rank
        if isinstance(spec, bool) or not isinstance(spec, (Integral, Object)):
            raise _Bad(f"{what}: the lattice is an int rank or a lattice object "
                       f"(conelang.lattice(…) or doc[name]), not {type(spec).__name__} {spec!r}")
        if isinstance(spec, Integral):
            name = self.fresh(default)
            self.lines.append(f"lattice {name} = Z^{int(spec)}")
            return name
        return self.lattice_object(spec, what)

    def lattice_object(self, obj: Object, what: str) -> str:
        if obj.kind != "lattice":
            raise _Bad(f"{what}: {obj.name!r} is a {obj.kind}, not a lattice")
        key = (obj.name, repr(obj._facts))
        if key in self.lattices:
            return self.lattices[key]
        if obj.name in self.taken:
            raise _Bad(f"{what}: two different lattices are named {obj.name!r}")
        self.taken.add(obj.name)
        facts = obj._facts
        if "dual_of" in facts:
            primal = obj.document[facts["dual_of"]]
            line = f"lattice {obj.name} = dual {self.lattice_object(primal, what)}"
        elif facts.get("basis"):
            glue = " + ".join(_vector(v, what)[0] for v in _json_vectors(facts["basis"])
                              if not all(isinstance(x, int) for x in v))
            line = f"lattice {obj.name} = Z^{facts['rank']}" + (f" + {glue}" if glue else "")
        else:
            line = f"lattice {obj.name} = Z^{facts['rank']}"
        self.lines.append(line)
        self.lattices[key] = obj.name
        return obj.name


def _json_vectors(vs) -> list:
    """JSON vectors (with "p/q" strings) as Fractions, to write them again."""
    return [[Fraction(x) if isinstance(x, str) else x for x in v] for v in vs]


def _build(what: str, name: Any, make) -> Object:
    """Run ``make(src, name)`` (which appends the statements), analyse the text and return the
    object ``name``; every problem becomes a ConelangError that says what was wrong."""
    try:
        name = _name(name)
        src = _Source([name])
        make(src, name)
    except _Bad as exc:
        raise ConelangError(f"conelang.{what}(): {exc}") from None
    text = "\n".join(src.lines) + "\n"
    doc = loads(text, name=f"<conelang.{what}>")
    if doc.errors or name not in doc:
        problems = "; ".join(f"{d.message} [{d.code}]" for d in doc.errors) or "no object was made"
        raise ConelangError(f"conelang.{what}(): {problems}\n(the generated source:\n{text})", doc.diagnostics)
    return doc[name]


def lattice(rank: int, *, glue: Iterable[Vector] = (), name: str = "N") -> Object:
    """The lattice Z^rank, or the overlattice Z^rank + Z·g for each glue vector g (rational).

    >>> lattice(2, glue=[(Fraction(1, 7), Fraction(3, 7))]).basis
    ((Fraction(1, 7), Fraction(3, 7)), (0, 1))
    """
    def make(src: _Source, name: str) -> None:
        if isinstance(rank, bool) or not isinstance(rank, Integral):
            raise _Bad(f"the rank is an int, not {type(rank).__name__} {rank!r}")
        terms, _ = _vectors(glue, "glue")
        src.lines.append(f"lattice {name} = Z^{int(rank)}" + "".join(f" + {t}" for t in terms))
    return _build("lattice", name, make)


def cone(rays: Iterable[Vector] | None = None, *, halfspaces: Iterable[Vector] | None = None,
         equations: Iterable[Vector] | None = None, lattice: int | Object | None = None,
         grading: Vector | None = None, name: str = "sigma") -> Object:
    """The cone generated by ``rays``, or cut out by ``halfspaces`` u (⟨u, v⟩ ≥ 0) and
    ``equations`` u (⟨u, v⟩ = 0).  ``lattice``: its rank (a new lattice Z^rank, the default
    being the length of the vectors) or a lattice object; ``grading``: a vector of the dual
    lattice for the Hilbert series."""
    lat_arg = lattice

    def make(src: _Source, name: str) -> None:
        if (rays is None) == (halfspaces is None):
            raise _Bad("give either rays or halfspaces (with optional equations)")
        if rays is not None and equations is not None:
            raise _Bad("equations go with halfspaces, not with rays")
        if rays is not None:
            vs, n = _vectors(rays, "rays")
            body = "rays" + "".join(f" {v}" for v in vs)
        else:
            vs, n = _vectors(halfspaces, "halfspaces")
            body = "halfspaces" + "".join(f" {v}" for v in vs)
            if equations is not None:
                es, m = _vectors(equations, "equations")
                if n is not None and m is not None and m != n:
                    raise _Bad(f"equations have {m} coordinates, halfspaces {n}")
                n = n if n is not None else m
                body += " equations" + "".join(f" {e}" for e in es)
        if grading is not None:
            body += " grading " + _vector(grading, "grading")[0]
        lat = src.lattice(lat_arg, "N", n, "lattice")
        src.lines.append(f"cone {name} in {lat} {{ {body} }}")
    return _build("cone", name, make)


def map(images: Iterable[Vector] | None = None, *, rows: Iterable[Vector] | None = None,
        source: int | Object | None = None, target: int | Object | None = None,
        name: str = "f") -> Object:
    """The lattice map sending the i-th basis vector of ``source`` to ``images[i]``, or with
    the matrix ``rows``.  ``source``/``target``: ranks (new lattices Z^n, Z^m; the default
    from the shape of the vectors) or lattice objects (the same object twice for a map of a
    lattice to itself)."""
    def make(src: _Source, name: str) -> None:
        if (images is None) == (rows is None):
            raise _Bad("give either images or rows")
        vs, length = _vectors(images if images is not None else rows, "images" if images is not None else "rows")
        n, m = (len(vs), length) if images is not None else (length, len(vs))
        s = src.lattice(source, "N", n, "source")
        t = src.lattice(target, "P", m, "target")     # the same lattice object twice: one lattice
        section = "images" if images is not None else "rows"
        src.lines.append(f"map {name} : {s} -> {t} {{ {section}" + "".join(f" {v}" for v in vs) + " }")
    return _build("map", name, make)


def fan(rays: Iterable[Vector], cones: Iterable[Iterable[int]], *, lattice: int | Object | None = None,
        name: str = "F") -> Object:
    """The fan with these rays whose cones are lists of ray indices, counted from 1 as in the
    language and in the JSON (``cones=[[1, 2], [2, 3], [3, 1]]``)."""
    lat_arg = lattice

    def make(src: _Source, name: str) -> None:
        vs, n = _vectors(rays, "rays")
        parts = []
        for i, c in enumerate(_sequence(cones, "cones"), 1):
            idx = _sequence(c, f"cones: cone {i}")
            for j in idx:
                if isinstance(j, bool) or not isinstance(j, Integral):
                    raise _Bad(f"cones: cone {i}: {j!r} is not a ray index (an int from 1)")
            parts.append("[" + " ".join(str(int(j)) for j in idx) + "]")
        lat = src.lattice(lat_arg, "N", n, "lattice")
        src.lines.append(f"fan {name} in {lat} {{ rays" + "".join(f" {v}" for v in vs)
                         + " cones " + " ".join(parts) + " }")
    return _build("fan", name, make)


def polytope(vertices: Iterable[Vector] | None = None, *,
             halfspaces: Iterable[tuple[Vector, Number]] | None = None,
             lattice: int | Object | None = None, name: str = "Q") -> Object:
    """The lattice polytope with these ``vertices``, or cut out by ``halfspaces`` given as
    pairs ``(u, b)`` for ⟨u, x⟩ ≥ b."""
    lat_arg = lattice

    def make(src: _Source, name: str) -> None:
        if (vertices is None) == (halfspaces is None):
            raise _Bad("give either vertices or halfspaces")
        if vertices is not None:
            vs, n = _vectors(vertices, "vertices")
            body = "vertices" + "".join(f" {v}" for v in vs)
        else:
            terms, n = [], None
            for i, h in enumerate(_sequence(halfspaces, "halfspaces"), 1):
                pair = _sequence(h, f"halfspaces: {i}")
                if len(pair) != 2:
                    raise _Bad(f"halfspaces: {i}: a halfspace is a pair (u, b) for <u, x> >= b")
                u, k = _vector(pair[0], f"halfspaces: {i}")
                if n is not None and k != n:
                    raise _Bad(f"halfspaces: {i}: {u} has {k} coordinates, the ones before it {n}")
                n = k
                terms.append(f"{u} >= {_number(pair[1], f'halfspaces: {i}')}")
            body = "halfspaces " + ", ".join(terms)
        lat = src.lattice(lat_arg, "N", n, "lattice")
        src.lines.append(f"polytope {name} in {lat} {{ {body} }}")
    return _build("polytope", name, make)


def characters(chars: Iterable[Vector], *, lattice: int | Object | None = None,
               name: str = "chi") -> Object:
    """The torus action on C^r by these characters (elements of the dual of ``lattice``), one
    per coordinate."""
    lat_arg = lattice

    def make(src: _Source, name: str) -> None:
        vs, n = _vectors(chars, "characters")
        lat = src.lattice(lat_arg, "T", n, "lattice")
        src.lines.append(f"characters {name} of {lat} {{" + "".join(f" {v}" for v in vs) + " }")
    return _build("characters", name, make)
