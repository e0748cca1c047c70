"""Dates as the log keeps them: ISO ``YYYY-MM-DD`` text, never in the future.

A shop logs what happened, so a date after today is a typing mistake.
"""

from __future__ import annotations

import datetime as dt
import re

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
