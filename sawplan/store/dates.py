"""Dates as the log keeps them: ISO ``YYYY-MM-DD`` text, never in the future, in order.

A shop logs what happened, so a date after today is a typing mistake; and a blade
is bought before it is fitted, fitted before it cuts, and cuts nothing after it is
retired.  Every date rule of the log is in this module.
"""

from __future__ import annotations

import datetime as dt
import re
from dataclasses import dataclass
from typing import Any

from sawplan.errors import BadDataError, UsageError

EARLIEST = dt.date(1950, 1, 1)
_ISO = re.compile(r"^\s*(\d{4})[-/](\d{1,2})[-/](\d{1,2})\s*$")
_HINT = "write YYYY-MM-DD, today or yesterday"


def today() -> dt.date:
    """Today's local date (one place, so tests can reason about it)."""
    return dt.date.today()


def parse_day(text: str | None, *, field: str = "date", now: dt.date | None = None) -> str:
    """User text → ISO date; ``None`` (no date given) means today.

    Accepts ``YYYY-MM-DD`` (or with slashes), ``today``, ``yesterday`` and
    ``N days ago``.  Raises ``UsageError`` when unreadable or empty (an empty
    ``--date ""`` is a slip, not "today") and ``BadDataError`` when the date is
    in the future or before 1950.
    """
    current = now or today()
    if text is None:
        return current.isoformat()
    raw = str(text).strip().lower()
    if not raw:
        raise UsageError("expected a date, got nothing", field=field, hint=_HINT)
    if len(raw) > 40:
        raise UsageError(f"expected a date, got {len(raw):,} characters", field=field, hint=_HINT)
    if raw == "today":
        day = current
    elif raw == "yesterday":
        day = current - dt.timedelta(days=1)
    elif m := re.fullmatch(r"(\d{1,4})\s*days?\s+ago", raw):
        day = current - dt.timedelta(days=int(m.group(1)))
    else:
        m = _ISO.match(raw)
        if not m:
            raise UsageError(f"expected a date, got {text!r}", field=field, hint=_HINT)
        try:
            day = dt.date(int(m.group(1)), int(m.group(2)), int(m.group(3)))
        except ValueError as err:
            raise UsageError(f"{text!r} is not a calendar date ({err})", field=field) from None
    if day > current:
        raise BadDataError(
            f"{day.isoformat()} is in the future (today is {current.isoformat()})", field=field
        )
    if day < EARLIEST:
        raise BadDataError(f"{day.isoformat()} is before {EARLIEST.isoformat()}", field=field)
    return day.isoformat()


def check_stored_day(text: str, *, field: str, now: dt.date | None = None) -> str:
    """Validate an ISO date read from a file (import): same rules, ISO only."""
    raw = str(text).strip()
    if not _ISO.match(raw):
        raise UsageError(f"expected a date YYYY-MM-DD, got {text!r}", field=field)
    return parse_day(raw, field=field, now=now)


# --- the order of a blade's dates ---------------------------------------------------------
#
# A blade is bought, then fitted, then it cuts and things happen to it, then it is
# retired.  Every write step of the log (the CLI, ``db import``, the station) checks the
# rows it wrote against these rules inside its own transaction, so a refused row leaves
# nothing behind.  The rules live here and only here; a step names which to apply.

_JOIN = " x JOIN blades b ON b.id = x.blade_id WHERE "
_FIRST_FIT = "(SELECT MIN(f2.fitted_on) FROM fittings f2 WHERE f2.blade_id = b.id)"


@dataclass(frozen=True)
class DateRule:
    """A row's date that must not lie before (or after) a date of its blade.

    ``sql`` selects the blade's tag, the row's date and the blade's date of the
    rows that break the rule (``x`` the row, ``b`` its blade): constant text.
    """

    table: str  # the row checked: fittings, cuts, events or blades
    against: str  # which fact of the blade: bought, first fitting, fitted, retired
    sql: str
    what: str  # the row's date in words: "a cut on"
    side: str  # "before" or "after"
    bound_words: str  # "it was bought"


_CUT = "SELECT b.tag, x.cut_on, "
_EVENT = "SELECT b.tag, x.happened_on, "
_FIT = "SELECT b.tag, x.fitted_on, "
DATE_RULES: tuple[DateRule, ...] = (
    DateRule("fittings", "bought", _FIT + "b.bought_on FROM fittings" + _JOIN
             + "x.fitted_on < b.bought_on", "fitted on", "before", "it was bought"),
    DateRule("fittings", "retired", _FIT + "b.retired_on FROM fittings" + _JOIN
             + "x.fitted_on > b.retired_on", "fitted on", "after", "it was retired"),
    DateRule("fittings", "fitted", "SELECT b.tag, x.removed_on, x.fitted_on FROM fittings" + _JOIN
             + "x.removed_on < x.fitted_on", "taken off on", "before", "it was fitted"),
    DateRule("cuts", "bought", _CUT + "b.bought_on FROM cuts" + _JOIN
             + "x.cut_on < b.bought_on", "a cut on", "before", "it was bought"),
    DateRule("cuts", "first fitting", _CUT + _FIRST_FIT + " FROM cuts" + _JOIN + "x.cut_on < "
             + _FIRST_FIT, "a cut on", "before", "it was first fitted"),
    DateRule("cuts", "retired", _CUT + "b.retired_on FROM cuts" + _JOIN
             + "x.cut_on > b.retired_on", "a cut on", "after", "it was retired"),
    DateRule("events", "bought", _EVENT + "b.bought_on FROM events" + _JOIN
             + "x.happened_on < b.bought_on", "an event on", "before", "it was bought"),
    DateRule("events", "first fitting", _EVENT + _FIRST_FIT + " FROM events" + _JOIN
             + "x.happened_on < " + _FIRST_FIT, "an event on", "before", "it was first fitted"),
    DateRule("events", "retired", _EVENT + "b.retired_on FROM events" + _JOIN
             + "x.happened_on > b.retired_on", "an event on", "after", "it was retired"),
    DateRule("blades", "bought", "SELECT b.tag, x.retired_on, b.bought_on FROM blades x "
             "JOIN blades b ON b.id = x.id WHERE x.retired_on < b.bought_on", "retired on",
             "before", "it was bought"),
)  # fmt: skip
_FILTERS = {"row_id": " AND x.id = :row_id", "blade_id": " AND b.id = :blade_id",
            "after_id": " AND x.id > :after_id"}  # fmt: skip


def check_dates(
    db: Any,
    table: str,
    *,
    row_id: int | None = None,
    blade_id: int | None = None,
    after_id: int | None = None,
    against: tuple[str, ...] | None = None,
) -> None:
    """Refuse, naming both dates, the first row of ``table`` that breaks a date rule.

    Only the rows a write step touched are read: one row (``row_id``), one blade's
    rows (``blade_id``) or the rows added after ``after_id`` (an import).
    ``against`` narrows the rules to the blade facts the step changed.
    """
    given = {"row_id": row_id, "blade_id": blade_id, "after_id": after_id}
    params = {k: v for k, v in given.items() if v is not None}
    where = "".join(_FILTERS[k] for k in params)
    for rule in DATE_RULES:
        if rule.table != table or (against is not None and rule.against not in against):
            continue
        found = db.execute(rule.sql + where + " ORDER BY 2, x.id LIMIT 1", params).fetchone()
        if found is not None:
            tag, day, bound = found
            raise BadDataError(
                f"blade {tag}: {rule.what} {day} is {rule.side} {rule.bound_words} ({bound})",
                field="date",
            )


def last_row_id(db: Any, table: str) -> int:
    """The highest row id of ``table`` (0 when empty): rows added later are newer."""
    from sawplan.store.schema import ident

    return int(db.scalar(f"SELECT COALESCE(MAX(id), 0) FROM {ident(table)}") or 0)
