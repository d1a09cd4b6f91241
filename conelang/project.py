"""Files on disk for ``use`` statements: where a path points, the project root, reading.

The analysis host does no I/O; it asks a loader.  :class:`FileLoader` is the one the command
line, batch, the Python API and the language server use.

A ``use "path"`` is relative to the folder of the file it is written in.  It may not leave
the *project root* of that file: the nearest folder above it holding ``.git`` or a
``conelang.toml`` marker (when there is none, the file's own folder), unless the loader is
made with ``allow_outside_root=True`` (``--allow-outside-root`` on the command line).  Nothing
is read but the files that ``use`` statements name.

Files are named by URIs: ``file://`` URIs (the editor's) give ``file://`` URIs, plain paths
(the command line's) give plain paths, so messages name files as the user wrote them.

>>> import tempfile, pathlib
>>> d = pathlib.Path(tempfile.mkdtemp()); (d / "conelang.toml").write_text("")
0
>>> (d / "sub").mkdir(); loader = FileLoader()
>>> loader.locate(str(d / "sub" / "a.cone"), "../b.cone") == str(d / "b.cone")
True
>>> loader.locate(str(d / "sub" / "a.cone"), "../../c.cone").code
'import-outside-root'
"""
from __future__ import annotations

import os
import stat
from urllib.parse import unquote, urlparse
from urllib.request import pathname2url

from .semantics.imports import ImportFailure

MARKERS = (".git", "conelang.toml")
SKIPPED_FOLDERS = ("node_modules", "__pycache__")


def uri_to_path(uri: str) -> str | None:
    """The file system path of ``uri`` (a ``file://`` URI or a plain path), None for other
    schemes (an unsaved editor buffer, ``mem://``).

    >>> uri_to_path("file:///tmp/a%20b.cone"), uri_to_path("x/a.cone"), uri_to_path("untitled:1")
    ('/tmp/a b.cone', 'x/a.cone', None)
    """
    if uri.startswith("file:"):
        return unquote(urlparse(uri).path)
    if "://" in uri or (":" in uri and not os.path.splitdrive(uri)[0]):
        return None
    return uri


def path_to_uri(path: str, like: str) -> str:
    """``path`` named the way ``like`` is (a ``file://`` URI or a plain path)."""
    if like.startswith("file:"):
        return "file://" + pathname2url(os.path.abspath(path))
    return path


class FileLoader:
    def __init__(self, allow_outside_root: bool = False, markers: tuple[str, ...] = MARKERS):
        self.allow_outside_root = allow_outside_root
        self.markers = markers
        self._roots: dict[str, str] = {}

    def project_root(self, path: str) -> str:
        """The project root of the file ``path`` (see the module docstring)."""
        start = os.path.dirname(os.path.realpath(path))
        hit = self._roots.get(start)
        if hit is not None:
            return hit
        d = start
        while True:
            if any(os.path.exists(os.path.join(d, m)) for m in self.markers):
                break
            parent = os.path.dirname(d)
            if parent == d:
                d = start
                break
            d = parent
        self._roots[start] = d
        return d

    def locate(self, importer_uri: str, path: str):
        """The URI that ``use "path"`` in ``importer_uri`` names, or an :class:`ImportFailure`."""
        base = uri_to_path(importer_uri)
        if base is None:
            return ImportFailure("import-not-found",
                                 f"cannot read \"{path}\": this file is not saved, and a path is relative "
                                 f"to the folder of the file it is written in")
        if not path.strip():
            return ImportFailure("import-not-found", "the path is empty; write the file to use, e.g. use \"shared.cone\"")
        target = os.path.normpath(os.path.join(os.path.dirname(base), path))
        if not self.allow_outside_root:
            root = self.project_root(base)
            real = os.path.realpath(target)
            if os.path.commonpath([root, real]) != root:
                return ImportFailure("import-outside-root",
                                     f"\"{path}\" is outside the project root (the nearest folder above "
                                     f"this file with .git or conelang.toml); move the file into the project, "
                                     f"or allow it with --allow-outside-root")
        return path_to_uri(target, importer_uri)

    def cone_paths(self, importer_uri: str, prefix: str, limit: int = 500) -> list[str]:
        """What may follow ``prefix`` inside the quotes of a ``use`` statement in
        ``importer_uri``: paths (``prefix``'s folder part kept) of the ``.cone`` files and of
        the folders (ending with ``/``) in the folder ``prefix`` points into, never outside the
        project root unless allowed; ``../`` when the parent folder is allowed.  Hidden folders,
        ``node_modules`` and ``__pycache__`` are left out, and so is the importing file.

        >>> import tempfile, pathlib
        >>> d = pathlib.Path(tempfile.mkdtemp()); (d / "conelang.toml").write_text("")
        0
        >>> (d / "sub").mkdir(); (d / "sub" / "b.cone").write_text(""); (d / "a.cone").write_text("")
        0
        0
        >>> FileLoader().cone_paths(str(d / "a.cone"), ""), FileLoader().cone_paths(str(d / "a.cone"), "sub/")
        (['sub/'], ['sub/b.cone'])
        >>> FileLoader().cone_paths(str(d / "sub" / "b.cone"), "")
        ['../']
        """
        base = uri_to_path(importer_uri)
        if base is None:
            return []
        head = prefix[:prefix.rfind("/") + 1]
        here = os.path.dirname(os.path.abspath(base))
        folder = os.path.normpath(os.path.join(here, head))
        root = None if self.allow_outside_root else self.project_root(base)

        def allowed(p: str) -> bool:
            return root is None or os.path.commonpath([root, os.path.realpath(p)]) == root

        if not allowed(folder) or not os.path.isdir(folder):
            return []
        out = []
        if all(part == ".." for part in head.split("/")[:-1]) and allowed(os.path.dirname(folder)):
            out.append(head + "../")
        try:
            entries = sorted(os.scandir(folder), key=lambda e: e.name)
        except OSError:
            return out
        me = os.path.realpath(base)
        for e in entries:
            if len(out) >= limit:
                break
            try:
                if e.is_dir():
                    if not e.name.startswith(".") and e.name not in SKIPPED_FOLDERS and allowed(e.path):
                        out.append(head + e.name + "/")
                elif e.name.endswith(".cone") and allowed(e.path) and os.path.realpath(e.path) != me:
                    out.append(head + e.name)
            except OSError:
                continue
        return out

    def load(self, uri: str, path: str):
        """The text of ``uri`` (written ``path`` in a use statement), or an :class:`ImportFailure`."""
        try:
            return self.read(uri)
        except (OSError, UnicodeDecodeError) as exc:
            return read_failure(path, exc)

    def read(self, uri: str) -> str:
        """The text of ``uri``; raises ``OSError`` or ``UnicodeDecodeError``."""
        path = uri_to_path(uri)
        if path is None:
            raise FileNotFoundError(uri)
        # non-blocking: opening a pipe for reading must not wait for a writer
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
        with open(fd, "rb") as f:
            info = os.fstat(f.fileno())
            if stat.S_ISDIR(info.st_mode):
                raise IsADirectoryError(path)
            if not stat.S_ISREG(info.st_mode):       # a device or a pipe could be endless
                raise NotAFile(path)
            if info.st_size > MAX_BYTES:
                raise FileTooLarge(path)
            return f.read(MAX_BYTES + 1).decode("utf-8")


MAX_BYTES = 16 * 2 ** 20        # a .cone file that another file uses is at most 16 MiB


class NotAFile(OSError):
    """A path that names a device, a pipe or a socket, not a file."""


class FileTooLarge(OSError):
    """A file larger than :data:`MAX_BYTES`."""


def read_failure(path: str, exc: BaseException) -> ImportFailure:
    """The diagnostic for a file that cannot be read."""
    if isinstance(exc, UnicodeDecodeError):
        why = f"it is not UTF-8 text ({exc.reason} at byte {exc.start})"
    elif isinstance(exc, FileNotFoundError):
        why = "there is no such file"
    elif isinstance(exc, IsADirectoryError):
        why = "it is a folder"
    elif isinstance(exc, NotAFile):
        why = "it is not a regular file (a device, pipe or socket)"
    elif isinstance(exc, FileTooLarge):
        why = f"it is larger than {MAX_BYTES // 2 ** 20} MiB"
    else:
        why = getattr(exc, "strerror", None) or type(exc).__name__
    return ImportFailure("import-not-found", f"cannot read \"{path}\": {why}")
