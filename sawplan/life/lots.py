"""Blade lots that fail early or die young, named before they ruin the next job.

A lot (one supplier's batch of blades) is suspect when

- its Weibull shape interval lies wholly below 1: its blades fail early, which
  points to the lot or to how it was fitted (break-in, tension) rather than to
  wear (the usual reading of a Weibull shape below 1); or
- its median life is far below that of the other lots of its blade type: under
  ``FAR_BELOW`` of theirs, with the upper bound of its median's interval below
  their median too, so a few unlucky blades do not name a lot.

The fits are the censored Weibull fits of ``sawplan.life.weibull``; a lot with
fewer than two failed blades cannot be judged yet.  Pure: plain records in,
frozen dataclasses out.
"""

from __future__ import annotations

from collections import Counter, defaultdict
from collections.abc import Sequence
from dataclasses import dataclass

from sawplan.display import Q, fmt_number, fmt_percent, say
from sawplan.life.weibull import WeibullFit, fit_weibull, quantile_interval

FAR_BELOW = 0.5  # a median under half the other lots' is far below (sawplan's rule)


@dataclass(frozen=True)
class LotBlade:
    """One blade as the lot screen sees it."""

    lot: str | None
    supplier: str | None
    bought_on: str | None
    blade_type: str
    area_cm2: float
    failed: bool


@dataclass(frozen=True)
class SuspectLot:
    """A lot whose blades fail early or live far shorter than their type's other lots."""

    lot: str
    supplier: str | None
    bought_on: str | None  # the purchase date, or the first and last of several
    blade_type: str
    blades: int
    failed: int
    shape: float
    shape_ci: tuple[float, float]
    median_life_cm2: float
    median_ci_cm2: tuple[float, float]
    others_median_cm2: float | None  # the other lots of its blade type
    others_blades: int
    fails_early: bool  # the whole shape interval is below 1
    far_below: bool  # its median is far below the other lots'
    message: str

    @property
    def label(self) -> str:
        """``lot T-3309 (west depot, bought 2026-04-06)``."""
        return lot_label(self.lot, self.supplier, self.bought_on)


def lot_label(lot: str, supplier: str | None, bought_on: str | None) -> str:
    extra = [p for p in (supplier, f"bought {bought_on}" if bought_on else None) if p]
    return f"lot {lot}" + (f" ({', '.join(extra)})" if extra else "")


def suspect_lots(blades: Sequence[LotBlade], confidence: float = 0.9) -> tuple[SuspectLot, ...]:
    """Every lot that fails early or whose median life is far below its type's other lots."""
    lots: dict[tuple[str, str | None], list[LotBlade]] = defaultdict(list)
    for b in blades:
        if b.lot:
            lots[(b.lot, b.supplier)].append(b)
    found = []
    for (lot, supplier), members in sorted(lots.items(), key=lambda kv: (kv[0][0], str(kv[0][1]))):
        judged = _judge(lot, supplier, members, blades, confidence)
        if judged is not None:
            found.append(judged)
    return tuple(found)


def _judge(
    lot: str,
    supplier: str | None,
    members: list[LotBlade],
    everyone: Sequence[LotBlade],
    confidence: float,
) -> SuspectLot | None:
    lives, flags = [b.area_cm2 for b in members], [b.failed for b in members]
    fit = fit_weibull(lives, flags, confidence, bounds="shape")
    if not isinstance(fit, WeibullFit):
        return None
    blade_type = Counter(b.blade_type for b in members).most_common(1)[0][0]
    others = [
        b for b in everyone if b.blade_type == blade_type and (b.lot, b.supplier) != (lot, supplier)
    ]
    others_fit = (
        fit_weibull(
            [b.area_cm2 for b in others], [b.failed for b in others], confidence, bounds="none"
        )
        if others
        else None
    )
    others_median = others_fit.median_life_cm2 if isinstance(others_fit, WeibullFit) else None
    fails_early = fit.early_failures_confirmed()
    short = others_median is not None and fit.median_life_cm2 < FAR_BELOW * others_median
    if not (fails_early or short):
        return None
    median_ci = quantile_interval(lives, flags, fit, 0.5)  # slow: only for a lot in question
    far_below = short and others_median is not None and median_ci[1] < others_median
    if not (fails_early or far_below):
        return None
    days = sorted({b.bought_on for b in members if b.bought_on})
    bought = None if not days else days[0] if len(days) == 1 else f"{days[0]} to {days[-1]}"
    return SuspectLot(
        lot=lot,
        supplier=supplier,
        bought_on=bought,
        blade_type=blade_type,
        blades=fit.n,
        failed=fit.failures,
        shape=fit.shape,
        shape_ci=fit.shape_ci,
        median_life_cm2=fit.median_life_cm2,
        median_ci_cm2=median_ci,
        others_median_cm2=others_median,
        others_blades=len(others),
        fails_early=fails_early,
        far_below=far_below,
        message=_message(fit, fails_early, far_below, others_median, len(others), blade_type),
    )


def _message(
    fit: WeibullFit,
    fails_early: bool,
    far_below: bool,
    others_median: float | None,
    others: int,
    blade_type: str,
) -> str:
    lo, hi = fit.shape_ci
    shape = say(
        "Weibull shape {} ({} interval {}-{})",
        fmt_number(fit.shape, 2),
        fmt_percent(fit.confidence),
        fmt_number(lo, 2),
        fmt_number(hi, 2),
    )
    head = say("{} blades, {} retired", fit.n, fit.failures)
    median = say("median life {}", Q("area", fit.median_life_cm2 * 100.0))
    if others_median is not None:
        median = say(
            "{} against {} for the {} blades of other lots of {}",
            median,
            Q("area", others_median * 100.0),
            others,
            blade_type,
        )
    verdicts = []
    if fails_early:
        verdicts.append("the whole shape interval is below 1: its blades fail early")
    if far_below:
        verdicts.append(
            say("its median life is under {} of the other lots'", fmt_percent(FAR_BELOW))
        )
    return say(
        "{}; {}; {}; {}", head, shape, median, say("; ".join("{}" for _ in verdicts), *verdicts)
    )
