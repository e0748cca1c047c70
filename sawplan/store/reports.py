"""Blade-life answers from the log: life summary, forecasts, calibration factors.

This module reads the log (``stats``) and hands plain lists to the pure
``sawplan.life`` core; it adds what only the log knows (which blades belong
together, which group a blade cut most) and the documented default lives used
when the log holds too little history.

Default lives (reference §7, **memory**, low confidence — calibrate with your
own log): mild (carbon) steel ≈ 10⁴ in²; austenitic stainless 2–5 × 10³ in²
(the middle, 3.5 × 10³ in², is used); nickel alloys ≈ 10³ in².  Other groups
have no figure in the reference and fall back to the mild-steel life, said so
in the answer.
"""

from __future__ import annotations

import difflib
import math
import os
from collections import defaultdict
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, NamedTuple

from sawplan.display import Q, say
from sawplan.errors import BadDataError, UsageError
from sawplan.store.stats import BladeLife, blade_lives, timed_cuts, unused_retired

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life import (
        BladeCost,
        EarlyFailureWarning,
        Forecast,
        ModeRanking,
        WeibullFit,
    )
    from sawplan.store.db import Log as Database

IN2_CM2 = 6.4516  # 1 in² = 6.4516 cm² exactly (1 in = 2.54 cm)
DEFAULT_CONFIDENCE = 0.9
GROUP_BY = ("blade-type", "material-group")
FALLBACK_GROUP = "carbon-steel"

# group -> (life in in², where the number comes from)
DEFAULT_LIVES_IN2: dict[str, tuple[float, str]] = {
    "carbon-steel": (1.0e4, "reference §7, mild steel ≈ 10⁴ in² (memory)"),
    "austenitic-stainless": (
        3.5e3,
        "reference §7, austenitic stainless 2–5 × 10³ in², middle value (memory)",
    ),
    "nickel-alloy": (1.0e3, "reference §7, nickel alloys ≈ 10³ in² (memory)"),
}


@dataclass(frozen=True)
class DefaultLife:
    """A typical life used when the log cannot answer, with its source."""

    material_group: str
    life_cm2: float
    source: str
    fallback: bool  # True when the group has no figure of its own


def default_life(material_group: str | None) -> DefaultLife:
    """Reference §7 typical life of a group (memory); other groups take mild steel's."""
    group = material_group or FALLBACK_GROUP
    if group in DEFAULT_LIVES_IN2:
        life_in2, source = DEFAULT_LIVES_IN2[group]
        return DefaultLife(group, life_in2 * IN2_CM2, source, False)
    life_in2, source = DEFAULT_LIVES_IN2[FALLBACK_GROUP]
    return DefaultLife(
        group,
        life_in2 * IN2_CM2,
        f"no typical life for {group} in the reference; {source} used instead",
        True,
    )


# --- one group's life ------------------------------------------------------------------


@dataclass(frozen=True)
class GroupLife:
    """Life of one set of blades (all, one blade type or one material group)."""

    key: str
    blades: int
    failed: int
    censored: int
    fitted: bool
    weibull_shape: float | None
    weibull_scale_cm2: float | None
    median_life_cm2: float | None
    b10_life_cm2: float | None
    mean_life_cm2: float | None
    shape_ci: tuple[float, float] | None
    b10_ci_cm2: tuple[float, float] | None
    reason: str | None  # why there is no fit
    mean_failure_life_cm2: float | None
    early_failure: EarlyFailureWarning | None
    fit: Any = field(default=None, metadata={"json": False})


def group_life(key: str, lives: Sequence[BladeLife], confidence: float) -> GroupLife:
    """Fit a censored Weibull to one set of blades and say what it means."""
    from sawplan.life import early_failure_warning, fit_weibull

    failed = [b for b in lives if b.failed]
    if not lives:
        return _unfitted(key, lives, failed, "no blades", None)
    fit = fit_weibull([b.area_cm2 for b in lives], [b.failed for b in lives], confidence)
    if not fit.fitted:
        return _unfitted(key, lives, failed, fit.reason, fit)
    warning = early_failure_warning(fit, [b.mode for b in failed], [b.area_cm2 for b in failed])
    return GroupLife(
        key=key,
        blades=len(lives),
        failed=len(failed),
        censored=len(lives) - len(failed),
        fitted=True,
        weibull_shape=fit.shape,
        weibull_scale_cm2=fit.scale_cm2,
        median_life_cm2=fit.median_life_cm2,
        b10_life_cm2=fit.b10_life_cm2,
        mean_life_cm2=fit.mean_life_cm2,
        shape_ci=fit.shape_ci,
        b10_ci_cm2=fit.b10_ci_cm2,
        reason=None,
        mean_failure_life_cm2=_mean_area(failed),
        early_failure=warning,
        fit=fit,
    )


def _unfitted(
    key: str, lives: Sequence[BladeLife], failed: Sequence[BladeLife], reason: str, fit: Any
) -> GroupLife:
    return GroupLife(
        key=key,
        blades=len(lives),
        failed=len(failed),
        censored=len(lives) - len(failed),
        fitted=False,
        weibull_shape=None,
        weibull_scale_cm2=None,
        median_life_cm2=None,
        b10_life_cm2=None,
        mean_life_cm2=None,
        shape_ci=None,
        b10_ci_cm2=None,
        reason=reason,
        mean_failure_life_cm2=_mean_area(failed),
        early_failure=None,
        fit=fit,
    )


def _mean_area(blades: Sequence[BladeLife]) -> float | None:
    return sum(b.area_cm2 for b in blades) / len(blades) if blades else None


# --- the life report ---------------------------------------------------------------------


@dataclass(frozen=True)
class CalibrationRow:
    saw: str | None
    material_group: str | None
    cuts: int
    factor: float | None  # actual ÷ predicted (median of ratios); None while pending
    low: float | None
    high: float | None
    needed: int


@dataclass(frozen=True)
class LifeReport:
    """``sawplan life``: the whole log's blade life, failure modes, costs, calibration."""

    confidence: float
    group_by: str | None
    groups: tuple[GroupLife, ...]
    failure_modes: ModeRanking
    early_failure: EarlyFailureWarning | None
    costs: tuple[BladeCost, ...]
    costs_missing: tuple[str, ...]  # blade types with no price or no retired blade yet
    calibration: tuple[CalibrationRow, ...]
    left_out: tuple[str, ...]  # retired before cutting anything
    notes: tuple[str, ...]
    overall: GroupLife = field(metadata={"json": False})
    lives: tuple[BladeLife, ...] = field(metadata={"json": False})

    def json_extra(self) -> dict[str, Any]:
        from sawplan.render import jsonable

        flat = jsonable(self.overall)
        flat.pop("early_failure", None)
        flat.pop("key", None)
        return flat


def life_report(
    db: Database, *, group_by: str | None = None, confidence: float = DEFAULT_CONFIDENCE
) -> LifeReport:
    """Everything ``sawplan life`` shows, from the log."""
    from sawplan.life import rank_failure_modes

    if group_by is not None and group_by not in GROUP_BY:
        close = difflib.get_close_matches(group_by.strip().lower(), GROUP_BY, n=1)
        raise UsageError(
            f"must be one of {', '.join(GROUP_BY)}, got {group_by!r}",
            field="group-by",
            hint=f"did you mean {close[0]}?" if close else None,
        )
    lives = blade_lives(db)
    overall = group_life("all blades", lives, confidence)
    groups: tuple[GroupLife, ...] = ()
    if group_by is not None:
        keyed: dict[str, list[BladeLife]] = defaultdict(list)
        for b in lives:
            k = b.blade_type if group_by == "blade-type" else (b.material_group or "unknown")
            keyed[k].append(b)
        groups = tuple(group_life(k, keyed[k], confidence) for k in sorted(keyed))
    costs, missing = _costs(lives, confidence)
    notes = []
    if not lives:
        notes.append("the log holds no blade that has cut anything yet")
    return LifeReport(
        confidence=confidence,
        group_by=group_by,
        groups=groups,
        failure_modes=rank_failure_modes([b.mode for b in lives if b.failed]),
        early_failure=overall.early_failure,
        costs=costs,
        costs_missing=missing,
        calibration=calibration_table(db),
        left_out=tuple(unused_retired(db)),
        notes=tuple(notes),
        overall=overall,
        lives=tuple(lives),
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
        fit = fit_weibull([b.area_cm2 for b in blades], [b.failed for b in blades], confidence)
        costs.append(blade_cost_per_area(blade_type, price, fit=fit, lives_cm2=failed))
    return rank_blade_costs(costs), tuple(missing)


def _median(values: Sequence[float]) -> float:
    import statistics

    return float(statistics.median(values))


# --- calibration -------------------------------------------------------------------------


def calibration_table(db: Database) -> tuple[CalibrationRow, ...]:
    """actual ÷ predicted cut time per saw and material group, from the latest 200 timed cuts
    of each (reported from 3 cuts on)."""
    from sawplan.life import calibration_factors

    cuts = timed_cuts(db)
    if not cuts:
        return ()
    summary = calibration_factors(
        [c.time_min for c in cuts],
        [c.predicted_time_min for c in cuts],
        [(c.saw, c.material_group) for c in cuts],
    )
    rows = [
        CalibrationRow(f.key[0], f.key[1], f.n, f.factor, f.low, f.high, summary.min_count)
        for f in summary.factors
    ]
    rows += [
        CalibrationRow(p.key[0], p.key[1], p.n, None, None, None, p.needed) for p in summary.pending
    ]
    return tuple(sorted(rows, key=lambda r: (str(r.saw), str(r.material_group))))


def calibration_factor(
    db_path: str | os.PathLike[str] | None, saw_name: str, material_group: str
) -> tuple[float, int] | None:
    """Actual ÷ predicted cut time on this saw for this group, and the number of cuts.

    None until the log holds at least 3 cuts with both times; only the latest 200
    count (``stats.timed_cuts``).  The factor is the
    median of the per-cut ratios (``sawplan.life.calibration_factors``).
    """
    from sawplan.life import calibration_factors
    from sawplan.store.db import connect

    with connect(db_path, create=False, light=True) as db:
        cuts = timed_cuts(db, saw=saw_name, material_group=material_group)
    if not cuts:
        return None
    summary = calibration_factors([c.time_min for c in cuts], [c.predicted_time_min for c in cuts])
    if not summary.factors:
        return None
    return summary.factors[0].factor, summary.factors[0].n


# --- life for planning and forecasts -----------------------------------------------------


class LifeBasis(NamedTuple):
    """What a plan should assume about blade life for one material group.

    ``fit`` is the group's censored Weibull fit from the log (None when the log
    cannot give one); ``default`` is the reference §7 typical life to use then.
    """

    fit: WeibullFit | None
    default: DefaultLife
    blades: int
    failed: int
    note: str


def life_basis(
    db: Database, material_group: str | None, confidence: float = DEFAULT_CONFIDENCE
) -> LifeBasis:
    lives = blade_lives(db)
    if material_group is not None:
        lives = [b for b in lives if b.material_group == material_group]
    label = material_group or "all material groups"
    gl = group_life(label, lives, confidence)
    fallback = default_life(material_group)
    if gl.fitted:
        note = f"blade log: {gl.blades} blades ({gl.failed} retired) cutting mostly {label}"
        return LifeBasis(gl.fit, fallback, gl.blades, gl.failed, note)
    why = gl.reason or "no blades"
    note = say(
        "not enough history for {} ({}); default life {} ({}) — calibrate by logging blades",
        label,
        why,
        Q("area", fallback.life_cm2 * 100.0),
        fallback.source,
    )
    return LifeBasis(None, fallback, gl.blades, gl.failed, note)


def life_for(
    db_path: str | os.PathLike[str] | None,
    material_group: str | None,
    confidence: float = DEFAULT_CONFIDENCE,
) -> LifeBasis:
    """``(fit or None, default life, blades, failed, note)`` for planning's blades on hand."""
    from sawplan.store.db import connect

    with connect(db_path, create=False) as db:
        return life_basis(db, material_group, confidence)


@dataclass(frozen=True)
class BladeForecast:
    """Blades needed to cut an area, and what life that assumes."""

    area_cm2: float
    material: str | None
    material_group: str | None
    blades_needed: int
    expected_blades: float
    confidence: float
    achieved_probability: float
    method: str
    life_source: str  # "blade log" | "default" | "given"
    life_cm2: float | None  # the fixed life used by a deterministic count
    weibull_shape: float | None
    weibull_scale_cm2: float | None
    history_blades: int
    history_failed: int
    note: str
    forecast: Forecast = field(metadata={"json": False})


def forecast_area(
    db: Database,
    area_cm2: float,
    *,
    material: str | None = None,
    material_group: str | None = None,
    confidence: float = DEFAULT_CONFIDENCE,
    life_cm2: float | None = None,
) -> BladeForecast:
    """Blades needed for ``area_cm2``: the log's fit when it has one, else a default life."""
    from sawplan.life import forecast_blades

    if not (math.isfinite(area_cm2) and area_cm2 > 0):
        raise BadDataError(f"must be above 0, got {area_cm2:g} cm²", field="area")
    basis = life_basis(db, material_group, confidence)
    if life_cm2 is not None:
        fc = forecast_blades(area_cm2, None, deterministic_life_cm2=life_cm2, confidence=confidence)
        source, used, note = "given", life_cm2, f"life given: {life_cm2:,.0f} cm² per blade"
    elif basis.fit is not None:
        fc = forecast_blades(area_cm2, basis.fit, confidence=confidence)
        source, used, note = "blade log", None, basis.note
    else:
        used = basis.default.life_cm2
        fc = forecast_blades(area_cm2, None, deterministic_life_cm2=used, confidence=confidence)
        source, note = "default", basis.note
    fit = basis.fit if source == "blade log" else None
    return BladeForecast(
        area_cm2=area_cm2,
        material=material,
        material_group=material_group,
        blades_needed=fc.blades_needed,
        expected_blades=fc.expected_blades,
        confidence=confidence,
        achieved_probability=fc.achieved_probability,
        method=fc.method,
        life_source=source,
        life_cm2=used,
        weibull_shape=fit.shape if fit else None,
        weibull_scale_cm2=fit.scale_cm2 if fit else None,
        history_blades=basis.blades,
        history_failed=basis.failed,
        note=note,
        forecast=fc,
    )


@dataclass(frozen=True)
class JobForecast:
    """Blades needed per material group for a whole job, and the total."""

    groups: tuple[BladeForecast, ...]
    blades_needed: int
    area_cm2: float
    confidence: float
    combined_on: str | None = None  # the group whose life scale the total uses


def forecast_job(
    db_path: str | os.PathLike[str] | None,
    area_by_group_cm2: Mapping[str, float],
    *,
    confidence: float = DEFAULT_CONFIDENCE,
) -> JobForecast:
    """Hook for job files: total cut area per material group → blades needed.

    Each group is forecast on its own for the table; the total follows
    ``sawplan plan``: one blade cuts every group, so the areas are put on the
    scale of the group that wears blades most (other groups scaled by the
    ratio of mean lives) and forecast once.  ``sawplan.cutlist`` computes the
    areas from a job file and calls this.
    """
    from sawplan.store.db import connect

    if not area_by_group_cm2:
        raise BadDataError("the job has no cut area", field="job")
    with connect(db_path, create=False) as db:
        parts = tuple(
            forecast_area(db, area, material_group=group, confidence=confidence)
            for group, area in sorted(area_by_group_cm2.items())
        )
        lives = {p.material_group: _mean_life_cm2(p) for p in parts}
        wear = {p.material_group: p.area_cm2 / lives[p.material_group] for p in parts}
        ref = max(wear, key=wear.get)
        total = parts[0].blades_needed
        if len(parts) > 1:
            equivalent_cm2 = sum(wear.values()) * lives[ref]
            total = forecast_area(
                db, equivalent_cm2, material_group=ref, confidence=confidence
            ).blades_needed
    return JobForecast(
        groups=parts,
        blades_needed=total,
        area_cm2=sum(p.area_cm2 for p in parts),
        confidence=confidence,
        combined_on=ref if len(parts) > 1 else None,
    )


def _mean_life_cm2(p: BladeForecast) -> float:
    """Mean blade life behind a forecast: η·Γ(1 + 1/β) for a fit, else the life used."""
    if p.weibull_shape and p.weibull_scale_cm2:
        return p.weibull_scale_cm2 * math.gamma(1.0 + 1.0 / p.weibull_shape)
    return float(p.life_cm2)
