"""Latency of `conelang serve` (not a test: run it by hand).

    python benchmarks/bench_server.py               # the magic squares, then a generated 300-line file
    python benchmarks/bench_server.py magic         # only the magic squares
    python benchmarks/bench_server.py generated [LINES]

*The magic squares*: the 5×5 magic-square cone (a double description of about a second) is open
and its statement edited once a second; meanwhile completion and hover are asked on other lines
every 50 ms.  Printed: how long the server's event loop was blocked (p50/p99/max, measured in the
server by its loop monitor; goal p99 <= 20 ms) and the request latencies, next to today's
figures measured in the same run: the server of the commit before the loop stopped evaluating
(``git archive`` into a temporary folder, run the same way) and the loop work that server did
after each edit (the cheap diagnostics, evaluated in-process), with ratios.

*A generated file*: the time from a change to the first and to the last diagnostics published,
and the time of hover (cold and cached), completion, semantic tokens and formatting requests.
"""
from __future__ import annotations

import asyncio
import os
import random
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from lsprotocol import types as T
from pygls.lsp.client import LanguageClient


def generate(lines: int = 300, seed: int = 1) -> str:
    rnd = random.Random(seed)
    out = ["# generated benchmark file", "lattice N = Z^3", "lattice P = Z^2", ""]
    i = 0
    while len(out) < lines - 3:
        i += 1
        rays = set()
        while len(rays) < rnd.randint(3, 4):
            rays.add((rnd.randint(-1, 2), rnd.randint(-1, 2), 1))    # cones over lattice polygons
        out.append(f"cone c{i} in N {{ rays " + " ".join(f"({a},{b},{c})" for a, b, c in sorted(rays)) + " }")
        out.append(f"expect c{i} pointed")
        out.append(f"expect c{i} dim = 3")
        if i % 3 == 0:
            out.append(f"cone d{i} = dual c{i}")
        if i % 5 == 0:
            out.append(f"expect c{i} generators = {rnd.randint(3, 9)}")
        if i % 7 == 0:
            out.append(f"# a comment about c{i}")
    out.append("map f : N -> P { rows (1,0,0) (0,1,0) }")
    out.append("cone q in P { rays (1,0) (0,1) }")
    return "\n".join(out) + "\n"


def percentile(xs, q):
    xs = sorted(xs)
    return xs[min(len(xs) - 1, int(round(q * (len(xs) - 1))))]


def in_process_baseline(text: str, edits: list[str]) -> list[float]:
    """The same edits analysed in this process, without the protocol: the baseline."""
    from conelang.ide import AnalysisHost
    host = AnalysisHost()
    host.apply_change("b", text)
    host.diagnostics("b")
    out = []
    for t in edits:
        host.apply_change("b", t)
        t0 = time.perf_counter()
        host.diagnostics("b")
        out.append((time.perf_counter() - t0) * 1000)
    return out


# a heavy Hilbert basis (about ten seconds): the dual of a simplicial cone of index 37, whose
# parallelepiped has 37^4 points; its double description is trivial
HEAVY = ("lattice H = Z^5\ncone heavy in H { rays (1,0,0,0,0) (0,1,0,0,0) (0,0,1,0,0) (0,0,0,1,0) "
         "(3,5,7,11,37) }\n")
DEBOUNCE_MS = 150


async def main(lines: int) -> None:
    text = generate(lines)
    uri = "file:///tmp/bench.cone"
    client = LanguageClient("bench", "1")
    events: list[tuple[float, int]] = []

    @client.feature(T.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
    def on_diagnostics(params: T.PublishDiagnosticsParams):
        if params.uri == uri:
            events.append((time.monotonic(), len(params.diagnostics)))

    await client.start_io(sys.executable, "-m", "conelang.cli", "serve")
    await client.initialize_async(T.InitializeParams(capabilities=T.ClientCapabilities()))
    client.initialized(T.InitializedParams())

    async def settle(since: float, quiet: float = 1.0):
        while True:
            await asyncio.sleep(0.01)
            after = [e for e in events if e[0] >= since]
            if after and time.monotonic() - after[-1][0] > quiet:
                return after[0][0] - since, after[-1][0] - since, after[-1][1]

    t = time.monotonic()
    client.text_document_did_open(T.DidOpenTextDocumentParams(text_document=T.TextDocumentItem(
        uri=uri, language_id="cone", version=1, text=text)))
    first, last, n = await settle(t, 3.0)
    print(f"{text.count(chr(10))} lines, {n} diagnostics; open: first diagnostics {first * 1000:.0f} ms, "
          f"final {last * 1000:.0f} ms")

    # 20 edits of one ray each (warm caches: every other cone is unchanged)
    edits, version, firsts, lasts = [], 1, [], []
    for k in range(20):
        i = 3 + 3 * k
        text = text.replace(f"cone c{i} in N {{ rays ", f"cone c{i} in N {{ rays (1,{k % 3},1) ", 1)
        edits.append(text)
        version += 1
        t = time.monotonic()
        client.text_document_did_change(T.DidChangeTextDocumentParams(
            text_document=T.VersionedTextDocumentIdentifier(uri=uri, version=version),
            content_changes=[T.TextDocumentContentChangeWholeDocument(text=text)]))
        first, last, n = await settle(t, 0.4)
        firsts.append(first * 1000 - DEBOUNCE_MS)
        lasts.append(last * 1000 - DEBOUNCE_MS)
    base = in_process_baseline(generate(lines), edits)
    p95, b95 = percentile(firsts, 0.95), percentile(base, 0.95)
    print(f"diagnostics after an edit (minus the {DEBOUNCE_MS} ms debounce): p50 {percentile(firsts, .5):.0f} ms, "
          f"p95 {p95:.0f} ms (goal <= 50 ms); in-process analysis p95 {b95:.0f} ms; ratio {p95 / b95:.1f}x")
    print(f"  detail: first diagnostics max {max(firsts):.0f} ms; final diagnostics p50 {percentile(lasts, .5):.0f} ms, "
          f"p95 {percentile(lasts, .95):.0f} ms, max {max(lasts):.0f} ms; in-process p50 {percentile(base, .5):.0f} ms")

    doc = T.TextDocumentIdentifier(uri=uri)

    async def timed(coro):
        t = time.monotonic()
        r = await coro
        return (time.monotonic() - t) * 1000, r

    def at(needle, delta=1):
        i = text.index(needle) + delta
        return T.Position(line=text.count("\n", 0, i), character=i - text.rfind("\n", 0, i) - 1)

    hovers = []
    for k in range(1, 41):
        name = f"c{k}"
        if f"cone {name} " not in text:
            continue
        await timed(client.text_document_hover_async(T.HoverParams(text_document=doc, position=at(f"cone {name} ", 5))))
        ms, _ = await timed(client.text_document_hover_async(T.HoverParams(text_document=doc, position=at(f"cone {name} ", 5))))
        hovers.append(ms)
    print(f"hover (warm): p50 {percentile(hovers, .5):.0f} ms, p95 {percentile(hovers, .95):.0f} ms (goal <= 20 ms)")

    # responsiveness while a heavy computation runs in the worker.  One completion answer first,
    # on the other file: the client builds its deserialiser for completion answers then, which
    # would otherwise be counted as server latency.
    await client.text_document_completion_async(T.CompletionParams(text_document=doc, position=at("expect c40 ", 11)))
    heavy_uri = "file:///tmp/heavy.cone"
    client.text_document_did_open(T.DidOpenTextDocumentParams(text_document=T.TextDocumentItem(
        uri=heavy_uri, language_id="cone", version=1, text=HEAVY + "expect heavy generators = 1\n")))
    hdoc = T.TextDocumentIdentifier(uri=heavy_uri)
    lat, when = [], []
    t_open = time.monotonic()
    t_end = t_open + 3.0
    while time.monotonic() < t_end:
        sent = time.monotonic()
        ms, _ = await timed(client.text_document_completion_async(T.CompletionParams(
            text_document=hdoc, position=T.Position(line=2, character=0))))
        lat.append(ms)
        when.append((sent - t_open) * 1000)
        await asyncio.sleep(0.02)
    print(f"completion while a heavy cone is computed: max {max(lat):.0f} ms over {len(lat)} requests "
          f"(goal: the event loop never blocked > 50 ms)")
    worst = sorted(range(len(lat)), key=lambda i: -lat[i])[:3]
    print(f"  detail: p50 {percentile(lat, .5):.0f} ms, p95 {percentile(lat, .95):.0f} ms, "
          f"max after the first request {max(lat[1:]):.0f} ms; slowest sent at "
          + ", ".join(f"{when[i]:.0f} ms after the open ({lat[i]:.0f} ms)" for i in worst))
    samples = []
    for _ in range(5):
        ms, _ = await timed(client.text_document_completion_async(T.CompletionParams(text_document=doc, position=at("expect c40 ", 11))))
        samples.append(ms)
    print(f"completion: median {statistics.median(samples):.0f} ms")
    ms, _ = await timed(client.text_document_semantic_tokens_full_async(T.SemanticTokensParams(text_document=doc)))
    print(f"semantic tokens: {ms:.0f} ms")
    ms, _ = await timed(client.text_document_formatting_async(T.DocumentFormattingParams(
        text_document=doc, options=T.FormattingOptions(tab_size=2, insert_spaces=True))))
    print(f"formatting: {ms:.0f} ms")
    await client.shutdown_async(None)
    client.exit(None)
    await client.stop()


# ---- the magic squares ---------------------------------------------------------------------------
ROOT = Path(__file__).resolve().parent.parent
SERVE = [sys.executable, "-m", "conelang.cli", "serve"]
EDITS = 10


def _vec(v) -> str:
    return "(" + ",".join(map(str, v)) + ")"


def magic_text(extra: int = 0) -> str:
    """The 5×5 magic squares (entries >= 0, every row, column and diagonal with the sum of the
    first row), with the redundant halfspace x1 + extra·x2 >= 0 when ``extra`` (a new double
    description each time), and small cones below it.  The expectation on the generators, as
    "Pin the current results" writes it, keeps the worker busy for many seconds (the Hilbert
    basis of the dual cone): a new edit cancels it."""
    n = 5
    lines = [[i * n + j for j in range(n)] for i in range(n)] + [[i * n + j for i in range(n)] for j in range(n)]
    lines += [[i * n + i for i in range(n)], [i * n + n - 1 - i for i in range(n)]]
    eqs = [tuple((k in lines[0]) - (k in line) for k in range(n * n)) for line in lines[1:]]
    ineqs = [tuple(int(k == m) for k in range(n * n)) for m in range(n * n)]
    if extra:
        ineqs.append(tuple([1, extra] + [0] * (n * n - 2)))
    return (f"lattice M = Z^25\ncone magic in M {{ halfspaces {' '.join(map(_vec, ineqs))} "
            f"equations {' '.join(map(_vec, eqs))} }}\nexpect magic dim = 15\nexpect magic generators = 87\n"
            "lattice N = Z^3\ncone w in N { rays (1,0,0) (0,1,0) (1,1,4) }\nexpect w simplicial\n"
            "cone d = dual w\nexpect ")


def old_loop_work(texts: list[str]) -> list[float]:
    """What the previous server's event loop computed after each edit of the magic squares (the
    worker took longer than diagnosticsWait, so the loop made the cheap diagnostics: every value,
    the double description included), measured in this process (ms)."""
    from conelang.ide import AnalysisHost
    host = AnalysisHost()
    out = []
    for t in texts:
        host.apply_change("mem://magic.cone", t)
        t0 = time.perf_counter()
        host.diagnostics("mem://magic.cone", expectations=False)
        out.append((time.perf_counter() - t0) * 1000)
    return out


def previous_server(tmp: str) -> tuple[list[str], dict] | None:
    """The command and environment of the server of the commit before the one that moved every
    value into the worker (or of HEAD, before that commit is made), unpacked with git archive."""
    try:
        rev = subprocess.run(["git", "rev-list", "-1", "HEAD", "--", "server/scheduling.py"], cwd=ROOT,
                             capture_output=True, text=True, check=True).stdout.strip()
        base = f"{rev}^" if rev else "HEAD"
        archive = subprocess.run(["git", "archive", base, "conelang", "server", "grammar"], cwd=ROOT,
                                 capture_output=True, check=True).stdout
        subprocess.run(["tar", "-x", "-C", tmp], input=archive, check=True)
    except (OSError, subprocess.CalledProcessError) as exc:
        print(f"  (no baseline server: {exc})")
        return None
    return SERVE, {**os.environ, "PYTHONPATH": tmp}


async def magic_session(command: list[str], env: dict | None, monitor: bool) -> dict:
    """Edit the magic squares once a second while completion and hover are asked every 50 ms."""
    uri = "file:///tmp/bench-magic.cone"
    client = LanguageClient("bench", "1")
    published: list[float] = []

    @client.feature(T.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
    def on_diagnostics(params: T.PublishDiagnosticsParams):
        if params.uri == uri:
            published.append(time.monotonic())

    await client.start_io(*command, env=env)
    await client.initialize_async(T.InitializeParams(capabilities=T.ClientCapabilities(),
                                                     initialization_options={"monitorLoop": monitor}))
    client.initialized(T.InitializedParams())
    text = magic_text()
    doc = T.TextDocumentIdentifier(uri=uri)
    lines = text.split("\n")
    at_w = T.Position(line=5, character=lines[5].index("w"))
    at_end = T.Position(line=len(lines) - 1, character=len(lines[-1]))
    await client.text_document_completion_async(T.CompletionParams(text_document=doc, position=at_end))
    client.text_document_did_open(T.DidOpenTextDocumentParams(text_document=T.TextDocumentItem(
        uri=uri, language_id="cone", version=1, text=text)))
    t0 = time.monotonic()
    await client.text_document_completion_async(T.CompletionParams(text_document=doc, position=at_end))
    at_open = (time.monotonic() - t0) * 1000
    while not published:
        await asyncio.sleep(0.05)
    for _ in range(3):   # the client builds its deserialisers of these answers here, not in the timing
        await client.text_document_completion_async(T.CompletionParams(text_document=doc, position=at_end))
        await client.text_document_hover_async(T.HoverParams(text_document=doc, position=at_w))
    if monitor:
        await client.workspace_execute_command_async(T.ExecuteCommandParams(command="conelang.serverStats",
                                                                            arguments=["reset"]))
    completion, hover, texts = [], [], []
    start = time.monotonic()
    for k in range(1, EDITS + 1):
        text = magic_text(k)
        texts.append(text)
        client.text_document_did_change(T.DidChangeTextDocumentParams(
            text_document=T.VersionedTextDocumentIdentifier(uri=uri, version=k + 1),
            content_changes=[T.TextDocumentContentChangeWholeDocument(text=text)]))
        while time.monotonic() < start + k:
            t0 = time.monotonic()
            await client.text_document_completion_async(T.CompletionParams(text_document=doc, position=at_end))
            completion.append((time.monotonic() - t0) * 1000)
            t0 = time.monotonic()
            await client.text_document_hover_async(T.HoverParams(text_document=doc, position=at_w))
            hover.append((time.monotonic() - t0) * 1000)
            await asyncio.sleep(0.05)
    stats = None
    if monitor:
        stats = await client.workspace_execute_command_async(T.ExecuteCommandParams(command="conelang.serverStats"))
    await client.shutdown_async(None)
    client.exit(None)
    await client.stop()
    return {"completion": completion, "hover": hover, "stats": stats, "texts": texts, "open": at_open}


def _row(name: str, xs: list[float]) -> str:
    return f"p50 {percentile(xs, .5):6.1f} ms  p99 {percentile(xs, .99):6.1f} ms  max {max(xs):6.1f} ms"


async def magic() -> None:
    print("the 5×5 magic squares open, their statement edited once a second; completion and hover on other lines")
    now = await magic_session(SERVE, None, monitor=True)
    loop = now["stats"]["loop"]
    print(f"  event loop blocked (server's monitor, {loop['samples']} samples): p50 {loop['p50_ms']:.1f} ms, "
          f"p99 {loop['p99_ms']:.1f} ms (goal <= 20 ms), max {loop['max_ms']:.1f} ms; "
          f"values computed on the loop: {now['stats']['geometry_on_loop']}")
    old = old_loop_work(now["texts"])
    print(f"  before: the loop's own work after each edit (evaluated in-process): {_row('', old)}")
    print(f"    ratio of the worst block, before / now: {max(old) / max(loop['max_ms'], 0.1):.0f}x")
    with tempfile.TemporaryDirectory() as tmp:
        prev = previous_server(tmp)
        before = await magic_session(*prev, monitor=False) if prev else None
    print(f"  completion sent right after the open: now {now['open']:.0f} ms"
          + (f", before {before['open']:.0f} ms; ratio {before['open'] / now['open']:.0f}x" if before else ""))
    for kind in ("completion", "hover"):
        print(f"  {kind:10s} now:    {_row(kind, now[kind])}  ({len(now[kind])} requests)")
        if before:
            b = before[kind]
            print(f"  {kind:10s} before: {_row(kind, b)}  ({len(b)} requests); "
                  f"ratio p99 {percentile(b, .99) / percentile(now[kind], .99):.1f}x, "
                  f"max {max(b) / max(now[kind]):.1f}x")


if __name__ == "__main__":
    args = sys.argv[1:]
    if not args or args[0] == "magic":
        asyncio.run(magic())
    if not args or args[0] == "generated":
        asyncio.run(main(int(args[1]) if len(args) > 1 else 300))
