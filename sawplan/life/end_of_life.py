"""How a blade's life ended: worn out at the end of a normal life, or a failure.

A blade whose teeth wore down (retired ``worn-out`` or ``dull``) ended normally
when the area it cut lies within the expected life of its blade type, or beyond
it: that is wear, not a failure.  Below the expected life its teeth dulled early,
a failure with the usual causes of early dulling (band speed, feed, coolant,
break-in; common practice).  Every other mode (stripped, cracked, broken weld...)
is a failure whatever the area.

The expected life of a blade type is the middle 90 % (5th to 95th percentile)
of, in order of preference:

1. a Weibull fit to the lives of the type's blades retired worn out (at least
   ``MIN_WORN_OUT`` of them): the shop's own record of normal lives;
2. the censored Weibull fit of all the type's blades, unless it says the type
   fails early (the whole interval of its shape below 1: no normal life to
   compare with);
3. a typical life of the material group the blade cut most, from half to twice
   a single figure (from memory, low confidence).

In the Weibull fit every retired blade is a failure, a worn-out one a failure of
wear; the failure table and the early-failure analysis count failures only.
Pure: plain numbers in, frozen dataclasses out.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

from sawplan.display import Q, say
from sawplan.life.failure_modes import failure_mode
from sawplan.life.weibull import WeibullFit, WeibullNotFitted, fit_weibull

WORN_OUT = "worn-out"
EARLY_DULL = "dull"
TOOTH_WEAR = (WORN_OUT, EARLY_DULL)  # modes whose meaning depends on the life reached
MIN_WORN_OUT = 3
LOW_P, HIGH_P = 0.05, 0.95  # the middle 90 % of normal lives

Basis = Literal["worn-out blades", "blade type fit", "reference"]


@dataclass(frozen=True)
class ExpectedLife:
    """The range of area a blade of one type cuts in a normal life (cm²)."""

    low_cm2: float
    high_cm2: float
    basis: Basis
    blades: int  # blades behind the range (0 for a typical life from memory)
    source: str  # where it comes from, in words: "from 6 other blades of this type ..."


@dataclass(frozen=True)
class EndOfLife:
    """How one retired blade's life ended, judged against its type's expected life."""

    mode: str  # what was recorded
    kind: Literal["wear", "failure"]
    counted_as: str  # the mode it counts as: worn-out, dull (early) or the recorded one
    name: str  # the plain name of ``counted_as``
    life_cm2: float
    expected: ExpectedLife | None
    position: Literal["below", "within", "above"] | None
    verdict: str  # one line: what the life says about the end
    causes: tuple[str, ...]  # usual causes, for failures only


def expected_from_worn_out(lives_cm2: Sequence[float]) -> ExpectedLife | None:
    """The middle 90 % of a Weibull fit to complete worn-out lives (None under 3 of them)."""
    lives = [float(x) for x in lives_cm2 if x > 0]
    if len(lives) < MIN_WORN_OUT:
        return None
    fit = fit_weibull(lives, [True] * len(lives), bounds="none")
    if isinstance(fit, WeibullFit):
        low, high = fit.quantile_cm2(LOW_P), fit.quantile_cm2(HIGH_P)
    else:  # no spread to fit: the lives themselves are the range
        low, high = min(lives), max(lives)
    source = say("from {} other blades of this type retired worn out", len(lives))
    return ExpectedLife(low, high, "worn-out blades", len(lives), source)


def expected_from_fit(fit: WeibullFit | WeibullNotFitted | None) -> ExpectedLife | None:
    """The middle 90 % of a blade type's censored fit, unless the type surely fails early."""
    if not isinstance(fit, WeibullFit) or fit.early_failures_confirmed():
        return None
    source = say("from the Weibull fit of {} other blades of this type", fit.n)
    return ExpectedLife(
        fit.quantile_cm2(LOW_P), fit.quantile_cm2(HIGH_P), "blade type fit", fit.n, source
    )


def expected_from_reference(low_cm2: float, high_cm2: float, source: str) -> ExpectedLife:
    """A typical range recalled from memory (low confidence)."""
    return ExpectedLife(low_cm2, high_cm2, "reference", 0, source)


def end_of_life(mode: str | None, life_cm2: float, expected: ExpectedLife | None) -> EndOfLife:
    """Judge a retirement: wear when the teeth wore down over a normal life, else a failure.

    ``worn-out`` and ``dull`` count as wear at or above the low end of the
    expected life, as teeth dulled early below it; other modes are failures.
    Without an expected life the recorded word stands.
    """
    code = failure_mode(mode).code if mode else ""
    position = _position(life_cm2, expected)
    judged = code in TOOTH_WEAR and position is not None
    wear = position != "below" if judged else code == WORN_OUT
    counted = WORN_OUT if wear else (EARLY_DULL if code in TOOTH_WEAR else code)
    info = failure_mode(counted) if counted else None
    name = info.name if info is not None else "no failure mode recorded"
    verdict = _verdict(code, counted, name, life_cm2, expected, position)
    return EndOfLife(
        mode=code,
        kind="wear" if wear else "failure",
        counted_as=counted,
        name=name,
        life_cm2=life_cm2,
        expected=expected,
        position=position,
        verdict=verdict,
        causes=() if wear or info is None else info.causes,
    )


def _position(
    life_cm2: float, expected: ExpectedLife | None
) -> Literal["below", "within", "above"] | None:
    if expected is None or not math.isfinite(life_cm2) or life_cm2 <= 0:
        return None
    if life_cm2 < expected.low_cm2:
        return "below"
    return "above" if life_cm2 > expected.high_cm2 else "within"


def _verdict(
    code: str,
    counted: str,
    name: str,
    life_cm2: float,
    expected: ExpectedLife | None,
    position: str | None,
) -> str:
    """``worn out at the end of a normal life: 25,400 cm², within the expected …``, and
    what a recorded word counts as when the life says otherwise."""
    area = Q("area", life_cm2 * 100.0)
    if life_cm2 <= 0:
        return say("{}: retired before cutting anything (no life to count)", name)
    if expected is None or position is None:
        return say("{} after {} (no expected life of its type to compare with)", name, area)
    where = {"below": "below", "within": "within", "above": "beyond"}[position]
    span = say(
        "{} to {}", Q("area", expected.low_cm2 * 100.0), Q("area", expected.high_cm2 * 100.0)
    )
    compared = say("{}, {} the expected {} of its type ({})", area, where, span, expected.source)
    if code == EARLY_DULL and counted == WORN_OUT:
        return say(
            "retired as dull after {}: the teeth wore down over a normal life, so it counts as "
            "worn out (wear), not as an early failure",
            compared,
        )
    if code == WORN_OUT and counted == EARLY_DULL:
        return say(
            "retired as worn-out after {}: the teeth dulled early, so it counts as a failure "
            "(teeth dulled early)",
            compared,
        )
    return say("{}: {}", name, compared)
