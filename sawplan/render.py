"""One renderer: frozen result dataclasses become tables, JSON or CSV.

Core results carry their units in their field names (``weight_kg``), so JSON is
the dataclass itself.  Tables are plain text so they paste into e-mails and
print on any terminal.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import json
import math
import re
from collections.abc import Iterable, Sequence
from enum import Enum
from itertools import chain, zip_longest
from typing import Any

from sawplan import __version__

JSON_SCHEMA_VERSION = 1


def jsonable(obj: Any) -> Any:
    """Turn dataclasses, enums, tuples and non-finite floats into plain JSON values."""
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        out = {}
        for f in dataclasses.fields(obj):
            if f.metadata.get("json") is False:
                continue
            out[f.name] = jsonable(getattr(obj, f.name))
        extra = getattr(obj, "json_extra", None)
        if callable(extra):
            out.update({k: jsonable(v) for k, v in extra().items()})
        return out
    if isinstance(obj, Enum):
        return obj.value
    if isinstance(obj, dict):
        return {str(k): jsonable(v) for k, v in obj.items()}
    if isinstance(obj, list | tuple | set | frozenset):
        return [jsonable(v) for v in obj]
    if isinstance(obj, float):
        return obj if math.isfinite(obj) else None
    if hasattr(obj, "__fspath__"):
        return str(obj)
    return obj


def to_json(obj: Any, *, kind: str) -> str:
    """JSON text with a small envelope: what it is and which schema version."""
    body = jsonable(obj)
    if isinstance(body, dict):
        payload = {"kind": kind, "schema": JSON_SCHEMA_VERSION, "sawplan": __version__, **body}
    else:
        payload = {
            "kind": kind,
            "schema": JSON_SCHEMA_VERSION,
            "sawplan": __version__,
            "items": body,
        }
    text = json.dumps(payload, indent=2, ensure_ascii=False)
    return _JSON_RAW.sub(_json_escaped, text)


# ``fields.CONTROL`` but C0, which json escapes itself: DEL, C1, the line separators and the
# bidi overrides (only ever inside a string) become \\u escapes, so printed JSON cannot
# drive a terminal
_JSON_RAW = re.compile("[\x7f-\x9f\u2028\u2029\u202a-\u202e\u2066-\u2069]")


def _json_escaped(match: re.Match[str]) -> str:
    return f"\\u{ord(match.group()):04x}"


_FORMULA_LEADS = ("=", "+", "-", "@", "\t", "\r")
_PLAIN_NUMBER = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?", re.ASCII)
# A formula start after anything a spreadsheet may skip or not show: white space, C0/C1
# controls, and the invisible marks (zero-width, bidi marks, word joiner, BOM, Arabic
# letter mark, Mongolian vowel separator).
_RISKY_LEAD = re.compile(
    "[\\s\x00-\x1f\x7f-\x9f\u061c\u180e\u200b-\u200f\u2028-\u202e\u2060-\u206f\ufeff]*"
    "[=+\\-@\uff0b\uff0d\uff1d\uff20]"
)


def safe_cell(value: Any) -> Any:
    """Neutralise text a spreadsheet would run as a formula (plain numbers pass untouched).

    A cell is risky when = + - @ (or their full-width forms) come first after any
    white space, control or invisible character, or when it starts with a tab or a
    carriage return; an apostrophe in front makes it text (import takes it off again).
    Only a plain decimal number ("-5", "+1.5e3") keeps its sign unquoted: Python's
    float() also reads "-inf", "+nan" and "-1_000", which a spreadsheet would take
    for formulas.
    """
    if not isinstance(value, str) or not value or value[0].isalnum():
        return value
    risky = value.startswith(_FORMULA_LEADS) or _RISKY_LEAD.match(value) is not None
    if risky and not _PLAIN_NUMBER.fullmatch(value):
        return "'" + value
    return value


# Line breaks the csv module does not quote when lines end in LF (a lone CR; the rest
# are breaks for str.splitlines and some editors): a cell holding one is quoted by hand.
_ODD_BREAK = re.compile("[\r\x0b\x0c\x1c-\x1e\x85\u2028\u2029]")
_NEEDS_QUOTES = re.compile('[\n",\r\x0b\x0c\x1c-\x1e\x85\u2028\u2029]')


def to_csv(headers: Sequence[str], rows: Iterable[Sequence[Any]]) -> str:
    """CSV text, every cell through ``safe_cell``; a cell holding a line break, a quote or
    a comma is quoted.  The csv module's minimal quoting leaves a lone CR bare when lines
    end in LF, and a reader then starts a new row inside the cell: such text (rare) is
    quoted here instead."""
    cells = [[safe_cell(h) for h in headers]]
    cells += [[_cell(v) for v in row] for row in rows]
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerows(cells)
    text = buf.getvalue()
    if _ODD_BREAK.search(text) is None:
        return text
    return "".join((",".join(_quoted(c) for c in row) or '""') + "\n" for row in cells)


def _cell(value: Any) -> Any:
    """``safe_cell`` with the common cases first (a number, text starting with a letter)."""
    if value is None:
        return ""
    if not isinstance(value, str) or value[:1].isalnum():
        return value
    return safe_cell(value)


def _quoted(cell: Any) -> str:
    text = str(cell)
    if _NEEDS_QUOTES.search(text) is None:
        return text
    return '"' + text.replace('"', '""') + '"'


def terminal_text(text: str, *, lines: bool = False) -> str:
    """Text as a terminal shows it safely: each control character written as an escape.

    Stored text (a tag, a note, an imported supplier) could carry ESC sequences
    that move the cursor or retitle the window, or bidirectional overrides that
    reorder what is read; the table shows ``\\x1b`` and ``\\u202e`` instead
    (``sawplan.fields.CONTROL``).  ``lines=True`` keeps the line feeds of a block
    of several lines.  Text already escaped comes back unchanged.
    """
    from sawplan.fields import CONTROL

    if lines:
        return "\n".join(CONTROL.sub(_escaped, part) for part in text.split("\n"))
    return CONTROL.sub(_escaped, text)


def _escaped(match: re.Match[str]) -> str:
    code = ord(match.group())
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def _shown(value: Any) -> str:
    return "" if value is None else terminal_text(str(value))


def _any_control(body: list[list[str]]) -> bool:
    """True when any cell holds a control character (``terminal_text`` would change it)."""
    from sawplan.fields import CONTROL

    return CONTROL.search("".join(chain.from_iterable(body))) is not None


def table(
    headers: Sequence[str],
    rows: Iterable[Sequence[Any]],
    *,
    align: str | None = None,
    title: str | None = None,
) -> str:
    """A plain aligned text table. ``align`` has one of l/r per column (numbers right).

    Every cell goes through ``terminal_text``: no cell can send a terminal a command.
    """
    body = [["" if v is None else str(v) for v in row] for row in rows]
    if _any_control(body):  # one scan of the whole table; escape cell by cell only then
        body = [[terminal_text(cell) for cell in row] for row in body]
    headers = [_shown(h) for h in headers]
    cols = len(headers)
    widths = [len(h) for h in headers]
    for i, column in enumerate(zip_longest(*body, fillvalue="")):  # column by column: fast
        if i < cols:
            widths[i] = max(widths[i], max(map(len, column), default=0))
    if align is None:
        align = "".join("r" if _looks_numeric(body, i) else "l" for i in range(cols))

    justify = [str.rjust if a == "r" else str.ljust for a in align[:cols]]

    def line(cells: Sequence[str]) -> str:
        return "  ".join(
            [j(c, w) for j, c, w in zip(justify, cells, widths, strict=False)]
        ).rstrip()

    out = []
    if title:
        out.append("\n".join(terminal_text(part) for part in title.split("\n")))
    out.append(line(list(headers)))
    out.append("  ".join("-" * w for w in widths))
    out.extend(line(row) for row in body)
    return "\n".join(out)


def _looks_numeric(rows: list[list[str]], i: int) -> bool:
    seen = False
    for row in rows:
        if i >= len(row) or row[i] in ("", "—"):
            continue
        head = row[i].split(" ")[0].replace(",", "").replace("×", "")
        try:
            float(head)
            seen = True
        except ValueError:
            return False
    return seen


def key_values(pairs: Iterable[tuple[str, Any]], *, title: str | None = None) -> str:
    """A two-column block of labelled values (each through ``terminal_text``)."""
    pairs = [(_shown(k), _shown(v)) for k, v in pairs]
    width = max((len(k) for k, _ in pairs), default=0)
    lines = ["\n".join(terminal_text(part) for part in title.split("\n"))] if title else []
    lines += [f"{k.ljust(width)}  {v}" for k, v in pairs]
    return "\n".join(lines)
