"""One entry of a job file (a TOML table or a stock-file row), read value by value.

Each reader checks one kind of value (text, a quantity with its unit, a whole
number, money, a flag) against the key's rule in the one field table
(``sawplan.fields``: ``job.kerf``, ``stock.price``, ``part.count``), the same
rule the command line and the blade log apply, and fails with a one-line error
at the key's line naming the key, the field's words, the range and the unit.
"""

from __future__ import annotations

import difflib
from typing import Any

from sawplan.cutlist.jobfile.lines import TomlLines, Where, located
from sawplan.cutlist.jobfile.types import MAX_TEXT
from sawplan.errors import BadDataError, SawplanError, UsageError

# the table of the field table's names ("stock.price") that an entry's keys belong to
_TABLE_NAMES = {"[job]": "job", "[[stock]]": "stock", "stock row": "stock", "[[part]]": "part"}


class JobEntry:
    """One table of the file with a helper per kind of value; errors carry the key's line."""

    def __init__(
        self, data: dict, table: str, index: int, lines: TomlLines, file: str, label: str | None
    ):
        self.data = data
        self.table = table
        self.index = index
        self.lines = lines
        self.file = file
        self.label = label

    def where(self, key: str | None = None) -> Where:
        line = (
            self.lines.key_line(self.table, self.index, key)
            if key
            else self.lines.header_line(self.table, self.index)
        )
        return Where(self.file, self.table, line, self.label)

    def fail(self, err: SawplanError, key: str | None = None) -> SawplanError:
        return located(err, self.where(key))

    def check_keys(self, allowed: tuple[str, ...]) -> None:
        for key in self.data:
            if key not in allowed:
                close = difflib.get_close_matches(key, allowed, n=1, cutoff=0.6)
                hint = f"did you mean {close[0]}?" if close else "expected " + ", ".join(allowed)
                raise self.fail(UsageError(f"unknown key {key!r}", hint=hint), key)

    def rule(self, key: str) -> Any:
        """The field-table rule of ``key`` in this table (``job.kerf``, ``stock.price``)."""
        from sawplan.fields import field_for

        return field_for(f"{_TABLE_NAMES.get(self.table, self.table)}.{key}")

    def named(self, key: str) -> str:
        """How an error names ``key``: as written, with the field's words when they differ."""
        rule = self.rule(key)
        if rule is None or rule.words == key.replace("_", " "):
            return key
        return f"{key} ({rule.words})"

    def checked(self, key: str, value: Any, check: Any) -> Any:
        """``check(rule, value, words=…)`` with the error at the key's line."""
        try:
            return check(self.rule(key), value, words=self.named(key))
        except SawplanError as err:
            raise self.fail(err, key) from None

    def text(
        self, key: str, *, required: bool = False, default: str = "", collapse: bool = True
    ) -> str:
        from sawplan.fields import Field, check_text

        value = self.data.get(key)
        if value is None:
            if required:
                raise self.fail(BadDataError("is missing", field=key))
            return default
        if isinstance(value, bool) or not isinstance(value, str | int):
            if hasattr(value, "isoformat"):  # a TOML date or time
                return value.isoformat()
            raise self.fail(BadDataError(f"expected text, got {value!r}", field=key), key)
        value = str(value).strip()
        if required and not value:
            raise self.fail(BadDataError("must not be empty", field=key), key)
        rule = self.rule(key) or Field(key, key, dimension="text", high=MAX_TEXT)
        try:
            return check_text(rule, value, words=self.named(key), collapse=collapse) or ""
        except SawplanError as err:
            raise self.fail(err, key) from None

    def quantity(self, key: str, dimension: str, example: str) -> float | None:
        """A quantity with its unit, in the core unit, inside its field's range."""
        from sawplan.fields import check
        from sawplan.units import to_core

        value = self.data.get(key)
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, str):
            err = UsageError(
                f"expected {'an' if dimension[0] in 'aeiou' else 'a'} {dimension} with its unit, "
                f'e.g. "{example}", got {value!r}',
                field=key,
            )
            raise self.fail(err, key)
        try:
            core = to_core(value, dimension, field=key)
        except SawplanError as err:
            raise self.fail(err, key) from None
        return self.checked(key, core, check)

    def count(self, key: str) -> int | None:
        """A whole number inside its field's range (``part.count``, ``stock.count``)."""
        from sawplan.fields import check_count

        value = self.data.get(key)
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, int):
            err = BadDataError(f"expected a whole number, got {value!r}", field=key)
            raise self.fail(err, key)
        return self.checked(key, value, check_count)

    def money(self, key: str) -> float | None:
        """An amount of money inside its field's range (``job.shop_rate``, ``stock.price``)."""
        from sawplan.fields import check

        value = self.data.get(key)
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, int | float):
            err = BadDataError(f"expected a number (money), e.g. 120.50, got {value!r}", field=key)
            raise self.fail(err, key)
        return float(self.checked(key, value, check))

    def flag(self, key: str) -> bool:
        value = self.data.get(key, False)
        if not isinstance(value, bool):
            raise self.fail(BadDataError(f"expected true or false, got {value!r}", field=key), key)
        return value


def raw_stock_label(item: dict, i: int) -> str:
    """A stock entry's name in messages before it is checked: "4140 round 60mm 3m", else "#n"."""
    parts = [item.get(k) for k in ("material", "section", "length")]
    if all(isinstance(p, str) for p in parts):
        return " ".join(p.strip() for p in parts)  # type: ignore[union-attr]
    return f"#{i + 1}"


def raw_part_label(item: dict, i: int) -> str:
    """A part entry's name in messages before it is checked: its quoted name, else "#n"."""
    name = item.get("name")
    return f'"{name.strip()}"' if isinstance(name, str) and name.strip() else f"#{i + 1}"
