"""Field values of the blade log: the allowed words, text cleaning, and every row's check.

Every row a write step gives the database — from the command line, an import
or the station — passes ``check_row`` first (``Log.insert``, ``insert_many``
and ``update`` call it): each value against the rule of its column in the one
field table (``sawplan.fields``, ``"TABLE.column"`` names), whole numbers bounded
before any engine sees them (SQLite stores 64-bit integers, PostgreSQL's
``integer`` 32-bit ones), free text without control characters, dates by the
rules of ``sawplan.store.dates``, and a cut's section read by the same parser as
``sawplan cut`` reads it.  The error names the field in the user's words, the
range and the unit, and carries the column for messages that point at a file.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Callable, Mapping
from functools import cache, lru_cache
from typing import Any

from sawplan import fields as ft
from sawplan.errors import BadDataError, SawplanError

BLADE_STATUSES = ("new", "fitted", "removed", "retired")
EVENT_KINDS = ("teeth-lost", "crooked", "stall", "failure")
WELDED = ("in-house", "bought")
MAX_OTHER_TEXT = 300  # a column without a rule of its own: a note's length
MAX_ROW_ID = 2**31 - 1  # PostgreSQL's integer; far beyond any log's rows


class StoredValueError(BadDataError):
    """A value the log refuses to store; ``column`` says which (for file and row messages)."""

    def __init__(self, message: str, *, field: str | None, column: str, hint: str | None = None):
        self.column = column
        super().__init__(message, field=field, hint=hint)


def fmt_num(v: float) -> str:
    """Shortest plain text of a size: 27.0 → '27', 0.9 → '0.9'."""
    return f"{round(v, 4):g}"


def pitch_label(tpi_coarse: float, tpi_fine: float) -> str:
    if tpi_coarse == tpi_fine:
        return fmt_num(tpi_coarse)
    return f"{fmt_num(tpi_coarse)}/{fmt_num(tpi_fine)}"


def clean_text(value: str | None, *, field: str) -> str | None:
    """Collapse white space; empty → None; refuse control characters and overlong text.

    ``field`` is where the text goes (``"blades.supplier"``) or a field's key:
    its rule in the field table gives the words and the length.
    """
    if value is None:
        return None
    rule = _field(field)
    if rule is None or not rule.is_text:
        rule = ft.Field(field, _words(field), dimension="text", high=MAX_OTHER_TEXT)
    text = ft.check_text(rule, value)
    return text or None


def check_failure_mode(code: str | None, *, field: str) -> str:
    """A failure-mode code from the packaged table (``sawplan.life.failure_modes``)."""
    from sawplan.life.failure_modes import failure_modes

    key = (code or "").strip().lower()
    table = failure_modes()
    if key not in table:
        close = difflib.get_close_matches(key, list(table), n=1)
        hint = f"did you mean {close[0]}?" if close else None
        raise BadDataError(
            f"must be one of {', '.join(table)}, got {code!r}", field=field, hint=hint
        )
    return key


def modes_hint() -> str:
    from sawplan.life.failure_modes import failure_modes

    return "modes: " + ", ".join(failure_modes())


def whole_number(value: object, name: str) -> int:
    """A whole number inside the range the field table gives ``name`` (a field's key, or
    "TABLE.column"), checked before any database sees it; one line naming the field."""
    rule = _field(name)
    if rule is None:  # a column without a rule of its own: what every engine stores
        rule = ft.Field(name, _words(name), low=0, high=MAX_ROW_ID, integer=True)
    _whole(value, rule)
    return int(value)


# --- every row the log stores -------------------------------------------------------------


def check_row(table: str, row: Mapping[str, Any]) -> None:
    """Refuse (``StoredValueError``) a row holding a value its column's rule does not allow.

    A ``None`` is left to the schema (a required column refuses it there).  A cut's
    area is the batch total: the rule of ``area cut`` holds for one cut of it.
    """
    column = ""
    try:
        for column, value in row.items():
            if value is not None:
                _rule(table, column)(value)
        if table == "cuts" and row.get("area_mm2") is not None:
            column = "area_mm2"
            _number_rule("area")(row["area_mm2"] / (row.get("count") or 1))
    except StoredValueError:
        raise
    except SawplanError as err:  # a value that cannot be stored is bad data, whatever refused it
        raise StoredValueError(err.message, field=err.field, column=column, hint=err.hint) from None


@cache
def _rule(table: str, column: str) -> Callable[[Any], Any]:
    """The check of one column's values, built once from the field table."""
    rule = _field(f"{table}.{column}")
    words = rule.words if rule is not None else _words(column)
    if column in ("id", "blade_id", "saw_id"):
        row_id = ft.Field(column, words, low=1, high=MAX_ROW_ID, integer=True)
        return lambda v: _whole(v, row_id)
    if column.endswith("_on"):
        return lambda v: _day(v, words)
    if table == "cuts" and column == "section":
        return lambda v: (_text(v, rule), _section(v))
    if table == "cuts" and column == "area_mm2":  # the range is one cut's: see check_row
        return lambda v: _finite(v, words, above_zero=True)
    if rule is None:
        text = ft.Field(column, words, dimension="text", high=MAX_OTHER_TEXT)
        whole = ft.Field(column, words, low=0, high=MAX_ROW_ID, integer=True)
        return lambda v: _unruled(v, text, whole)
    if rule.choices:
        return lambda v: _choice(v, rule)
    if rule.is_switch:
        return lambda v: _switch(v, words)
    if rule.is_text or (rule.low is None and rule.high is None):
        if not rule.is_text or rule.high is None:
            rule = ft.Field(rule.key, rule.words, dimension="text", high=MAX_OTHER_TEXT)
        return lambda v: _text(v, rule)
    return _number_rule(rule.key)


@cache
def _number_rule(key: str) -> Callable[[Any], None]:
    rule = ft.field(key)

    def check(value: Any) -> None:
        if isinstance(value, str):  # a number kept as text (a feed dial's setting)
            try:
                value = float(value)
            except ValueError:
                raise BadDataError(f"expected a number, got {value!r}", field=rule.words) from None
        if rule.integer:
            _whole(value, rule)
        else:
            ft.check(rule, value)

    return check


def _field(name: str) -> Any:
    return ft.FIELDS.get(name) or ft.field_for(name)


def _words(name: str) -> str:
    return name.rsplit(".", 1)[-1].replace("_", " ")


def _whole(value: Any, rule: Any) -> None:
    if isinstance(value, bool) or not isinstance(value, int):
        raise BadDataError(f"expected a whole number, got {value!r}", field=rule.words)
    ft.check_count(rule, value)


def _finite(value: Any, words: str, *, above_zero: bool = False) -> None:
    if isinstance(value, bool) or not isinstance(value, int | float):
        raise BadDataError(f"expected a number, got {value!r}", field=words)
    if not math.isfinite(value) or value < 0 or (above_zero and value == 0):
        raise BadDataError(f"must be {'above' if above_zero else 'at least'} 0, got {value!r}",
                           field=words)  # fmt: skip


def _text(value: Any, rule: Any) -> None:
    if not isinstance(value, str):
        raise BadDataError(f"expected text, got {value!r}", field=rule.words)
    ft.check_text(rule, value, collapse=False)


def _unruled(value: Any, text: Any, whole: Any) -> None:
    """A column without a rule of its own: what any engine stores, finite and not negative."""
    if isinstance(value, str):
        _text(value, text)
    elif isinstance(value, int) and not isinstance(value, bool):
        _whole(value, whole)
    else:
        _finite(value, text.words)


def _choice(value: Any, rule: Any) -> None:
    if value not in rule.choices:
        raise BadDataError(f"must be one of {', '.join(rule.choices)}, got {value!r}",
                           field=rule.words)  # fmt: skip


def _switch(value: Any, words: str) -> None:
    if value not in (0, 1) or not isinstance(value, int):
        raise BadDataError(f"expected 1 or 0, got {value!r}", field=words)


def _day(value: Any, words: str) -> None:
    if not isinstance(value, str):
        raise BadDataError(f"expected a date YYYY-MM-DD, got {value!r}", field=words)
    _stored_day(value, words)


@lru_cache(maxsize=4096)
def _stored_day(value: str, words: str) -> None:
    """A date by the rules of ``sawplan.store.dates`` (a log repeats its dates)."""
    from sawplan.store.dates import check_stored_day

    check_stored_day(value, field=words)


@lru_cache(maxsize=4096)
def _section(text: str) -> None:
    """A cut's section, read as ``sawplan cut`` reads it (a log repeats its sections)."""
    from sawplan.sections import parse_section

    parse_section(text)
