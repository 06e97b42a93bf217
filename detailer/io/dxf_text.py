"""The DXF text of a large drawing, written by several processes at once.

ezdxf writes a document section by section, entity by entity; for a floor of hundreds of
sheets the BLOCKS section (every sheet but the first, every dimension's block) and the
ENTITIES section (model space) are nearly all of it, and each entity's text depends on that
entity alone. So the document is made ready for writing once, here, exactly as
``Drawing.write`` does; the block definitions and model-space entities are then shared out, in
order, over forked workers (which see the finished document without copying it), each
writing its share as text; the shares are joined in order between the header, classes and
tables before and the objects after. The bytes are the same as ``Drawing.write`` gives (a
test compares them); where workers are not forked, this is ``Drawing.write``.
"""

from __future__ import annotations

__all__ = ["document_text"]

import io

from ezdxf.document import Drawing
from ezdxf.lldxf.tagwriter import TagWriter

from detailer.parallel import fork_shares_memory, map_indexed

#: Below this many DXF objects one process writes faster than several.
PARALLEL_FROM_OBJECTS = 20000


def _writer(stream: io.StringIO, doc: Drawing) -> TagWriter:
    return TagWriter(stream, write_handles=True, dxfversion=doc.dxfversion)


def _share(context: tuple, index: int) -> str:
    doc, shares = context
    stream = io.StringIO()
    tw = _writer(stream, doc)
    kind, items = shares[index]
    for item in items:
        if kind == "block":
            item.export_block_definition(tw)
        else:
            item.export_dxf(tw)
    return stream.getvalue()


def _split(items: list, parts: int) -> list[list]:
    size = -(-len(items) // parts) if items else 0
    return [items[k : k + size] for k in range(0, len(items), size)] if size else []


def document_text(doc: Drawing, workers: int = 0) -> str:
    """The DXF text of ``doc`` (as ``Drawing.write`` writes it), over ``workers`` processes."""
    if workers < 2 or not fork_shares_memory() or len(doc.entitydb) < PARALLEL_FROM_OBJECTS:
        stream = io.StringIO()
        doc.write(stream)
        return stream.getvalue()
    # Drawing.write, up to the export of the sections:
    doc.commit_pending_changes()
    doc.classes.add_required_classes(doc.dxfversion)
    doc.update_all()
    records = list(doc.blocks.block_records)
    for record in records:  # done while writing a block; done here, once, for all
        if record.block_layout is not None:
            record.block_layout.update_block_flags()
    layouts = doc.layouts
    entities = list(layouts.modelspace().entity_space)
    entities += list(layouts.active_layout().entity_space)
    parts = 2 * workers  # a little finer than the workers, for balance
    shares = [("block", s) for s in _split(records, parts)]
    shares += [("entity", s) for s in _split(entities, parts)]
    texts = map_indexed(_share, (doc, shares), len(shares), workers=workers)
    n_blocks = len(shares) - len(_split(entities, parts))

    head = io.StringIO()
    tw = _writer(head, doc)
    doc.header.export_dxf(tw)
    doc.classes.export_dxf(tw)
    doc.tables.export_dxf(tw)
    tw.write_str("  0\nSECTION\n  2\nBLOCKS\n")
    tail = io.StringIO()
    tw = _writer(tail, doc)
    tw.write_tag2(0, "ENDSEC")
    tw.write_str("  0\nSECTION\n  2\nENTITIES\n")
    middle = tail.getvalue()
    end = io.StringIO()
    tw = _writer(end, doc)
    tw.write_tag2(0, "ENDSEC")
    doc.objects.export_dxf(tw)
    if doc.acdsdata.is_valid:
        doc.acdsdata.export_dxf(tw)
    for section in doc.stored_sections:
        section.export_dxf(tw)
    tw.write_tag2(0, "EOF")
    return "".join([head.getvalue(), *texts[:n_blocks], middle, *texts[n_blocks:], end.getvalue()])
