"""Station forms: what was typed, read through the field table, errors beside their field.

A form names its inputs and the field of ``sawplan.fields`` each one is; a
``SawplanError`` raised while reading or writing is placed beside the input
whose field it names (by key or by the field's words), else above the form.
"""

from __future__ import annotations

import uuid
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any

from sawplan import fields
from sawplan.errors import BadDataError, SawplanError, UsageError

# every form of the station and its inputs: input name -> the key of its field
FORMS: dict[str, dict[str, str]] = {
    "start": {"cut": "cut"},
    "done": {"cut": "cut", "cuts": "cuts", "time": "time", "bundle": "pieces"},
    "blade-off": {"tag": "tag", "reason": "failure", "note": "note"},
    "blade-on": {
        "shelf": "blade",
        "tag": "tag",
        "pitch": "pitch",
        "width": "blade_width",
        "thickness": "blade_thickness",
        "supplier": "supplier",
        "lot": "lot",
        "price": "blade_price",
    },
    "remnant": {"length": "remnant_length", "heat": "heat", "rack": "rack", "note": "note"},
    "note": {"note": "note"},
    # correcting a cut done (``tap_fixes``): "last" is the id of the tap corrected
    "fix": {"last": "cut", "cuts": "cuts", "time": "time"},
    "undo": {"last": "cut"},
}
KINDS = tuple(FORMS)


@dataclass
class FormError:
    """Where a refusal shows: the form, the input (None: above the form) and the sentence."""

    form: str
    input: str | None
    message: str


@dataclass
class Typed:
    """One form as sent: its values as typed (shown again after a refusal)."""

    kind: str
    values: dict[str, str] = field(default_factory=dict)

    def text(self, name: str) -> str | None:
        """The input's text, white space collapsed; None when empty."""
        raw = " ".join(self.values.get(name, "").split())
        return raw or None

    def required(self, name: str) -> str:
        raw = self.text(name)
        if raw is None:
            f = fields.FIELDS.get(FORMS[self.kind].get(name, ""))
            words = f.words if f is not None else name
            raise UsageError(f"expected the {words}, got nothing", field=name)
        return raw

    def quantity(self, name: str, *, default_unit: str | None = None) -> float | None:
        raw = self.text(name)
        if raw is None:
            return None
        return fields.parse(FORMS[self.kind][name], raw, default_unit=default_unit)

    def whole(self, name: str, default: int) -> int:
        raw = self.text(name)
        if raw is None:
            return default
        key = FORMS[self.kind][name]
        try:
            value = int(raw)
        except ValueError:
            raise BadDataError(
                f"expected a whole number, got {raw!r}", field=fields.field(key).words
            ) from None
        return fields.check_count(key, value)

    def words(self, name: str) -> str | None:
        """Free text checked against its field (length, no control characters)."""
        return fields.check_text(FORMS[self.kind][name], self.text(name)) or None

    def checked(self, name: str) -> bool:
        return self.values.get(name, "") not in ("", "0", "off", "no")


def typed(kind: str, form: Mapping[str, Any]) -> Typed:
    """The inputs of form ``kind`` (others ignored), as text of bounded length."""
    names = (*FORMS[kind], "tap", "job", "bar")
    return Typed(kind, {n: str(form.get(n, ""))[:2000] for n in names if n in form})


def place(kind: str, err: SawplanError) -> FormError:
    """The input of form ``kind`` an error names, found by input name, field key or words."""
    said = (err.field or "").strip().lower()
    for name, key in FORMS[kind].items():
        f = fields.FIELDS.get(key)
        names = {name, key, f.words if f else ""}
        if f is not None:
            names |= set(f.names) | {n.rsplit(".", 1)[-1] for n in f.names}
        if said and said in {n.lower() for n in names if n}:
            return FormError(kind, name, _sentence(err, with_field=False))
    return FormError(kind, None, _sentence(err, with_field=True))


def _sentence(err: SawplanError, *, with_field: bool) -> str:
    """One plain sentence: the message (and its field when it is not shown beside one)."""
    text = err.one_line() if with_field else err.message + (f" ({err.hint})" if err.hint else "")
    text = " ".join(text.replace("`", "").split())
    return text[:1].upper() + text[1:] + ("" if text.endswith((".", "?", "!")) else ".")


def new_tap() -> str:
    """A fresh idempotency key for one form on one page."""
    return uuid.uuid4().hex
