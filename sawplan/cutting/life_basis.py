"""Which life-against-speed relation a cost uses: the shop's fit, or a published exponent.

With a fit of the log (``sawplan.life.speed_life``) the relation is the
shop's own n and C.  Without one the exponent is the published one for the
blade's teeth (``sawplan.cutting.tool_life.PUBLISHED``, n in time turned into
n for area life), and C is anchored on one life at one speed: the log's mean
blade life for the group (or the documented default life) at the speed the
group's blades ran at (the logged mean, else the recommended speed).  The
relation says which, and what data would give a fit.
"""

from __future__ import annotations

from typing import Any

from sawplan.cutting import tool_life
from sawplan.cutting.cut_cost import LifeRelation


def life_relation(
    fit: Any,
    *,
    blade_material: str,
    anchor_life_cm2: float,
    anchor_speed_m_min: float,
    anchor_source: str,
) -> LifeRelation:
    """The shop's fit when ``fit.fitted``, else the published exponent anchored on one life.

    ``fit`` is a ``SpeedLifeFit``, a ``SpeedLifeNotFitted`` or None (no log).
    """
    if fit is not None and fit.fitted:
        source = (
            f"blade log fit: {fit.blades} blades ({fit.failures} retired, {fit.censored} "
            f"still running or removed unworn) at {fit.speed_levels} band speeds"
        )
        return LifeRelation(fit.n, fit.c_m_min, source, True, n_ci=fit.n_ci)
    published = tool_life.exponent_for(blade_material)
    n_area = tool_life.area_exponent(published.n)
    c = tool_life.taylor_constant(anchor_speed_m_min, anchor_life_cm2, n_area)
    source = (
        f"published n = {published.n:g} for {published.tool} (life in minutes; "
        f"{n_area:.3f} for life as area cut) — {published.source}; C from {anchor_source}"
    )
    if fit is None:
        note = "no blade log: log blades and the band speed of each cut to fit the shop's own n"
    else:
        note = f"no fit of life against speed: {fit.reason}; to get one, log {fit.needs}"
    return LifeRelation(n_area, c, source, False, note=note)
