"""``sawplan life`` from the log: lives, how they ended, suspect lots, costs, calibration.

Every retired blade is a failure in the Weibull fit (a worn-out one a failure of
wear, ``life_ends``); the failure-mode table and the early-failure warnings count
failures only.  Lots that fail early are named (``sawplan.life.lots``).
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass, field
from functools import lru_cache
from typing import TYPE_CHECKING, Any

from sawplan.display import say
from sawplan.store.calibration import CalibrationRow, calibration_table
from sawplan.store.reports import DEFAULT_CONFIDENCE, GroupLife, group_life
from sawplan.store.stats import BladeLife, blade_lives, unused_retired

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life import BladeCost, EarlyFailureWarning, ModeRanking
    from sawplan.life.lots import SuspectLot
    from sawplan.store.db import Log as Database


@dataclass(frozen=True)
class WornOut:
    """Retired blades whose teeth wore down over a normal life: wear, not failures."""

    blades: int
    recorded_worn_out: int  # retired with worn-out
    dull_at_normal_life: int  # retired dull, within or beyond their type's expected life
    worn_out_early: int  # retired worn-out below their type's expected life: dulled early


@dataclass(frozen=True)
class LifeReport:
    """``sawplan life``: the whole log's blade life, failure modes, costs, calibration."""

    confidence: float
    group_by: str | None
    groups: tuple[GroupLife, ...]
    failure_modes: ModeRanking  # failures only: worn-out blades are counted in ``worn_out``
    worn_out_blades: WornOut
    early_failure: EarlyFailureWarning | None
    suspect_lots: tuple[SuspectLot, ...]
    costs: tuple[BladeCost, ...]
    costs_missing: tuple[str, ...]  # blade types with no price or no retired blade yet
    calibration: tuple[CalibrationRow, ...]
    left_out: tuple[str, ...]  # retired before cutting anything
    notes: tuple[str, ...]
    overall: GroupLife = field(metadata={"json": False})
    lives: tuple[BladeLife, ...] = field(metadata={"json": False})
    group_keys: tuple[str, ...] = ()

    def json_extra(self) -> dict[str, Any]:
        from sawplan.render import jsonable

        flat = jsonable(self.overall)
        flat.pop("early_failure", None)
        flat.pop("key", None)
        flat.pop("keys", None)
        return flat


def life_report(
    db: Database, *, group_by: str | None = None, confidence: float = DEFAULT_CONFIDENCE
) -> LifeReport:
    """Everything ``sawplan life`` shows, from the log."""
    from sawplan.life import rank_failure_modes
    from sawplan.store.blade_groups import group_key, key_label, parse_group_by
    from sawplan.store.life_ends import with_ends

    keys = parse_group_by(group_by)
    lives = with_ends(blade_lives(db), confidence)
    overall = group_life("all blades", lives, confidence)
    groups: tuple[GroupLife, ...] = ()
    if keys:
        keyed: dict[tuple[str, ...], list[BladeLife]] = defaultdict(list)
        for b in lives:
            keyed[group_key(b, keys)].append(b)
        groups = tuple(group_life(key_label(k), keyed[k], confidence, k) for k in sorted(keyed))
    costs, missing = _costs(lives, confidence)
    notes = []
    if not lives:
        notes.append("the log holds no blade that has cut anything yet")
    failures = [b for b in lives if b.failed and b.is_failure]
    return LifeReport(
        confidence=confidence,
        group_by=",".join(keys) or None,
        group_keys=keys,
        groups=groups,
        failure_modes=rank_failure_modes([b.failure_mode for b in failures]),
        worn_out_blades=_worn_out(lives),
        early_failure=overall.early_failure,
        suspect_lots=lots_to_name(lives, confidence),
        costs=costs,
        costs_missing=missing,
        calibration=calibration_table(db),
        left_out=tuple(unused_retired(db)),
        notes=tuple(notes),
        overall=overall,
        lives=tuple(lives),
    )


def _worn_out(lives: Sequence[BladeLife]) -> WornOut:
    from sawplan.life.end_of_life import EARLY_DULL, WORN_OUT

    worn = [b for b in lives if b.failed and not b.is_failure]
    return WornOut(
        blades=len(worn),
        recorded_worn_out=sum(1 for b in worn if b.mode == WORN_OUT),
        dull_at_normal_life=sum(1 for b in worn if b.mode == EARLY_DULL),
        worn_out_early=sum(
            1 for b in lives if b.failed and b.mode == WORN_OUT and b.failure_mode == EARLY_DULL
        ),
    )


def lots_to_name(lives: Sequence[BladeLife], confidence: float) -> tuple[SuspectLot, ...]:
    """Lots whose blades fail early or die far younger than their type's other lots."""
    return _suspects(tuple(lives), confidence)


@lru_cache(maxsize=8)
def _suspects(lives: tuple[BladeLife, ...], confidence: float) -> tuple[SuspectLot, ...]:
    """The lot screen of one set of lives, kept: a forecast of several material groups (or
    saws' queues) asks it once per group, each time of the same blades."""
    from sawplan.life.lots import LotBlade, suspect_lots

    return suspect_lots(
        [
            LotBlade(b.lot, b.supplier, b.bought_on, b.blade_type, b.area_cm2, b.failed)
            for b in lives
        ],
        confidence,
    )


def _costs(lives: Sequence[BladeLife], confidence: float) -> tuple[tuple, tuple[str, ...]]:
    """Cost per area by blade type: median price ÷ (fitted mean life, else mean retired life)."""
    from sawplan.life import blade_cost_per_area, fit_weibull, rank_blade_costs

    by_type: dict[str, list[BladeLife]] = defaultdict(list)
    for b in lives:
        by_type[b.blade_type].append(b)
    costs, missing = [], []
    for blade_type in sorted(by_type):
        blades = by_type[blade_type]
        prices = sorted(b.price for b in blades if b.price is not None)
        failed = [b.area_cm2 for b in blades if b.failed]
        if not prices or not failed:
            why = "no price recorded" if not prices else "no retired blade yet"
            missing.append(say("{}: {}", blade_type, why))
            continue
        price = _median(prices)
        fit = fit_weibull(
            [b.area_cm2 for b in blades], [b.failed for b in blades], confidence, bounds="none"
        )
        costs.append(blade_cost_per_area(blade_type, price, fit=fit, lives_cm2=failed))
    return rank_blade_costs(costs), tuple(missing)


def _median(values: Sequence[float]) -> float:
    import statistics

    return float(statistics.median(values))
