"""How each retired blade's life ended, judged against its type's expected life.

The judgement itself is ``sawplan.life.end_of_life``; this module finds what it
needs in the log: the lives of the blades of each type retired worn out, the
censored fit of each type, and the typical range (from memory) for the material
group a blade cut most (``reports.default_life``).  ``sawplan life``, ``blade
show`` and ``blade retire`` all judge through ``with_ends``/``retirement``, so
they agree.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

from sawplan.display import say
from sawplan.store.stats import BladeLife, blade_lives

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life.end_of_life import EndOfLife, ExpectedLife
    from sawplan.store.db import Log as Database
    from sawplan.store.records import Blade


LEAVE_OUT_BELOW = 30  # blades of a type; from here on each blade is judged against them all


class ExpectedLives:
    """The expected life of each blade type in a set of lives, worked out on first use.

    A blade is judged against the other blades of its type (``leave_out``), so a
    short life does not widen the very range it is compared with; in a type of
    ``LEAVE_OUT_BELOW`` blades or more one life hardly moves the range, and the
    type's one range serves every blade (one fit, not one per blade).
    """

    def __init__(self, lives: Sequence[BladeLife], confidence: float = 0.9):
        self.confidence = confidence
        self.by_type: dict[str, list[BladeLife]] = defaultdict(list)
        for b in lives:
            if b.area_cm2 > 0:  # a blade that cut nothing tells nothing about life
                self.by_type[b.blade_type].append(b)
        self.cache: dict[tuple[str, str | None], ExpectedLife | None] = {}

    def of_type(self, blade_type: str, leave_out: str | None = None) -> ExpectedLife | None:
        """From the type's worn-out blades, else the type's fit; None when neither tells."""
        from sawplan.life import fit_weibull
        from sawplan.life.end_of_life import WORN_OUT, expected_from_fit, expected_from_worn_out

        if len(self.by_type.get(blade_type, [])) >= LEAVE_OUT_BELOW:
            leave_out = None
        key = (blade_type, leave_out)
        if key not in self.cache:
            blades = [b for b in self.by_type.get(blade_type, []) if b.tag != leave_out]
            found = expected_from_worn_out([b.area_cm2 for b in blades if b.mode == WORN_OUT])
            if found is None and blades:
                fit = fit_weibull(
                    [b.area_cm2 for b in blades],
                    [b.failed for b in blades],
                    self.confidence,
                    bounds="shape",
                )
                found = expected_from_fit(fit)
            self.cache[key] = found
        return self.cache[key]

    def of(
        self, blade_type: str, material_group: str | None, leave_out: str | None = None
    ) -> ExpectedLife:
        """The type's expected life, else the typical range for the group (from memory)."""
        from sawplan.life.end_of_life import expected_from_reference
        from sawplan.store.reports import default_life

        found = self.of_type(blade_type, leave_out)
        if found is not None:
            return found
        default = default_life(material_group)
        source = say(
            "a typical life for {}, recalled from memory: low confidence until "
            "the log holds 3 other worn-out blades of this type",
            default.material_group,
        )
        return expected_from_reference(default.low_cm2, default.high_cm2, source)


def with_ends(lives: Sequence[BladeLife], confidence: float = 0.9) -> list[BladeLife]:
    """The lives with each retired blade's end judged (worn out or a failure)."""
    from sawplan.life.end_of_life import TOOTH_WEAR, end_of_life

    expected = ExpectedLives(lives, confidence)
    out = []
    for b in lives:
        if not b.failed:
            out.append(b)
            continue
        # only the words of tooth wear need the expected life to be judged
        wear = b.mode in TOOTH_WEAR
        rng = expected.of(b.blade_type, b.material_group, b.tag) if wear else None
        out.append(replace(b, end=end_of_life(b.mode, b.area_cm2, rng)))
    return out


@dataclass(frozen=True)
class Retirement:
    """A retired blade and how its life ended, against its type's expected life."""

    blade: Blade
    end: EndOfLife


def end_of(db: Database, blade: Blade, confidence: float = 0.9) -> EndOfLife | None:
    """How a retired blade's life ended (None for a blade not retired)."""
    from sawplan.life.end_of_life import end_of_life

    if blade.status != "retired":
        return None
    lives = blade_lives(db)  # a blade that cut nothing has no life to compare
    mine = next((b for b in lives if b.tag == blade.tag), None)
    group = mine.material_group if mine is not None else None
    rng = ExpectedLives(lives, confidence).of(blade.blade_type, group, blade.tag)
    return end_of_life(blade.retire_cause, blade.area_mm2 / 100.0, rng)


def retirement(db: Database, blade: Blade) -> Retirement:
    """What ``sawplan blade retire`` reports after retiring ``blade``."""
    end = end_of(db, blade)
    assert end is not None, "the blade was just retired"
    return Retirement(blade, end)
