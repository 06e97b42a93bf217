"""Small HTML building blocks of the report: escaping, keyed cells, tables, numbers.

Numbers that are in the record are printed from the record's JSON-ready form
(:func:`detailer.record.record_to_jsonable`), so they carry exactly the record's rounding
(lengths to 0.1 mm, areas to 0.1 mm2/m, kN and kNm to 0.001, other numbers to 0.0001) and
the same text as the JSON file. A cell holding such a number has a ``data-key`` naming where
it sits in the record (e.g. ``S1/zones/C-T/as_req_mm2_per_m``).
"""

from __future__ import annotations

__all__ = ["Cell", "Json", "c", "clause", "esc", "k", "num", "raw", "table", "tag"]

import functools
import html
import re
from collections.abc import Iterable, Sequence
from typing import Any

#: A record object in its JSON-ready form (see :func:`detailer.record.record_to_jsonable`).
Json = dict[str, Any]


_SPECIAL = re.compile("[&<>\"']")


def esc(text: object) -> str:
    """``text`` escaped for HTML text and attribute values (most need nothing: checked first)."""
    s = text if isinstance(text, str) else str(text)
    return html.escape(s, quote=True) if _SPECIAL.search(s) else s


def num(value: object) -> str:
    """A record number as the record's JSON writes it (``None``, an infinite value, as ∞)."""
    if value is None:
        return "∞"
    if isinstance(value, bool):
        return "yes" if value else "no"
    return str(value)


def tag(name: str, content: str = "", **attrs: object) -> str:
    """``<name attrs>content</name>``; ``cls`` gives ``class``, ``data_x`` gives ``data-x``."""
    if not attrs:
        return f"<{name}>{content}</{name}>"
    parts = [name]
    for key, value in attrs.items():
        if value is None or value is False:
            continue
        attr = "class" if key == "cls" else key.replace("_", "-")
        parts.append(attr if value is True else f'{attr}="{esc(value)}"')
    return f"<{' '.join(parts)}>{content}</{name}>"


#: Tables of at most this many rows are kept on one printed page.
KEEP_TOGETHER_ROWS = 14


#: One table cell: its finished ``<td>`` markup (``data-key``: where its value sits in the
#: record). Cells are strings so that a table of many rows is a few joins.
Cell = str


def _td(markup: str, key: str = "", cls: str = "") -> Cell:
    attrs = ""
    if cls:
        attrs += f' class="{esc(cls)}"'
    if key:
        attrs += f' data-key="{esc(key)}"'
    return f"<td{attrs}>{markup}</td>"


def c(text: object, cls: str = "") -> Cell:
    """A plain text cell (escaped)."""
    return _td(esc(text), cls=cls)


def raw(markup: str, cls: str = "") -> Cell:
    """A cell of ready markup (already escaped)."""
    return _td(markup, cls=cls)


@functools.lru_cache(maxsize=1024)
def clause(text: str) -> Cell:
    """A clause reference, broken only after the code's name ("EN 1992-1-1:2004," / "9.2.1.1(1)")."""
    code, sep, rest = str(text).partition(", ")
    if not sep:
        return _td(tag("span", esc(text), cls="nw"), cls="clause")
    return _td(
        tag("span", esc(code + ","), cls="nw") + " " + tag("span", esc(rest), cls="nw"),
        cls="clause",
    )


def k(value: object, key: str, cls: str = "num") -> Cell:
    """A record number, keyed."""
    text = num(value)
    # A number's text (digits, sign, point, exponent) needs no escaping.
    return _td(text if isinstance(value, (int, float)) else esc(text), key=key, cls=cls)


def table(
    headers: Sequence[str],
    rows: Iterable[Sequence[Cell]],
    *,
    caption: str = "",
    cls: str = "",
    row_classes: Sequence[str] = (),
) -> str:
    """A table; ``headers`` are markup (units and subscripts allowed)."""
    rows = list(rows)
    if len(rows) <= KEEP_TOGETHER_ROWS:
        cls = f"{cls} keep".strip()
    head = "".join(f"<th>{h}</th>" for h in headers)
    thead = f"<thead><tr>{head}</tr></thead>" if any(headers) else ""
    body = []
    for i, row in enumerate(rows):
        cells = "".join(row)
        rc = row_classes[i] if i < len(row_classes) and row_classes[i] else ""
        body.append(f'<tr class="{esc(rc)}">{cells}</tr>' if rc else f"<tr>{cells}</tr>")
    cap = f"<caption>{caption}</caption>" if caption else ""
    return tag("table", f"{cap}{thead}<tbody>{''.join(body)}</tbody>", cls=cls or None)
