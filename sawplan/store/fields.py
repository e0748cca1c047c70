"""Field values of the blade log: the allowed words, text cleaning, short number text."""

from __future__ import annotations

import difflib
import math

from sawplan.errors import BadDataError

BLADE_STATUSES = ("new", "fitted", "removed", "retired")
EVENT_KINDS = ("teeth-lost", "crooked", "stall", "failure")
WELDED = ("in-house", "bought")
MAX_TEXT = {"tag": 40, "name": 60, "job": 60, "heat": 60, "note": 300, "other": 120}


def fmt_num(v: float) -> str:
    """Shortest plain text of a size: 27.0 → '27', 0.9 → '0.9'."""
    return f"{round(v, 4):g}"


def pitch_label(tpi_coarse: float, tpi_fine: float) -> str:
    if tpi_coarse == tpi_fine:
        return fmt_num(tpi_coarse)
    return f"{fmt_num(tpi_coarse)}/{fmt_num(tpi_fine)}"


def clean_text(value: str | None, *, field: str, limit: int | None = None) -> str | None:
    """Collapse white space; empty → None; refuse control characters and overlong text."""
    if value is None:
        return None
    text = " ".join(str(value).split())
    if not text:
        return None
    if any(ord(c) < 32 or 127 <= ord(c) < 160 for c in text):
        raise BadDataError("must not hold control characters", field=field)
    limit = limit or MAX_TEXT.get(field, MAX_TEXT["other"])
    if len(text) > limit:
        raise BadDataError(f"must be at most {limit} characters, got {len(text)}", field=field)
    return text


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


def positive(value: float, field: str) -> None:
    """Refuse zero, negative and non-finite numbers."""
    if not (isinstance(value, int | float) and math.isfinite(value) and value > 0):
        raise BadDataError(f"must be above 0, got {value!r}", field=field)


def whole_number(value: object, name: str) -> int:
    """A whole number inside the range the field table gives ``name`` (a field's key, or
    "TABLE.column"),
    checked before any database sees it (SQLite stores 64-bit integers, PostgreSQL's
    ``integer`` 32-bit ones); one line naming the field otherwise."""
    from sawplan import fields

    rule = fields.FIELDS.get(name) or fields.field_for(name)
    if rule is None:  # a column without a rule of its own: what every engine stores
        rule = fields.Field(name, name.rsplit(".", 1)[-1], low=0, high=2**31 - 1, integer=True)
    if isinstance(value, bool) or not isinstance(value, int):
        raise BadDataError(f"expected a whole number, got {value!r}", field=rule.words)
    return fields.check_count(rule, value)
