"""One entry of a job file (a TOML table or a stock-file row), read value by value.

Each reader checks one kind of value (text, a quantity with its unit, a whole
number, money, a flag) and fails with a one-line error at the key's line.
"""

from __future__ import annotations

import difflib
import math

from sawplan.cutlist.jobfile.lines import TomlLines, Where, located
from sawplan.cutlist.jobfile.types import MAX_LENGTH_MM, MAX_MONEY
from sawplan.errors import BadDataError, SawplanError, UsageError


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

    def text(self, key: str, *, required: bool = False, default: str = "") -> str:
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
        if len(value) > 200:
            raise self.fail(
                BadDataError(f"is {len(value)} characters, at most 200", field=key), key
            )
        return value

    def quantity(self, key: str, dimension: str, example: str, *, positive: bool) -> float | None:
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
        if positive and not core > 0:
            raise self.fail(BadDataError(f"must be more than 0, got {value!r}", field=key), key)
        if core < 0:
            raise self.fail(BadDataError(f"must not be negative, got {value!r}", field=key), key)
        if dimension == "length" and core > MAX_LENGTH_MM:
            raise self.fail(BadDataError(f"must be at most 100 m, got {value!r}", field=key), key)
        return core

    def count(self, key: str, *, minimum: int) -> int | None:
        value = self.data.get(key)
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, int):
            err = BadDataError(f"expected a whole number, got {value!r}", field=key)
            raise self.fail(err, key)
        if value < minimum:
            what = "must not be negative" if minimum == 0 else f"must be at least {minimum}"
            raise self.fail(BadDataError(f"{what}, got {value}", field=key), key)
        if value > 1_000_000:
            raise self.fail(BadDataError(f"must be at most 1,000,000, got {value}", field=key), key)
        return value

    def money(self, key: str) -> float | None:
        value = self.data.get(key)
        if value is None:
            return None
        if (
            isinstance(value, bool)
            or not isinstance(value, int | float)
            or not math.isfinite(value)
        ):
            err = BadDataError(f"expected a number (money), e.g. 120.50, got {value!r}", field=key)
            raise self.fail(err, key)
        if value < 0:
            raise self.fail(BadDataError(f"must not be negative, got {value:g}", field=key), key)
        high = _money_limit(self.table, key)
        if value > high:
            err = BadDataError(f"must be at most {high:,.0f}, got {value:g}", field=key)
            raise self.fail(err, key)
        return float(value)

    def flag(self, key: str) -> bool:
        value = self.data.get(key, False)
        if not isinstance(value, bool):
            raise self.fail(BadDataError(f"expected true or false, got {value!r}", field=key), key)
        return value


def _money_limit(table: str, key: str) -> float:
    """The field table's upper limit for a money key of a job file (else MAX_MONEY)."""
    from sawplan.fields import field_for

    name = "job" if table == "[job]" else "stock"
    rule = field_for(f"{name}.{key}")
    return rule.high if rule is not None and rule.high is not None else MAX_MONEY


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
