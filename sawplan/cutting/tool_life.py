"""Taylor's tool-life relation V·Tⁿ = C: how blade life answers to band speed.

F. W. Taylor ("On the art of cutting metals", Trans. ASME 28, 1907) found
that a cutting edge's life T falls steeply with cutting speed V, so that
V·Tⁿ = C for one tool material, work material and feed.  The exponent n
depends mostly on the tool material; the band-saw blade's teeth are
high-speed steel (the edge of a bi-metal blade), carbon tool steel or carbide.

Pure arithmetic, no I/O.  Life T may be minutes of cutting (Taylor's form) or
area cut (the blade log's measure); the two exponents differ when the cut
time falls as 1/V (``area_exponent`` / ``time_exponent``).  Published
exponents are in ``PUBLISHED`` with their sources; a shop's own fit from its
log (``sawplan.life``) replaces them where the data allow.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from sawplan.errors import BadDataError


@dataclass(frozen=True)
class TaylorExponent:
    """A published Taylor exponent n (life in minutes of cutting) for one tool material."""

    tool: str  # the cutting-edge material, in words
    n: float  # the value sawplan uses
    n_low: float  # the published range
    n_high: float
    source: str


HSS = TaylorExponent(
    tool="high-speed steel (the teeth of a bi-metal blade)",
    n=0.125,
    n_low=0.08,
    n_high=0.2,
    source=(
        "Groover, Fundamentals of Modern Manufacturing, table of Taylor parameters: "
        "n = 0.125 for high-speed steel (from memory); range 0.08-0.2 in Kalpakjian & "
        "Schmid, Manufacturing Engineering and Technology, table of n by tool material "
        "(from memory)"
    ),
)
CARBON_TOOL_STEEL = TaylorExponent(
    tool="plain carbon tool steel",
    n=0.10,
    n_low=0.08,
    n_high=0.12,
    source=(
        "Groover, Fundamentals of Modern Manufacturing, table of Taylor parameters: "
        "n = 0.10 for plain carbon steel tools (from memory); range taken as about "
        "±20 % (memory)"
    ),
)
CARBIDE = TaylorExponent(
    tool="cemented carbide",
    n=0.25,
    n_low=0.2,
    n_high=0.5,
    source=(
        "Groover, Fundamentals of Modern Manufacturing, table of Taylor parameters: "
        "n = 0.25 for cemented carbide (from memory); range 0.2-0.5 in Kalpakjian & "
        "Schmid, table of n by tool material (from memory)"
    ),
)
PUBLISHED: dict[str, TaylorExponent] = {
    "bi-metal": HSS,
    "carbon": CARBON_TOOL_STEEL,
    "carbide": CARBIDE,
}

# Extended Taylor relation V·Tⁿ·f^y = C: life also falls with the feed per tooth.
FEED_EXPONENT = 0.6
FEED_EXPONENT_SOURCE = (
    "Kalpakjian & Schmid, Manufacturing Engineering and Technology: extended Taylor "
    "equation V·Tⁿ·dˣ·fʸ = C with typical y = 0.6 (from memory)"
)


def exponent_for(blade_material: str) -> TaylorExponent:
    """The published exponent for a blade's teeth: bi-metal (HSS), carbon or carbide."""
    key = blade_material.strip().lower().replace("bimetal", "bi-metal")
    key = {"carbon-steel": "carbon", "carbide-tipped": "carbide"}.get(key, key)
    try:
        return PUBLISHED[key]
    except KeyError:
        raise BadDataError(
            f"no published Taylor exponent for {blade_material!r}",
            field="blade-material",
            hint="one of " + ", ".join(PUBLISHED),
        ) from None


def _exponent(n: float) -> float:
    if not (isinstance(n, int | float) and math.isfinite(n) and 0.0 < n < 1.0):
        raise BadDataError(f"must be between 0 and 1 (exclusive), got {n!r}", field="n")
    return float(n)


def _ratio(value: float, field: str) -> float:
    if not (isinstance(value, int | float) and math.isfinite(value) and value > 0.0):
        raise BadDataError(f"must be a positive ratio, got {value!r}", field=field)
    return float(value)


def life_ratio(speed_ratio: float, n: float) -> float:
    """T₂/T₁ when the speed goes from V₁ to V₂ = speed_ratio·V₁: (V₁/V₂)^(1/n).

    At n = 0.125 twice the speed leaves 2⁻⁸ = 1/256 of the life.
    """
    return _ratio(speed_ratio, "speed ratio") ** (-1.0 / _exponent(n))


def speed_ratio_for_life(life_ratio_: float, n: float) -> float:
    """V₂/V₁ that turns a life T₁ into T₂ = life_ratio·T₁: (T₁/T₂)ⁿ."""
    return _ratio(life_ratio_, "life ratio") ** (-_exponent(n))


def taylor_constant(speed: float, life: float, n: float) -> float:
    """C = V·Tⁿ from one speed and the life at it (any units; C has the speed's)."""
    return _ratio(speed, "speed") * _ratio(life, "life") ** _exponent(n)


def life_at(speed: float, c: float, n: float) -> float:
    """T = (C/V)^(1/n)."""
    return (_ratio(c, "taylor-c") / _ratio(speed, "speed")) ** (1.0 / _exponent(n))


def speed_for_life(life: float, c: float, n: float) -> float:
    """V = C/Tⁿ."""
    return _ratio(c, "taylor-c") / _ratio(life, "life") ** _exponent(n)


def area_exponent(n_time: float) -> float:
    """n for life as area cut, from n in minutes, when cut time falls as 1/V: n/(1 − n) (derived).

    Area life L = A′·T with the cutting rate A′ ∝ V (tooth bite held), so
    V·Tⁿ = C becomes V·L^(n/(1−n)) = C′.
    """
    n = _exponent(n_time)
    return n / (1.0 - n)


def time_exponent(n_area: float) -> float:
    """n in minutes from n for area life, when cut time falls as 1/V: n_A/(1 + n_A) (derived)."""
    if not (math.isfinite(n_area) and n_area > 0.0):
        raise BadDataError(f"must be above 0, got {n_area!r}", field="n")
    return n_area / (1.0 + n_area)


def wear_per_cut_ratio(speed_ratio: float, time_ratio: float, n: float) -> float:
    """How many times the blade life one cut uses after a change, by Taylor in minutes.

    A cut of t minutes uses t/T of a blade whose life is T minutes, so the
    share changes by (t₂/t₁)·(T₁/T₂) = time_ratio·speed_ratio^(1/n).  Running
    2× faster at n = 0.125 with the cut time halved costs 0.5·256 = 128× the
    blade per cut.
    """
    return _ratio(time_ratio, "time ratio") / life_ratio(speed_ratio, n)


def feed_life_ratio(feed_ratio: float, n: float, feed_exponent: float = FEED_EXPONENT) -> float:
    """T₂/T₁ at the same speed when the feed per tooth changes: (f₁/f₂)^(y/n) (extended Taylor)."""
    y = _ratio(feed_exponent, "feed exponent")
    return _ratio(feed_ratio, "feed ratio") ** (-y / _exponent(n))


def feed_wear_per_cut_ratio(
    feed_ratio: float, time_ratio: float, n: float, feed_exponent: float = FEED_EXPONENT
) -> float:
    """Blade life one cut uses after a feed change at the same speed: (t₂/t₁)·(T₁/T₂)."""
    return _ratio(time_ratio, "time ratio") / feed_life_ratio(feed_ratio, n, feed_exponent)
