"""Where things are in a job file's text, so that every error names the file, line and entry.

Lines are found by scanning the text for the n-th ``[[part]]`` header (and the
key inside its block); tomllib's own syntax errors already carry a line and
column.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from sawplan.errors import SawplanError

_ARRAY_HEADER = re.compile(r"^\s*\[\[\s*([A-Za-z0-9_.\-\"' ]+?)\s*\]\]")
_TABLE_HEADER = re.compile(r"^\s*\[\s*([A-Za-z0-9_.\-\"' ]+?)\s*\]")


@dataclass(frozen=True)
class Where:
    """An entry's place in the job file, for error messages."""

    file: str
    table: str  # "[job]", "[[stock]]", "[[part]]" or "" for the file as a whole
    line: int | None = None
    label: str | None = None

    def describe(self) -> str:
        place = f"{self.file} line {self.line}" if self.line else self.file
        if not self.table:
            return place
        what = f"{self.table} {self.label}" if self.label else self.table
        return f"{place} ({what})"


def located(err: SawplanError, where: Where) -> SawplanError:
    """The same kind of error, its message prefixed with the file, line and entry."""
    new = type(err)(f"{where.describe()}: {err.one_line()}")
    new.__cause__ = err
    return new


class TomlLines:
    """Header and key lines of a TOML text, found by scanning (outside multi-line strings)."""

    def __init__(self, text: str):
        self.lines = text.splitlines()
        self.blocks: list[tuple[str, int]] = []  # (header name, 1-based line)
        inside = None
        for number, line in enumerate(self.lines, start=1):
            if inside is None:
                m = _ARRAY_HEADER.match(line)
                if m:
                    self.blocks.append((f"[[{m.group(1).strip()}]]", number))
                else:
                    m = _TABLE_HEADER.match(line)
                    if m:
                        self.blocks.append((f"[{m.group(1).strip()}]", number))
            for quote in ('"""', "'''"):
                if inside in (None, quote) and line.count(quote) % 2 == 1:
                    inside = None if inside == quote else quote

    def header_line(self, table: str, index: int = 0) -> int | None:
        """Line of the ``index``-th (0-based) header called ``table`` ("[[part]]")."""
        found = [line for name, line in self.blocks if name == table]
        return found[index] if index < len(found) else None

    def key_line(self, table: str, index: int, key: str) -> int | None:
        """Line where ``key`` is set inside that entry's block, else the header's line."""
        start = self.header_line(table, index)
        if start is None:
            return None
        following = [line for _, line in self.blocks if line > start]
        end = min(following) if following else len(self.lines) + 1
        pattern = re.compile(rf"^\s*[\"']?{re.escape(key)}[\"']?\s*=")
        for number in range(start + 1, end):
            if pattern.match(self.lines[number - 1]):
                return number
        return start
