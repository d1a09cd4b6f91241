"""Latency of `conelang serve` on a generated 300-line file (not a test: run it by hand).

    python tests/server/bench_latency.py [LINES]

Prints the time from a change to the first and to the last diagnostics published, and the time
of hover (cold and cached), completion, semantic tokens and formatting requests.
"""
from __future__ import annotations

import asyncio
import random
import statistics
import sys
import time

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


async def main(lines: int) -> None:
    text = generate(lines)
    uri = "file:///tmp/bench.cone"
    client = LanguageClient("bench", "1")
    events: list[tuple[float, int]] = []

    @client.feature(T.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)
    def on_diagnostics(params: T.PublishDiagnosticsParams):
        events.append((time.monotonic(), len(params.diagnostics)))

    await client.start_io(sys.executable, "-m", "conelang.cli", "serve")
    await client.initialize_async(T.InitializeParams(capabilities=T.ClientCapabilities()))
    client.initialized(T.InitializedParams())

    async def settle(since: float, quiet: float = 2.0):
        while True:
            await asyncio.sleep(0.05)
            after = [e for e in events if e[0] >= since]
            if after and time.monotonic() - after[-1][0] > quiet:
                return after[0][0] - since, after[-1][0] - since, after[-1][1]

    t = time.monotonic()
    client.text_document_did_open(T.DidOpenTextDocumentParams(text_document=T.TextDocumentItem(
        uri=uri, language_id="cone", version=1, text=text)))
    first, last, n = await settle(t, 4.0)
    print(f"{text.count(chr(10))} lines, {n} diagnostics")
    print(f"open:            first diagnostics {first * 1000:7.0f} ms, final {last * 1000:7.0f} ms")
    version = 1
    for label, old, new in (("edit a ray", "cone c10 in N { rays", "cone c10 in N { rays (1,1,1)"),
                            ("edit a comment", "# a comment about c7", "# a comment about c7 (edited)"),
                            ("edit a ray again", "cone c20 in N { rays", "cone c20 in N { rays (2,1,1)")):
        text = text.replace(old, new, 1)
        version += 1
        t = time.monotonic()
        client.text_document_did_change(T.DidChangeTextDocumentParams(
            text_document=T.VersionedTextDocumentIdentifier(uri=uri, version=version),
            content_changes=[T.TextDocumentContentChangeWholeDocument(text=text)]))
        first, last, n = await settle(t)
        print(f"{label:16} first diagnostics {first * 1000:7.0f} ms, final {last * 1000:7.0f} ms"
              f" (includes the {150} ms debounce)")

    doc = T.TextDocumentIdentifier(uri=uri)

    async def timed(coro):
        t = time.monotonic()
        r = await coro
        return (time.monotonic() - t) * 1000, r

    def at(needle, delta=1):
        i = text.index(needle) + delta
        return T.Position(line=text.count("\n", 0, i), character=i - text.rfind("\n", 0, i) - 1)

    for name in ("c33", "c34"):
        ms, r = await timed(client.text_document_hover_async(T.HoverParams(text_document=doc, position=at(f"cone {name} ", 5))))
        ms2, _ = await timed(client.text_document_hover_async(T.HoverParams(text_document=doc, position=at(f"cone {name} ", 5))))
        print(f"hover {name}:       cold {ms:6.0f} ms, cached {ms2:6.0f} ms ({'computing' in r.contents.value and 'still computing' or 'complete'})")
    samples = []
    for _ in range(5):
        ms, _ = await timed(client.text_document_completion_async(T.CompletionParams(text_document=doc, position=at("expect c40 ", 11))))
        samples.append(ms)
    print(f"completion:      median {statistics.median(samples):6.0f} ms")
    ms, _ = await timed(client.text_document_semantic_tokens_full_async(T.SemanticTokensParams(text_document=doc)))
    print(f"semantic tokens: {ms:6.0f} ms")
    ms, _ = await timed(client.text_document_formatting_async(T.DocumentFormattingParams(
        text_document=doc, options=T.FormattingOptions(tab_size=2, insert_spaces=True))))
    print(f"formatting:      {ms:6.0f} ms")
    await client.shutdown_async(None)
    client.exit(None)
    await client.stop()


if __name__ == "__main__":
    asyncio.run(main(int(sys.argv[1]) if len(sys.argv) > 1 else 300))
