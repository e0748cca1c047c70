"""Which blades belong together, and which blades a life figure may rest on.

``sawplan life --group-by`` fits each group of blades on its own: by blade
type, material group, lot, supplier or saw, or by two of these at once
(``blade-type,lot``).  ``forecast`` and ``plan`` choose the blades behind a
life (``--lot``, ``--without-lot``, ``--supplier``); a name not in the log is
refused with the closest ones in the log.
"""

from __future__ import annotations

import difflib
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from sawplan.display import join, say
from sawplan.errors import NotFoundError, UsageError
from sawplan.store.stats import BladeLife

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.db import Log as Database

# the words are the choices of the field ``group_by`` (sawplan/fields.py)
GROUP_KEYS: dict[str, Callable[[BladeLife], str]] = {
    "blade-type": lambda b: b.blade_type,
    "material-group": lambda b: b.material_group or "unknown",
    "lot": lambda b: b.lot or "(no lot)",
    "supplier": lambda b: b.supplier or "(no supplier)",
    "saw": lambda b: b.saw or "(no saw)",
}
MAX_KEYS = 2


def parse_group_by(text: str | None) -> tuple[str, ...]:
    """``blade-type``, ``lot,supplier`` → the keys; unknown keys list the valid ones."""
    if text is None:
        return ()
    keys = tuple(k.strip().lower() for k in text.replace("+", ",").split(","))
    valid = ", ".join(GROUP_KEYS)
    for key in keys:
        if key not in GROUP_KEYS:
            close = difflib.get_close_matches(key, list(GROUP_KEYS), n=1)
            raise UsageError(
                f"must be one or two of {valid} (two joined by a comma), got {text!r}",
                field="group-by",
                hint=f"did you mean {close[0]}?" if close else "e.g. --group-by blade-type,lot",
            )
    if len(set(keys)) != len(keys) or len(keys) > MAX_KEYS:
        raise UsageError(
            f"takes one or two different keys of {valid}, got {text!r}",
            field="group-by",
            hint="e.g. --group-by blade-type,lot",
        )
    return keys


def group_key(blade: BladeLife, keys: Sequence[str]) -> tuple[str, ...]:
    """The values of ``keys`` for one blade."""
    return tuple(GROUP_KEYS[k](blade) for k in keys)


def key_label(values: Sequence[str]) -> str:
    """``bi-metal M51 41×1.3 1.4/2 · T-3309``: the values of a group's keys."""
    return join(" · ", list(values))


# --- choosing the blades behind a life -----------------------------------------------------


@dataclass(frozen=True)
class BladeChoice:
    """The blades a forecast or plan takes its life from: lots and suppliers in or out."""

    lots: tuple[str, ...] = ()
    without_lots: tuple[str, ...] = ()
    suppliers: tuple[str, ...] = ()

    @property
    def chosen(self) -> bool:
        return bool(self.lots or self.without_lots or self.suppliers)

    def words(self) -> str:
        """``blades of lot E2604 from east depot, leaving out lot T-3309``."""
        parts = []
        if self.lots:
            parts.append(say("blades of lot {}", " or ".join(self.lots)))
        if self.suppliers:
            who = " or ".join(self.suppliers)
            parts.append(say("from {}", who) if self.lots else say("blades from {}", who))
        if self.without_lots:
            parts.append(say("leaving out lot {}", " and ".join(self.without_lots)))
        return join(", ", parts) if parts else "all blades"


def blade_choice(
    lots: Sequence[str] | None = None,
    without_lots: Sequence[str] | None = None,
    suppliers: Sequence[str] | None = None,
) -> BladeChoice:
    """The choice typed (``--lot``, ``--without-lot``, ``--supplier``), each name checked."""
    from sawplan import fields

    def clean(key: str, names: Sequence[str] | None) -> tuple[str, ...]:
        out = []
        for name in names or ():
            text = fields.check_text(key, name)
            if not text:
                raise UsageError(f"expected a name, got {name!r}", field=fields.field(key).words)
            out.append(text)
        return tuple(out)

    choice = BladeChoice(clean("lot", lots), clean("without_lot", without_lots),
                         clean("supplier", suppliers))  # fmt: skip
    both = {n.lower() for n in choice.lots} & {n.lower() for n in choice.without_lots}
    if both:
        raise UsageError(
            f"lot {sorted(both)[0]} is both chosen (--lot) and left out (--without-lot)",
            field="lot",
        )
    return choice


def check_choice(db: Database, choice: BladeChoice) -> None:
    """Refuse a lot or supplier no blade of the log has, listing the closest ones."""
    if not choice.chosen:
        return
    lots: dict[str, str] = {}
    suppliers: dict[str, str] = {}
    for lot, supplier in db.execute("SELECT lot, supplier FROM blades ORDER BY id"):
        if lot:
            lots.setdefault(lot.lower(), lot)
        if supplier:
            suppliers.setdefault(supplier.lower(), supplier)
    for name in (*choice.lots, *choice.without_lots):
        _known(name, lots, "lot", "--group-by lot")
    for name in choice.suppliers:
        _known(name, suppliers, "supplier", "--group-by supplier")


def choose(lives: Sequence[BladeLife], choice: BladeChoice) -> list[BladeLife]:
    """The blades of the chosen lots and suppliers (names checked by ``check_choice``)."""
    if not choice.chosen:
        return list(lives)
    keep = {n.strip().lower() for n in choice.lots}
    drop = {n.strip().lower() for n in choice.without_lots}
    who = {n.strip().lower() for n in choice.suppliers}
    return [
        b
        for b in lives
        if (not keep or (b.lot or "").lower() in keep)
        and (b.lot or "").lower() not in drop
        and (not who or (b.supplier or "").lower() in who)
    ]


def _known(name: str, known: dict[str, str], what: str, listing: str) -> None:
    """Refuse a lot or supplier the log does not hold, listing the closest it does."""
    key = name.strip().lower()
    if key in known:
        return
    close = difflib.get_close_matches(key, list(known), n=3, cutoff=0.4)
    if close:
        hint = "closest in the log: " + ", ".join(known[c] for c in close)
    elif known:
        hint = f"see `sawplan life {listing}`"
    else:
        hint = f"no blade in the log has a {what} recorded"
    raise NotFoundError(f"no {what} {name!r} in the blade log", field=what, hint=hint)
