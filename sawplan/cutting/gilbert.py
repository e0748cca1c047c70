"""Gilbert's machining economics: the tool life, and so the speed, that is cheapest or fastest.

With Taylor's relation in time, V·Tⁿ = C (T minutes of cutting per tool), a
cutting time per piece t_m = K/V, a machine-and-operator rate C_m per minute,
a tool price C_t and a tool change time t_c, the cost per piece

    C_m·(t_m + t_h) + (C_m·t_c + C_t)·t_m/T

is least at the tool life  T_cost = (1/n − 1)·(t_c + C_t/C_m)  and the time per
piece  t_m + t_h + t_c·t_m/T  is least at  T_prod = (1/n − 1)·t_c  (Gilbert
1950, "Economics of machining"; the form taught in manufacturing-processes
textbooks).  The speed that gives a life T is V = C/Tⁿ
(``sawplan.cutting.tool_life.speed_for_life``).

A band-saw blade's life is counted as area cut, V·Lⁿᴬ = C_A.  For one cut
of area A whose time falls as 1/V (the tooth bite held, as in the cutting
model below its power limit) the blade's cutting time is T = L·t_m/A, so

    V·T^(n_A/(1+n_A)) = (C_A^(1/n_A)·K/A)^(n_A/(1+n_A))      (derived)

is Taylor's relation in time for that cut, and Gilbert's formulas apply with
n = n_A/(1 + n_A) and that C.
"""

from __future__ import annotations

import math

from sawplan.cutting.tool_life import time_exponent
from sawplan.errors import BadDataError


def optimum_life_cost_min(
    n: float, change_min: float, tool_price: float, rate_per_min: float
) -> float:
    """T_cost = (1/n − 1)·(t_c + C_t/C_m): the tool life of least cost per piece, minutes."""
    _exponent(n)
    _above_zero(rate_per_min, "rate")
    _at_least_zero(change_min, "change-time")
    _at_least_zero(tool_price, "blade-price")
    return (1.0 / n - 1.0) * (change_min + tool_price / rate_per_min)


def optimum_life_production_min(n: float, change_min: float) -> float:
    """T_prod = (1/n − 1)·t_c: the tool life of least time per piece, minutes."""
    _exponent(n)
    _at_least_zero(change_min, "change-time")
    return (1.0 / n - 1.0) * change_min


def time_constant(c_area_m_min: float, n_area: float, k_min_m_min: float, area_cm2: float) -> float:
    """C in time for one cut: (C_A^(1/n_A)·K/A)^(n_A/(1+n_A)) with t_m = K/V (derived).

    ``c_area_m_min`` is the speed for a mean life of 1 cm²; ``k_min_m_min`` the
    cut's time × speed; ``area_cm2`` the cut's area.
    """
    _above_zero(c_area_m_min, "taylor-c")
    _above_zero(k_min_m_min, "cut-time")
    _above_zero(area_cm2, "area")
    n_t = time_exponent(n_area)
    log_c = (math.log(c_area_m_min) / n_area + math.log(k_min_m_min) - math.log(area_cm2)) * n_t
    return math.exp(log_c)


def _exponent(n: float) -> None:
    if not (math.isfinite(n) and 0.0 < n < 1.0):
        raise BadDataError(f"must be between 0 and 1 (exclusive), got {n}", field="n")


def _above_zero(value: float, field: str) -> None:
    if not (math.isfinite(value) and value > 0.0):
        raise BadDataError(f"must be above 0, got {value}", field=field)


def _at_least_zero(value: float, field: str) -> None:
    if not (math.isfinite(value) and value >= 0.0):
        raise BadDataError(f"must be 0 or more, got {value}", field=field)
