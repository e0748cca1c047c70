"""Blade-life answers from the log: group lives, the life plans rest on, forecasts.

This module reads the log (``stats``) and hands plain lists to the pure
``sawplan.life`` core; it adds what only the log knows (which blades belong
together, which group a blade cut most) and the documented default lives used
when the log holds too little history.

Default lives (**from memory**, low confidence — calibrate with your
own log): mild (carbon) steel ≈ 10⁴ in²; austenitic stainless 2–5 × 10³ in²
(the middle, 3.5 × 10³ in², is used); nickel alloys ≈ 10³ in².  Other groups
have no recalled figure and fall back to the mild-steel life, said so
in the answer.
"""

from __future__ import annotations

import math
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, NamedTuple

from sawplan.display import Q, say
from sawplan.errors import BadDataError
from sawplan.store.stats import BladeLife, blade_lives

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life import EarlyFailureWarning, Forecast, WeibullFit
    from sawplan.store.blade_groups import BladeChoice
    from sawplan.store.db import Log as Database

IN2_CM2 = 6.4516  # 1 in² = 6.4516 cm² exactly (1 in = 2.54 cm)
DEFAULT_CONFIDENCE = 0.9
FALLBACK_GROUP = "carbon-steel"

# group -> (life, low, high in in², where the numbers come from); a single figure
# ("≈ 10⁴ in²") is taken as the range from half to twice it
DEFAULT_LIVES_IN2: dict[str, tuple[float, float, float, str]] = {
    "carbon-steel": (1.0e4, 5.0e3, 2.0e4, "typical life, mild steel ≈ 10⁴ in² (from memory)"),
    "austenitic-stainless": (
        3.5e3,
        2.0e3,
        5.0e3,
        "typical life, austenitic stainless 2–5 × 10³ in², middle value (from memory)",
    ),
    "nickel-alloy": (1.0e3, 5.0e2, 2.0e3, "typical life, nickel alloys ≈ 10³ in² (from memory)"),
}


@dataclass(frozen=True)
class DefaultLife:
    """A typical life used when the log cannot answer, with its source."""

    material_group: str
    life_cm2: float
    source: str
    fallback: bool  # True when the group has no figure of its own
    low_cm2: float = 0.0  # the typical range (half to twice a single figure)
    high_cm2: float = 0.0


def default_life(material_group: str | None) -> DefaultLife:
    """Typical life of a group (from memory); other groups take mild steel's."""
    group = material_group or FALLBACK_GROUP
    if group in DEFAULT_LIVES_IN2:
        life_in2, low, high, source = DEFAULT_LIVES_IN2[group]
        return DefaultLife(group, life_in2 * IN2_CM2, source, False, low * IN2_CM2, high * IN2_CM2)
    life_in2, low, high, source = DEFAULT_LIVES_IN2[FALLBACK_GROUP]
    return DefaultLife(
        group,
        life_in2 * IN2_CM2,
        f"no typical life recalled for {group}; {source} used instead",
        True,
        low * IN2_CM2,
        high * IN2_CM2,
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
    worn_out: int = 0  # retired blades worn out at the end of a normal life (of ``failed``)
    keys: tuple[str, ...] = ()  # the values of the --group-by keys


def group_life(
    key: str, lives: Sequence[BladeLife], confidence: float, keys: tuple[str, ...] = ()
) -> GroupLife:
    """Fit a censored Weibull to one set of blades and say what it means.

    Every retired blade is a failure in the fit, a worn-out one a failure of wear;
    the early-failure warning looks at the failures only.
    """
    from sawplan.life import early_failure_warning, fit_weibull

    failed = [b for b in lives if b.failed]
    if not lives:
        return _unfitted(key, lives, failed, "no blades", None, keys)
    fit = fit_weibull([b.area_cm2 for b in lives], [b.failed for b in lives], confidence)
    if not fit.fitted:
        return _unfitted(key, lives, failed, fit.reason, fit, keys)
    failures = [b for b in failed if b.is_failure]
    warning = early_failure_warning(
        fit, [b.failure_mode for b in failures], [b.area_cm2 for b in failures]
    )
    return GroupLife(
        key=key,
        keys=keys,
        worn_out=len(failed) - len(failures),
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
    key: str,
    lives: Sequence[BladeLife],
    failed: Sequence[BladeLife],
    reason: str,
    fit: Any,
    keys: tuple[str, ...] = (),
) -> GroupLife:
    return GroupLife(
        key=key,
        keys=keys,
        worn_out=sum(1 for b in failed if not b.is_failure),
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


# --- life for planning and forecasts -----------------------------------------------------


class LifeBasis(NamedTuple):
    """What a plan should assume about blade life for one material group.

    ``fit`` is the group's censored Weibull fit from the log (None when the log
    cannot give one); ``default`` is the typical life (from memory) to use then.
    ``warning`` names an early-failing lot that holds much of the blades behind
    the fit, and ``fit_without`` is the fit with that lot left out.
    """

    fit: WeibullFit | None
    default: DefaultLife
    blades: int
    failed: int
    note: str
    choice: str = "all blades"  # which blades the life comes from, in words
    warning: str | None = None
    lot_named: str | None = None  # the lot the warning names
    fit_without: WeibullFit | None = None


DOMINANT_SHARE = 1 / 3  # an early-failing lot holding a third of the blades weighs on the fit


def life_basis(
    db: Database,
    material_group: str | None,
    confidence: float = DEFAULT_CONFIDENCE,
    choice: BladeChoice | None = None,
) -> LifeBasis:
    """The log's life for a material group, from the chosen blades (lots, suppliers)."""
    from sawplan.store.blade_groups import BladeChoice, check_choice, choose

    choice = choice or BladeChoice()
    check_choice(db, choice)
    everyone = blade_lives(db)
    lives = choose(everyone, choice)
    if material_group is not None:
        lives = [b for b in lives if b.material_group == material_group]
    label = material_group or "all material groups"
    gl = group_life(label, lives, confidence)
    fallback = default_life(material_group)
    chosen = choice.words()
    if gl.fitted:
        note = say(
            "blade log: {} blades ({} retired) cutting mostly {}; {}",
            gl.blades,
            gl.failed,
            label,
            chosen if choice.chosen else "all lots and suppliers",
        )
        warning, lot, without = _dominant_lot(everyone, lives, confidence)
        return LifeBasis(gl.fit, fallback, gl.blades, gl.failed, note, chosen, warning, lot,
                         without)  # fmt: skip
    why = gl.reason or "no blades"
    if choice.chosen:
        why = say("{}, {}", why, chosen)
    note = say(
        "not enough history for {} ({}); default life {} ({}) — calibrate by logging blades",
        label,
        why,
        Q("area", fallback.life_cm2 * 100.0),
        fallback.source,
    )
    return LifeBasis(None, fallback, gl.blades, gl.failed, note, chosen)


def _dominant_lot(
    everyone: Sequence[BladeLife], lives: Sequence[BladeLife], confidence: float
) -> tuple[str | None, str | None, WeibullFit | None]:
    """(warning, lot, fit without it) when an early-failing lot holds much of ``lives``."""
    from sawplan.life import fit_weibull
    from sawplan.life.lots import lot_label

    shares = []
    from sawplan.store.life_report import lots_to_name

    for lot in lots_to_name(everyone, confidence):
        mine = [b for b in lives if (b.lot, b.supplier) == (lot.lot, lot.supplier)]
        if mine and len(mine) >= DOMINANT_SHARE * len(lives):
            shares.append((len(mine), lot))
    if not shares:
        return None, None, None
    count, lot = max(shares, key=lambda s: s[0])
    rest = [b for b in lives if (b.lot, b.supplier) != (lot.lot, lot.supplier)]
    without = fit_weibull(
        [b.area_cm2 for b in rest], [b.failed for b in rest], confidence, bounds="none"
    )
    verdict = "fails early" if lot.fails_early else "dies far younger than its type's other lots"
    warning = say(
        "{} {} (`sawplan life` names it) and holds {} of the {} blades behind this life; "
        "leave it out with --without-lot {}",
        lot_label(lot.lot, lot.supplier, lot.bought_on),
        verdict,
        count,
        len(lives),
        lot.lot,
    )
    return warning, lot.lot, without if without.fitted else None


def life_for(
    db_path: str | os.PathLike[str] | None,
    material_group: str | None,
    confidence: float = DEFAULT_CONFIDENCE,
    choice: BladeChoice | None = None,
) -> LifeBasis:
    """``(fit or None, default life, blades, failed, note, ...)`` for planning's blades on hand."""
    from sawplan.store.db import connect

    with connect(db_path, create=False, light=True) as db:
        return life_basis(db, material_group, confidence, choice)


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
    blades_from: str = "all blades"  # which blades of the log the life comes from
    lot_warning: str | None = None  # an early-failing lot that weighs on the life
    lot_named: str | None = None
    blades_needed_without_lot: int | None = None  # the count with that lot left out


def forecast_area(
    db: Database,
    area_cm2: float,
    *,
    material: str | None = None,
    material_group: str | None = None,
    confidence: float = DEFAULT_CONFIDENCE,
    life_cm2: float | None = None,
    choice: BladeChoice | None = None,
) -> BladeForecast:
    """Blades needed for ``area_cm2``: the log's fit when it has one, else a default life."""
    from sawplan.life import forecast_blades

    if not (math.isfinite(area_cm2) and area_cm2 > 0):
        raise BadDataError(f"must be above 0, got {area_cm2:g} cm²", field="area")
    basis = life_basis(db, material_group, confidence, choice)
    without = None
    if life_cm2 is not None:
        fc = forecast_blades(area_cm2, None, deterministic_life_cm2=life_cm2, confidence=confidence)
        note = say("life given: {} per blade", Q("area", life_cm2 * 100.0))
        source, used = "given", life_cm2
    elif basis.fit is not None:
        fc = forecast_blades(area_cm2, basis.fit, confidence=confidence)
        source, used, note = "blade log", None, basis.note
        if basis.fit_without is not None:
            without = forecast_blades(area_cm2, basis.fit_without, confidence=confidence)
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
        blades_from="" if source == "given" else basis.choice,
        lot_warning=basis.warning if source == "blade log" else None,
        lot_named=basis.lot_named if source == "blade log" else None,
        blades_needed_without_lot=without.blades_needed if without is not None else None,
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
    choice: BladeChoice | None = None,
) -> JobForecast:
    """Hook for job files: total cut area per material group → blades needed.

    ``sawplan.cutlist`` computes the areas from a job file and calls this; it
    opens the log and asks ``forecast_areas``.
    """
    from sawplan.store.db import connect

    if not area_by_group_cm2:
        raise BadDataError("the job has no cut area", field="job")
    with connect(db_path, create=False) as db:
        return forecast_areas(db, area_by_group_cm2, confidence=confidence, choice=choice)


def forecast_areas(
    db: Database,
    area_by_group_cm2: Mapping[str, float],
    *,
    confidence: float = DEFAULT_CONFIDENCE,
    choice: BladeChoice | None = None,
) -> JobForecast:
    """Blades needed for cut areas of several material groups, on an open log.

    Each group is forecast on its own for the table; the total follows
    ``sawplan plan``: one blade cuts every group, so the areas are put on the
    scale of the group that wears blades most (other groups scaled by the
    ratio of mean lives) and forecast once.
    """
    if not area_by_group_cm2:
        raise BadDataError("no cut area to forecast", field="area")
    parts = tuple(
        forecast_area(db, area, material_group=group, confidence=confidence, choice=choice)
        for group, area in sorted(area_by_group_cm2.items())
    )
    lives = {p.material_group: _mean_life_cm2(p) for p in parts}
    wear = {p.material_group: p.area_cm2 / lives[p.material_group] for p in parts}
    ref = max(wear, key=wear.get)
    total = parts[0].blades_needed
    if len(parts) > 1:
        equivalent_cm2 = sum(wear.values()) * lives[ref]
        total = forecast_area(
            db, equivalent_cm2, material_group=ref, confidence=confidence, choice=choice
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
