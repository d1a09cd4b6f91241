"""The editor's workspace for the language server: its ``.cone`` files, and what a change of
one file means for the files that use it.

The analysis host knows the open files and the files they use; the files that use a given
file may be anywhere in the workspace, open or not.  :class:`Workspace` keeps the list of the
workspace's ``.cone`` files (the *candidates* of :meth:`conelang.ide.host.AnalysisHost.dependents`,
rename and references): listed once when the session starts (bounded: hidden folders,
``node_modules`` and ``__pycache__`` are skipped, and at most ``max_files`` files are kept),
then kept up to date by ``workspace/didChangeWatchedFiles`` (a watcher for ``**/*.cone`` is
registered when the client can register one) and by the file operations
``didCreate``/``didDelete``/``didRename``.

When a file changes (typed into, saved, opened, closed, or changed on disk), every file that
uses it, directly or through others, gets its diagnostics checked again after the debounce.
A file that is not open is checked from its disk text; once opened, the usual path of the
open document takes over.
"""
from __future__ import annotations

import asyncio
import logging
import os
from pathlib import Path

from lsprotocol import types as T

from conelang.project import SKIPPED_FOLDERS, path_to_uri, uri_to_path

log = logging.getLogger("conelang.server")

WATCHER_ID = "conelang-cone-files"
GLOB = "**/*.cone"


def is_cone(uri: str) -> bool:
    return uri.endswith(".cone")


def list_cone_files(folder: str, limit: int) -> tuple[list[str], bool]:
    """Paths of the ``.cone`` files under ``folder`` (at most ``limit``) and whether the
    listing stopped at the limit."""
    out: list[str] = []
    for dirpath, dirnames, filenames in os.walk(folder):
        dirnames[:] = sorted(d for d in dirnames if not d.startswith(".") and d not in SKIPPED_FOLDERS)
        for fn in sorted(filenames):
            if fn.endswith(".cone"):
                if len(out) >= limit:
                    return out, True
                out.append(os.path.join(dirpath, fn))
    return out, False


class Workspace:
    def __init__(self, server, max_files: int = 3000):
        self.server = server
        self.max_files = max_files
        self.folders: list[str] = []            # folder paths
        self.files: set[str] = set()            # uris of the workspace's .cone files
        self.truncated = False
        self._pending: dict[str, asyncio.Task] = {}
        self._texts: dict[str, tuple[float, int, str]] = {}    # uri -> (mtime, size, text), for symbols

    # -- the list of files -----------------------------------------------------------------
    def scan(self, folder_uris) -> None:
        """List the ``.cone`` files of the workspace folders (replacing the previous list)."""
        self.folders = []
        for uri in folder_uris:
            path = uri_to_path(uri) if uri else None
            if path and os.path.isdir(path) and path not in self.folders:
                self.folders.append(path)
        files: set[str] = set()
        self.truncated = False
        for folder in self.folders:
            paths, cut = list_cone_files(folder, self.max_files - len(files))
            files.update(path_to_uri(p, "file:") for p in paths)
            if cut:
                self.truncated = True
                log.warning("more than %d .cone files in the workspace: the rest are not searched "
                            "for files that use a changed file", self.max_files)
                break
        self.files = files

    def candidates(self) -> list[str]:
        return sorted(self.files)

    def add(self, uri: str) -> None:
        if is_cone(uri) and (uri in self.files or len(self.files) < self.max_files):
            self.files.add(uri)

    def discard(self, uri: str) -> None:
        self.files.discard(uri)
        self._texts.pop(uri, None)

    # -- changes ---------------------------------------------------------------------------
    def changed(self, uri: str, delay: float | None = None) -> None:
        """``uri`` has a new text (typed, opened, closed, saved): check the files that use it
        again after ``delay`` (the debounce by default).  Repeated changes restart the wait."""
        if not is_cone(uri):
            return
        delay = self.server.debounce if delay is None else delay
        old = self._pending.pop(uri, None)
        if old is not None and not old.done():
            old.cancel()
        self._pending[uri] = asyncio.ensure_future(self._refresh_dependents(uri, delay))

    async def _refresh_dependents(self, uri: str, delay: float) -> None:
        try:
            if delay:
                await asyncio.sleep(delay)
            ls = self.server
            for dep in ls.host.dependents(uri, self.candidates()):
                ls.jobs.text_changed(dep, 0.0)
        except asyncio.CancelledError:
            raise
        except Exception:
            log.exception("checking the files that use %s failed", uri)
        finally:
            if self._pending.get(uri) is asyncio.current_task():
                del self._pending[uri]

    def on_disk(self, uri: str, kind: str) -> None:
        """``uri`` was created, changed or deleted on disk (``kind``: created, changed, deleted)."""
        if not is_cone(uri):
            return
        ls = self.server
        if kind == "deleted":
            self.discard(uri)
        else:
            self.add(uri)
            self._texts.pop(uri, None)
        ls.host.invalidate(uri)
        if not ls.host.is_open(uri):          # the open text wins over the disk
            if kind == "deleted":
                ls.jobs.closed(uri)
            elif uri in ls.jobs.last_full:    # diagnostics were published for it: check it again
                ls.jobs.schedule(uri, ls.debounce)
            self.changed(uri)

    def on_watched_files(self, params: T.DidChangeWatchedFilesParams) -> None:
        kinds = {T.FileChangeType.Created: "created", T.FileChangeType.Changed: "changed",
                 T.FileChangeType.Deleted: "deleted"}
        for ch in params.changes or []:
            self.on_disk(ch.uri, kinds.get(ch.type, "changed"))

    # -- registration ----------------------------------------------------------------------
    async def register_watcher(self) -> None:
        """Ask the client to report changes of ``**/*.cone`` files (when it can register a
        watcher dynamically)."""
        caps = self.server.client_capabilities
        ws = getattr(caps, "workspace", None)
        watched = getattr(ws, "did_change_watched_files", None)
        if not getattr(watched, "dynamic_registration", False):
            return
        options = T.DidChangeWatchedFilesRegistrationOptions(watchers=[T.FileSystemWatcher(glob_pattern=GLOB)])
        try:
            await self.server.client_register_capability_async(T.RegistrationParams(registrations=[
                T.Registration(id=WATCHER_ID, method=T.WORKSPACE_DID_CHANGE_WATCHED_FILES,
                               register_options=options)]))
        except Exception:
            log.warning("the client refused the file watcher: changes on disk are seen when files are saved or opened")

    def ensure_text(self, uri: str) -> None:
        """Make sure the host has the text of ``uri`` (opened documents always do; a file that
        is not open is read by the host's loader; anything else, e.g. an unsaved buffer never
        opened, through the protocol's workspace when possible)."""
        host = self.server.host
        if host.is_open(uri) or host.source(uri) is not None:
            return
        try:
            text = self.server.workspace.get_text_document(uri).source
        except Exception:
            text = ""
        host.apply_change(uri, text)

    def folder_uris(self) -> list[str]:
        """The URIs of the workspace folders (the root URI for a client without folders)."""
        roots = []
        try:
            ws = self.server.workspace
            roots = [f.uri for f in ws.folders.values()]
            if not roots and ws.root_uri:
                roots = [ws.root_uri]
        except Exception:
            pass
        return roots

    # -- texts for workspace symbols --------------------------------------------------------
    def texts(self, max_bytes: int = 1_000_000):
        """(uri, text) of the ``.cone`` files of the workspace, open documents first (their
        open text); a file on disk is read again only when its size or time changed."""
        host = self.server.host
        seen = set()
        for uri, text in host.open_files():
            if is_cone(uri):
                seen.add(uri)
                yield uri, text
        for uri in self.candidates():
            if uri in seen:
                continue
            path = uri_to_path(uri)
            if path is None:
                continue
            try:
                st = os.stat(path)
                if st.st_size > max_bytes:
                    continue
                cached = self._texts.get(uri)
                if cached and cached[0] == st.st_mtime and cached[1] == st.st_size:
                    text = cached[2]
                else:
                    text = Path(path).read_text("utf-8", errors="replace")
                    self._texts[uri] = (st.st_mtime, st.st_size, text)
            except OSError:
                continue
            yield uri, text


FILE_OPERATIONS = T.FileOperationRegistrationOptions(
    filters=[T.FileOperationFilter(pattern=T.FileOperationPattern(glob=GLOB))])
