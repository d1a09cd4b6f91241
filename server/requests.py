"""The answers that need values, asked of the worker and awaited on the event loop.

A hover sends three interactive jobs, run in this order: the *quick* hover (values, no heavy
facts; plus what the full one still computes), the *partial* one (the facts without the
binomial equations) and the full one.  It waits ``hover_wait`` seconds for the full answer, then
shows the best answer there is with a "computing…" line; with none (the worker is restarting,
say) it says what the name is, from the names alone.  Inlay hints wait the same time for the
full hints, then use the quick ones, or the previous hints of unchanged statements; the client
is asked to refresh when the full ones arrive.  Quick fixes and pinned results wait for their
job.
"""
from __future__ import annotations

import asyncio
import logging

from .worker import JobCancelled, WorkerFailed

log = logging.getLogger("conelang.server")

QUICK_WAIT = 1.0     # seconds a hover waits at most for the quick answer, counted from the request


def _result(fut):
    """The result of a finished future that did not fail, else None."""
    if fut.done() and not fut.cancelled() and fut.exception() is None:
        return fut.result()
    return None


async def _within(fut, seconds: float):
    """The result of ``fut`` if it comes within ``seconds`` (else None); failures are raised."""
    try:
        return await asyncio.wait_for(asyncio.shield(fut), max(0.0, seconds))
    except asyncio.TimeoutError:
        return None


async def hover(ls, uri: str, offset: int):
    """(markdown, span) of the hover at ``offset``, or None."""
    jobs = ls.jobs
    key = jobs.state_key(uri)
    cached = jobs.remembered(("hover", key, offset))
    if cached is not None:
        return cached[0]
    start = asyncio.get_running_loop().time()
    _, full = jobs.submit("hover", uri, offset, interactive=True)
    _, partial = jobs.submit("hover_partial", uri, offset, interactive=True)
    _, quick = jobs.submit("hover_quick", uri, offset, interactive=True)
    note = None
    try:
        got = await _within(full, ls.hover_wait)
        if full.done():
            jobs.remember(("hover", key, offset), (got,))
            return got
        spent = asyncio.get_running_loop().time() - start
        light = await _within(quick, QUICK_WAIT - spent)
    except JobCancelled:
        light, note = _result(quick), "the computation was interrupted by an edit; hover again"
    except WorkerFailed as exc:
        light, note = _result(quick), f"not computed: {exc}"
    if light is None:
        return _from_names(ls, uri, offset, note) if not quick.done() or note else None
    md, span, pending = light
    if pending is None:
        return md, span
    more = _result(partial)
    if note is None and more is not None:
        return more + "\n\n*computing… (the binomial equations)*", span
    return md + f"\n\n*{note or f'computing… ({pending})'}*", span


def _from_names(ls, uri: str, offset: int, note: str | None):
    """What the loop can say about the name under ``offset`` without any value."""
    hit = ls.host.name_at(uri, offset)
    if hit is None:
        return None
    name, kind, span = hit
    return f"`{name}`: {kind or 'unknown name'}\n\n*{note or 'computing…'}*", span


async def inlay_hints(ls, uri: str) -> list[tuple[int, str]]:
    jobs = ls.jobs
    key = jobs.state_key(uri)
    hints = jobs.remembered(("inlay", key))
    if hints is not None:
        return hints
    _, quick = jobs.submit("inlay_quick", uri)
    _, full = jobs.submit("inlay", uri)
    try:
        hints = await _within(full, ls.hover_wait)
    except (JobCancelled, WorkerFailed):
        hints = None
    if hints is not None:
        jobs.remember(("inlay", key), hints)
        jobs.last_inlay[uri] = (hints, ls.host.statement_sources(uri))
        return hints
    if ls.supports_inlay_refresh():
        full.add_done_callback(lambda f: _refresh_inlays(ls, f))
    return _result(quick) or jobs.moved_inlays(uri)


def _refresh_inlays(ls, fut) -> None:
    try:
        if not fut.cancelled() and fut.exception() is None:
            ls.workspace_inlay_hint_refresh(None)
    except Exception:
        log.exception("inlay hint refresh failed")


async def quick_fixes(ls, uri: str, start: int, end: int) -> list:
    """The quick fixes of the diagnostics touching ``[start, end]`` (they need the values)."""
    _, fut = ls.jobs.submit("fixes", uri, start, end, interactive=True)
    try:
        return await asyncio.shield(fut)
    except (JobCancelled, WorkerFailed):
        return []


async def pin_edit(ls, uri: str, name: str):
    """The edit of 'pin the current results of ``name``' (computed in the worker), or None."""
    jobs = ls.jobs
    for _ in range(3):                      # the text may change while it is computed
        key, fut = jobs.submit("pin", uri, name, interactive=True)
        try:
            edit = await asyncio.shield(fut)
        except JobCancelled:
            continue
        except WorkerFailed:
            return None
        if jobs.state_key(uri) == key:
            return edit
    return None
