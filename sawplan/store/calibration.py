"""Cut-time calibration from the log: the shop's actual ÷ model time per saw and group.

Each timed entry (one cut, or a batch of identical cuts with its total time)
gives one ratio of actual to model time; the factor is the median of the
ratios of the latest 200 entries per saw and material group
(``sawplan.life.calibration_factors``).  Tables and notes count both the
entries and the cuts they hold.
"""

from __future__ import annotations

import os
from collections import defaultdict
from dataclasses import dataclass
from typing import TYPE_CHECKING, NamedTuple

from sawplan.store.stats import timed_cuts

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.db import Log as Database


@dataclass(frozen=True)
class CalibrationRow:
    saw: str | None
    material_group: str | None
    entries: int  # timed log entries behind the factor (a batch of cuts is one entry)
    cuts: int  # the cuts those entries hold
    factor: float | None  # actual ÷ predicted (median of ratios); None while pending
    low: float | None
    high: float | None
    needed: int  # entries needed before the factor is used


def calibration_table(db: Database) -> tuple[CalibrationRow, ...]:
    """actual ÷ predicted cut time per saw and material group, from the latest 200 timed
    entries of each (reported from 3 entries on); each row counts its entries and cuts."""
    from sawplan.life import calibration_factors

    entries = timed_cuts(db)
    if not entries:
        return ()
    summary = calibration_factors(
        [c.time_min for c in entries],
        [c.predicted_time_min for c in entries],
        [(c.saw, c.material_group) for c in entries],
    )
    cuts: dict[tuple, int] = defaultdict(int)
    for c in entries:
        cuts[(c.saw, c.material_group)] += c.count
    rows = [
        CalibrationRow(f.key[0], f.key[1], f.n, cuts[f.key], f.factor, f.low, f.high,
                       summary.min_count)
        for f in summary.factors
    ]  # fmt: skip
    rows += [
        CalibrationRow(p.key[0], p.key[1], p.n, cuts[p.key], None, None, None, p.needed)
        for p in summary.pending
    ]
    return tuple(sorted(rows, key=lambda r: (str(r.saw), str(r.material_group))))


class Calibration(NamedTuple):
    """A saw's actual ÷ model cut time for one material group, and what it rests on."""

    factor: float
    entries: int  # timed log entries (a batch of cuts is one entry)
    cuts: int  # the cuts those entries hold


def calibration_factor(
    db_path: str | os.PathLike[str] | None, saw_name: str, material_group: str
) -> Calibration | None:
    """Actual ÷ predicted cut time on this saw for this group, with its entries and cuts.

    None until the log holds at least 3 entries with both times; only the latest
    200 count (``stats.timed_cuts``).  The factor is the median of the per-entry
    ratios (``sawplan.life.calibration_factors``).
    """
    from sawplan.store.db import connect

    with connect(db_path, create=False, light=True) as db:
        return calibration_of(db, saw_name, material_group)


def calibration_of(db: Database, saw_name: str, material_group: str) -> Calibration | None:
    """``calibration_factor`` on a log already open (the station's)."""
    from sawplan.life import calibration_factors

    entries = timed_cuts(db, saw=saw_name, material_group=material_group)
    if not entries:
        return None
    summary = calibration_factors(
        [c.time_min for c in entries], [c.predicted_time_min for c in entries]
    )
    if not summary.factors:
        return None
    found = summary.factors[0]
    return Calibration(found.factor, found.n, sum(c.count for c in entries))
