"""Blade failure modes, their usual causes, and the early-failure warning.

The table lives in ``data/failure_modes.csv`` (code, plain name, kind, usual
causes, source; common practice).  It is the vocabulary of how a
blade's life ends: ``worn-out`` (kind ``wear``: the normal end of a life, no
causes) and the failures.  A shape β < 1 says blades fail young from set-up
problems rather than wear (the usual reading of a Weibull shape); the warning then names the most
frequent failure mode among the early failures with its usual causes.  Worn-out
blades are never early failures: callers leave them out (``end_of_life``).
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass
from functools import lru_cache

from sawplan.display import Q, say
from sawplan.errors import BadDataError
from sawplan.life.weibull import WeibullFit, WeibullNotFitted

# General set-up checks behind early failures (common practice).
SETUP_CHECKS: tuple[str, ...] = (
    say(
        "break-in of each new blade: normal band speed, reduced feed, raised step by step "
        "over the first {} to {} of cut",
        Q("area", 30_000.0),
        Q("area", 65_000.0),
    ),
    "band tension",
    "guide alignment, guide arm spacing and back-up bearings",
    "pitch suited to the section (at least 3 teeth in the cut, gullets not packed)",
)

CAUTION = (
    "Check tension, guides and blade only with the saw stopped and isolated; follow the "
    "saw maker's manual, the blade maker's break-in advice, local regulations and shop rules."
)


@dataclass(frozen=True)
class FailureMode:
    """One row of the failure-mode table."""

    code: str
    name: str
    causes: tuple[str, ...]
    source: str
    kind: str = "failure"  # "wear" for the normal end of a life (worn-out)

    @property
    def is_failure(self) -> bool:
        return self.kind == "failure"


@dataclass(frozen=True)
class ModeCount:
    """How often one failure mode was recorded."""

    code: str
    name: str
    count: int
    share: float  # of the failures with a recorded mode
    causes: tuple[str, ...]


@dataclass(frozen=True)
class ModeRanking:
    """Failure modes, most frequent first; blades with no mode recorded counted apart."""

    modes: tuple[ModeCount, ...]
    recorded: int
    unrecorded: int


@dataclass(frozen=True)
class EarlyFailureWarning:
    """Raised when the fitted shape says blades fail early (β < 1)."""

    shape: float
    shape_ci: tuple[float, float]
    confirmed: bool  # the whole confidence interval of β lies below 1
    message: str
    mode: str | None  # most frequent mode among the early failures
    mode_name: str | None
    mode_count: int
    causes: tuple[str, ...]  # usual causes of that mode
    setup_checks: tuple[str, ...]
    caution: str


@lru_cache(maxsize=1)
def failure_modes() -> dict[str, FailureMode]:
    """The failure-mode table keyed by code, in table order."""
    import csv

    from sawplan.paths import data_file

    with data_file("failure_modes.csv").open(encoding="utf-8", newline="") as handle:
        rows = list(csv.DictReader(handle))
    return {
        row["code"]: FailureMode(
            code=row["code"],
            name=row["name"],
            causes=tuple(c.strip() for c in row["causes"].split(";") if c.strip()),
            source=row["source"],
            kind=row["kind"],
        )
        for row in rows
    }


def failure_mode(code: str) -> FailureMode:
    """Look one mode up by code; ``BadDataError`` listing the known codes if unknown."""
    table = failure_modes()
    key = code.strip().lower()
    if key not in table:
        known = ", ".join(table)
        raise BadDataError(f"must be one of {known}, got {code!r}", field="failure_mode")
    return table[key]


def rank_failure_modes(modes: Sequence[str | None]) -> ModeRanking:
    """Count failure modes (one entry per failed blade; None or '' = not recorded)."""
    table = failure_modes()
    codes = [failure_mode(m).code for m in modes if m and m.strip()]
    counts = Counter(codes)
    recorded = len(codes)
    order = list(table)
    rows = sorted(counts.items(), key=lambda kv: (-kv[1], order.index(kv[0])))
    return ModeRanking(
        modes=tuple(
            ModeCount(code, table[code].name, count, count / recorded, table[code].causes)
            for code, count in rows
        ),
        recorded=recorded,
        unrecorded=len(modes) - recorded,
    )


def early_failure_warning(
    fit: WeibullFit | WeibullNotFitted | None,
    modes: Sequence[str | None],
    lives_cm2: Sequence[float] | None = None,
) -> EarlyFailureWarning | None:
    """A warning with likely causes when the fitted shape is below 1, else None.

    ``modes`` holds the failure mode of each failed blade.  With ``lives_cm2``
    (same order) only failures at or below the fitted median life count as early
    ones; without it every failure counts.
    """
    if fit is None or not fit.fitted or not fit.early_failures():
        return None
    if lives_cm2 is not None:
        if len(lives_cm2) != len(modes):
            raise BadDataError(
                f"must have one entry per mode ({len(modes)}), got {len(lives_cm2)}",
                field="lives_cm2",
            )
        early = [m for m, x in zip(modes, lives_cm2, strict=True) if x <= fit.median_life_cm2]
    else:
        early = list(modes)
    ranking = rank_failure_modes(early)
    top = ranking.modes[0] if ranking.modes else None
    confirmed = fit.early_failures_confirmed()
    lo, hi = fit.shape_ci
    pct = round(100 * fit.confidence)
    strength = (
        "the whole interval is below 1"
        if confirmed
        else "the interval reaches 1 or above, so more failures are needed to be sure"
    )
    message = (
        f"Weibull shape {fit.shape:.2f} < 1 ({pct} % interval {lo:.2f}-{hi:.2f}; {strength}): "
        "blades are failing early, which points to set-up problems rather than wear"
    )
    if top is not None:
        message += f"; most frequent early failure: {top.name} ({top.count} of {ranking.recorded})"
    return EarlyFailureWarning(
        shape=fit.shape,
        shape_ci=fit.shape_ci,
        confirmed=confirmed,
        message=message,
        mode=top.code if top else None,
        mode_name=top.name if top else None,
        mode_count=top.count if top else 0,
        causes=top.causes if top else (),
        setup_checks=SETUP_CHECKS,
        caution=CAUTION,
    )
