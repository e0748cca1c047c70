"""What one cut costs at a band speed, and the speeds that make it cheapest or fastest.

Cost per cut (three terms, each with where its numbers come from):

    machine  = rate × (cut time + handling time)
    blade    = blade price × (cut area ÷ expected blade life)
    change   = blade change time × rate × (cut area ÷ expected blade life)

The expected blade life at a speed comes from Taylor's relation V·Lⁿ = C with
life L as area cut (a fit of the shop's log, or a published exponent).  Cut
time falls as 1/V while the tooth bite is held; above the speed where the
motor's power holds the feed (the *feed limit*) it stops falling, and a faster
band only wears the blade.  The cheapest and the fastest speeds are Gilbert's
(``sawplan.cutting.gilbert``), held inside the saw's speed range and below the
feed limit.  Money is in the shop's currency; rates are per hour.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Literal

from sawplan.cutting import gilbert, tool_life
from sawplan.errors import BadDataError

RunName = Literal["recommended", "cost", "production"]
RUNS: tuple[RunName, ...] = ("recommended", "cost", "production")
CURVE_POINTS = 41


@dataclass(frozen=True)
class Sourced:
    """A number and where it comes from (given, job file, config, blade log, default …)."""

    value: float
    source: str


@dataclass(frozen=True)
class CostInputs:
    """The shop's money and time figures behind a cost per cut."""

    rate_per_h: Sourced  # machine and operator, per hour
    handling_min: Sourced  # load, clamp and unload, per cut
    blade_price: Sourced  # one blade
    change_min: Sourced  # take a worn blade off and fit, tension and break in a new one

    def __post_init__(self) -> None:
        # the field rules (range and words), then the economics' own rule: a zero rate,
        # price or change time would make blades free or time worthless
        from sawplan import fields

        for key, value, zero_ok in (
            ("shop_rate", self.rate_per_h.value, False),
            ("blade_price", self.blade_price.value, False),
            ("change_time", self.change_min.value, False),
            ("handling_time", self.handling_min.value, True),
        ):
            fields.check(key, value)
            if not zero_ok and value <= 0.0:
                f = fields.field(key)
                raise BadDataError(f"must be above 0, got {value:g}", field=f.words)

    @property
    def rate_per_min(self) -> float:
        return self.rate_per_h.value / 60.0


@dataclass(frozen=True)
class LifeRelation:
    """Taylor's relation V·Lⁿ = C for blade life as area cut (cm²), and where it comes from."""

    n: float
    c_m_min: float  # band speed for a mean life of 1 cm²
    source: str
    fitted: bool  # True: fitted to the shop's log; False: a published exponent
    n_ci: tuple[float, float] | None = None  # the fit's interval for n
    note: str | None = None  # why the log gave no fit, and what data would make one

    def __post_init__(self) -> None:
        _positive(self.n, "n", "")
        _positive(self.c_m_min, "taylor-c", "m/min")

    def mean_life_cm2(self, speed_m_min: float) -> float:
        """L(V) = (C/V)^(1/n)."""
        return tool_life.life_at(speed_m_min, self.c_m_min, self.n)


@dataclass(frozen=True)
class SpeedTime:
    """Cut time against band speed: t = K/V up to the feed limit, constant above it."""

    k_min_m_min: float  # cut time × band speed below the feed limit
    feed_limit_m_min: float | None  # None: the feed rises with speed over the whole range
    source: str = "cutting model"

    def __post_init__(self) -> None:
        _positive(self.k_min_m_min, "cut-time", "min")

    def time_min(self, speed_m_min: float) -> float:
        limit = self.feed_limit_m_min
        return self.k_min_m_min / (speed_m_min if limit is None else min(speed_m_min, limit))


@dataclass(frozen=True)
class CutCost:
    """One cut at one band speed: the three cost terms and the time per cut."""

    band_speed_m_min: float
    cut_time_min: float
    handling_min: float
    blade_life_cm2: float  # expected (mean) life at this speed
    blade_life_min: float  # minutes of cutting a blade lasts on this cut
    cuts_per_blade: float
    machine: float  # rate × (cut + handling)
    blade: float  # price × area ÷ life
    change: float  # change time × rate × area ÷ life
    total: float
    time_per_cut_min: float  # cut + handling + the blade change shared over its cuts
    cost_per_m2: float


def cost_per_cut(
    area_mm2: float, cut_time_min: float, speed_m_min: float, life: LifeRelation, inputs: CostInputs
) -> CutCost:
    """The three terms of the cost of one cut of ``area_mm2`` at ``speed_m_min``."""
    _positive(area_mm2, "area", "mm²")
    _positive(cut_time_min, "cut-time", "min")
    _positive(speed_m_min, "band-speed", "m/min")
    area_cm2 = area_mm2 / 100.0
    life_cm2 = life.mean_life_cm2(speed_m_min)
    share = area_cm2 / life_cm2  # of a blade, per cut
    rate = inputs.rate_per_min
    handling = inputs.handling_min.value
    machine = rate * (cut_time_min + handling)
    blade = inputs.blade_price.value * share
    change = inputs.change_min.value * rate * share
    total = machine + blade + change
    return CutCost(
        band_speed_m_min=speed_m_min,
        cut_time_min=cut_time_min,
        handling_min=handling,
        blade_life_cm2=life_cm2,
        blade_life_min=cut_time_min / share,
        cuts_per_blade=1.0 / share,
        machine=machine,
        blade=blade,
        change=change,
        total=total,
        time_per_cut_min=cut_time_min + handling + inputs.change_min.value * share,
        cost_per_m2=total / (area_mm2 * 1e-6),
    )


@dataclass(frozen=True)
class RunSpeed:
    """A band speed to run the cut at, why, and what the cut then costs and takes."""

    run: RunName
    band_speed_m_min: float
    optimum_m_min: float | None  # Gilbert's speed before the saw's range and the feed limit
    held_by: str | None  # "saw-min" | "saw-max" | "feed-limit" when the optimum was held
    optimum_life_min: float | None  # Gilbert's tool life T (minutes of cutting per blade)
    cost: CutCost


@dataclass(frozen=True)
class CutEconomics:
    """A cut at the recommended, cheapest and fastest band speeds, side by side."""

    area_mm2: float
    runs: tuple[RunSpeed, ...]
    life: LifeRelation
    inputs: CostInputs
    time_source: str
    n_time: float  # Taylor exponent in time for this cut
    c_time_m_min: float  # Taylor constant in time for this cut (speed for a 1 min life)
    speed_range_m_min: tuple[float, float]
    feed_limit_m_min: float | None

    def run(self, name: str) -> RunSpeed:
        for r in self.runs:
            if r.run == name:
                return r
        raise BadDataError(f"must be one of {', '.join(RUNS)}, got {name!r}", field="run")


def cut_economics(
    area_mm2: float,
    recommended_m_min: float,
    times: SpeedTime,
    life: LifeRelation,
    inputs: CostInputs,
    speed_range_m_min: tuple[float, float],
) -> CutEconomics:
    """Cost and time of a cut at the recommended speed and at Gilbert's two optima."""
    lo, hi = _range(speed_range_m_min)
    _positive(recommended_m_min, "band-speed", "m/min")
    n_t = tool_life.time_exponent(life.n)
    c_t = gilbert.time_constant(life.c_m_min, life.n, times.k_min_m_min, area_mm2 / 100.0)
    t_cost = gilbert.optimum_life_cost_min(
        n_t, inputs.change_min.value, inputs.blade_price.value, inputs.rate_per_min
    )
    t_prod = gilbert.optimum_life_production_min(n_t, inputs.change_min.value)

    def at(run: RunName, v: float, optimum: float | None, held, t_opt: float | None) -> RunSpeed:
        cost = cost_per_cut(area_mm2, times.time_min(v), v, life, inputs)
        return RunSpeed(run, v, optimum, held, t_opt, cost)

    runs = [at("recommended", recommended_m_min, None, None, None)]
    for run, t_opt in (("cost", t_cost), ("production", t_prod)):
        optimum = tool_life.speed_for_life(t_opt, c_t, n_t)
        v, held = _hold(optimum, lo, hi, times.feed_limit_m_min)
        runs.append(at(run, v, optimum, held, t_opt))
    return CutEconomics(
        area_mm2=area_mm2,
        runs=tuple(runs),
        life=life,
        inputs=inputs,
        time_source=times.source,
        n_time=n_t,
        c_time_m_min=c_t,
        speed_range_m_min=(lo, hi),
        feed_limit_m_min=times.feed_limit_m_min,
    )


def cost_curve(
    area_mm2: float,
    times: SpeedTime,
    life: LifeRelation,
    inputs: CostInputs,
    speed_range_m_min: tuple[float, float],
    points: int = CURVE_POINTS,
) -> tuple[CutCost, ...]:
    """Cost per cut at ``points`` band speeds evenly over the saw's range, for a chart."""
    lo, hi = _range(speed_range_m_min)
    if points < 2:
        raise BadDataError(f"must be 2 or more, got {points}", field="points")
    speeds = [lo + (hi - lo) * k / (points - 1) for k in range(points)] if hi > lo else [lo]
    return tuple(cost_per_cut(area_mm2, times.time_min(v), v, life, inputs) for v in speeds)


def _hold(
    optimum: float, lo: float, hi: float, feed_limit: float | None
) -> tuple[float, str | None]:
    """The optimum held inside the saw's range and below the feed limit, and what held it."""
    top, top_why = hi, "saw-max"
    if feed_limit is not None and feed_limit < hi:
        top, top_why = max(feed_limit, lo), "feed-limit"
    if optimum > top:
        return top, top_why
    if optimum < lo:
        return lo, "saw-min"
    return optimum, None


def _range(speed_range_m_min: tuple[float, float]) -> tuple[float, float]:
    lo, hi = (float(v) for v in speed_range_m_min)
    _positive(lo, "band-speed", "m/min")
    if not (math.isfinite(hi) and hi >= lo):
        raise BadDataError(f"must be at least {lo:g} m/min, got {hi:g}", field="band-speed")
    return lo, hi


def _positive(value: float, field: str, unit: str) -> None:
    if not (isinstance(value, int | float) and math.isfinite(value) and value > 0.0):
        raise BadDataError(
            f"must be above 0{' ' + unit if unit else ''}, got {value!r}", field=field
        )


FEED_LIMIT_RISE = 1.02  # time × speed 2 % above its low-speed value: the feed no longer keeps up
_FEED_LIMIT_STEPS = 8


def speed_time_of(
    time_at: Callable[[float], float],
    speed_range_m_min: tuple[float, float],
    source: str = "cutting model",
) -> SpeedTime:
    """Cut time against speed from a model ``time_at(speed) -> minutes``.

    K is time × speed at the saw's slowest speed.  When the model's time ×
    speed at the fastest speed is over 2 % above K the feed stops keeping up
    (the motor's power holds it); the speed where it starts is found by
    bisection on ln V (8 steps, within about 1 %).
    """
    lo, hi = _range(speed_range_m_min)
    k = time_at(lo) * lo
    if hi <= lo or time_at(hi) * hi <= k * FEED_LIMIT_RISE:
        return SpeedTime(k, None, source)
    a, b = math.log(lo), math.log(hi)
    for _ in range(_FEED_LIMIT_STEPS):
        mid = (a + b) / 2.0
        v = math.exp(mid)
        if time_at(v) * v <= k * FEED_LIMIT_RISE:
            a = mid
        else:
            b = mid
    return SpeedTime(k, math.exp(a), source)
