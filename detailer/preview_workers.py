"""Worker processes that render the PNG previews of a small project's sheets.

They are started before the project is designed and get ready (ezdxf's drawing add-on,
matplotlib, the fonts and their glyphs: most of a second) while this process designs,
details and draws; the previews then cost little more than their rendering, on the other
core. Light to import: nothing heavy is imported here until a worker starts.
"""

from __future__ import annotations

__all__ = [
    "PREVIEW_MAX_STRIPS",
    "PreviewWorkers",
    "parsed_drawing",
    "start_preview_workers",
    "wants_previews",
]

import io

#: Projects of up to this many strips get PNG previews of their sheets unless told otherwise:
#: a preview costs about as much as detailing a dozen strips.
PREVIEW_MAX_STRIPS = 8
#: Sheets per layout DXF file (see :mod:`detailer.drawing_set`, which splits bigger drawings).
SHEETS_PER_FILE = 50


def wants_previews(n_strips: int, previews: bool | None) -> bool:
    """``previews`` as asked (``--previews`` / ``--no-previews``), else up to
    :data:`PREVIEW_MAX_STRIPS` strips."""
    return previews if previews is not None else n_strips <= PREVIEW_MAX_STRIPS


def start_preview_workers(n_strips: int, previews: bool | None) -> PreviewWorkers | None:
    """Preview workers for a build of ``n_strips`` strips when it will render previews into
    one drawing file, where workers are forked; else None (previews, if any, are then
    rendered by the drawing's own workers or in this process)."""
    from detailer.parallel import fork_shares_memory

    if (
        wants_previews(n_strips, previews)
        and fork_shares_memory()
        and 0 < n_strips <= SHEETS_PER_FILE
    ):
        return PreviewWorkers(1)
    return None


def _warm_previews() -> None:
    """Import the preview renderer and load its fonts and glyphs (in a fresh worker)."""
    from detailer.parallel import ignore_interrupts

    ignore_interrupts()
    import ezdxf

    from detailer.io.dxf_preview import render_png

    doc = ezdxf.new("R2013")
    psp = doc.layouts.new("Warm")
    psp.add_text("0123456789 ABC abc", height=2.5)
    render_png(doc, "Warm", dpi=10)


def _noop() -> None:
    return None


_WORKER_DOCS: dict[bytes, object] = {}  # a preview worker's parsed drawing, by its digest


def parsed_drawing(dxf_bytes: bytes):
    """The drawing of ``dxf_bytes``, parsed once per process (by its digest)."""
    import hashlib

    key = hashlib.blake2b(dxf_bytes, digest_size=16).digest()
    doc = _WORKER_DOCS.get(key)
    if doc is None:
        import ezdxf

        doc = ezdxf.read(io.StringIO(dxf_bytes.decode("utf-8")))
        _WORKER_DOCS.clear()
        _WORKER_DOCS[key] = doc
    return doc


def _render_one(dxf_bytes: bytes, name: str) -> bytes:
    from detailer.io.dxf_preview import render_png

    return render_png(parsed_drawing(dxf_bytes), name)


def _render_many(dxf_bytes: bytes, names: tuple[str, ...]) -> tuple[bytes, ...]:
    """Every sheet of ``names`` (in a warm worker). With more than one sheet and more than
    one CPU, the worker forks copies of itself, warm too, to render shares of the sheets at
    the same time; their PNG bytes come back through pipes."""
    import os
    import pickle

    groups = min(len(names), os.cpu_count() or 1)
    if groups <= 1 or not hasattr(os, "fork"):
        return tuple(_render_one(dxf_bytes, n) for n in names)
    shares = [names[k::groups] for k in range(groups)]
    parsed_drawing(dxf_bytes)  # parse once, before forking: the copies inherit the document
    children = []
    for k in range(1, groups):
        read_end, write_end = os.pipe()
        pid = os.fork()
        if pid == 0:  # the copy: render its share, send it, leave at once
            code = 1
            try:
                os.close(read_end)
                data = pickle.dumps([_render_one(dxf_bytes, n) for n in shares[k]])
                with os.fdopen(write_end, "wb") as pipe:
                    pipe.write(data)
                code = 0
            finally:
                os._exit(code)
        os.close(write_end)
        children.append((pid, read_end, k))
    results = {0: [_render_one(dxf_bytes, n) for n in shares[0]]}
    for pid, read_end, k in children:
        with os.fdopen(read_end, "rb") as pipe:
            data = pipe.read()
        _, status = os.waitpid(pid, 0)
        if status != 0 or not data:
            raise RuntimeError(f"a preview process failed (status {status})")
        results[k] = pickle.loads(data)
    out: list[bytes] = [b""] * len(names)
    for k, share in enumerate(shares):
        for j, png in enumerate(results[k]):
            out[k + j * groups] = png
    return tuple(out)


class PreviewWorkers:
    """Processes that get ready to render previews (imports, fonts) while this one designs
    and draws: the previews of a small project then cost little more than their rendering.
    Only where workers are forked (elsewhere :func:`draw` renders in this process)."""

    def __init__(self, workers: int) -> None:
        from concurrent.futures import ProcessPoolExecutor

        from detailer.parallel import _mp_context

        self._pool = ProcessPoolExecutor(
            max_workers=workers, mp_context=_mp_context(), initializer=_warm_previews
        )
        for _ in range(workers):  # start them now: a pool starts workers on demand
            self._pool.submit(_noop)

    def render(self, dxf_bytes: bytes, names: tuple[str, ...]) -> tuple[bytes, ...]:
        return self._pool.submit(_render_many, dxf_bytes, names).result()

    def close(self) -> None:
        self._pool.shutdown(wait=True, cancel_futures=True)
