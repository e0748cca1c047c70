"""Glue for ``--economics``: the log's fit, the shop's figures and the cutting model, to the core.

Every figure says where it comes from: given on the command line, the job
file, the blade log, or a default (common practice).  The log is read only
through the store (``BladeLog.speed_rows``), summed up once per log state
(``sawplan.cli.log_life``, kept in the user's cache folder); the fit, the costs
and the speeds are the core's (``sawplan.life.speed_life``,
``sawplan.cutting.cut_cost``).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from sawplan.cli.log_life import LogLife, group_life

DEFAULT_SHOP_RATE_PER_H = 60.0  # a round figure to be replaced by the shop's own
DEFAULT_CHANGE_MIN = 15.0  # common practice: off, on, tension, track and break in a blade
DEFAULT_BLADE_PRICE = 60.0  # a round figure for a bi-metal band; log prices replace it
DEFAULT_SOURCE = "default: set your own with {option}"


@dataclass(frozen=True)
class ShopFigures:
    """What the user typed (None where nothing was typed) and the job file's figures."""

    shop_rate_per_h: float | None = None
    handling_min: float | None = None
    blade_price: float | None = None
    change_min: float | None = None
    job_rate_per_h: float | None = None
    job_handling_min: float | None = None
    job_blade_price: float | None = None


def cost_inputs(figures: ShopFigures, price_median: float | None, priced_blades: int) -> Any:
    """The four money and time figures, each with its source."""
    from sawplan.cutlist.jobfile.types import DEFAULT_HANDLING_TIME_MIN
    from sawplan.cutting.cut_cost import CostInputs, Sourced

    def pick(given, job, log, default, option, log_words=None) -> Sourced:
        if given is not None:
            return Sourced(float(given), "given")
        if job is not None:
            return Sourced(float(job), "job file")
        if log is not None:
            return Sourced(float(log), log_words or "blade log")
        return Sourced(default, DEFAULT_SOURCE.format(option=option))

    price_words = f"blade log: median price of {priced_blades} blades"
    return CostInputs(
        rate_per_h=pick(figures.shop_rate_per_h, figures.job_rate_per_h, None,
                        DEFAULT_SHOP_RATE_PER_H, "--shop-rate"),
        handling_min=pick(figures.handling_min, figures.job_handling_min, None,
                          DEFAULT_HANDLING_TIME_MIN, "--handling-time (common practice)"),
        blade_price=pick(figures.blade_price, figures.job_blade_price, price_median,
                         DEFAULT_BLADE_PRICE, "--price", price_words),
        change_min=pick(figures.change_min, None, None, DEFAULT_CHANGE_MIN,
                        "--change-time (common practice)"),
    )  # fmt: skip


def life_for_cut(life: LogLife | None, material_group: str, blade_material: str,
                 recommended_m_min: float) -> Any:  # fmt: skip
    """The relation: the fit, else the published exponent anchored on these blades' life.

    ``life`` sums up the log's blades in question (None without a log).
    """
    from sawplan.cutting.life_basis import life_relation
    from sawplan.store.reports import default_life

    if life is not None and life.weibull_life_cm2 is not None:
        anchor_life = life.weibull_life_cm2
        words = f"the log's mean blade life (Weibull, {life.weibull_blades} blades)"
    else:
        d = default_life(material_group)
        anchor_life, words = d.life_cm2, f"the default life ({d.source})"
    if life is not None and life.mean_speed_m_min is not None:
        anchor_speed = life.mean_speed_m_min
        where = "at the mean logged band speed"
    else:
        anchor_speed, where = recommended_m_min, "assumed run at the recommended band speed"
    return life_relation(
        None if life is None else life.fit,
        blade_material=blade_material,
        anchor_life_cm2=anchor_life,
        anchor_speed_m_min=anchor_speed,
        anchor_source=f"{words}, {where}",
    )


def _economics(result: Any, mat: Any, sec: Any, saw: Any, life: LogLife | None,
               figures: ShopFigures, *, dry: bool, pitch: str) -> tuple[Any, Any, Any]:  # fmt: skip
    """One pitch's cut at three speeds, with the life of the blades ``life`` sums up."""
    from sawplan.cutting import cut_time_min
    from sawplan.cutting.cut_cost import cut_economics, speed_time_of
    from sawplan.errors import BadDataError

    fit = None if life is None else life.fit
    if life is None:
        inputs = cost_inputs(figures, None, 0)
    else:
        inputs = cost_inputs(figures, life.price_median, life.priced_blades)
    span = (saw.band_speed_min_m_min, saw.band_speed_max_m_min)

    def time_at(v: float) -> float:
        t = cut_time_min(mat, sec, saw, pitch, dry=dry, band_speed_m_min=v,
                         blade_material=result.blade_material,
                         calibration=result.calibration_factor)  # fmt: skip
        if t is None:
            raise BadDataError(f"{pitch} will not cut {sec.label()} on {saw.name}", field="pitch")
        return t

    times = speed_time_of(time_at, span, _time_source(result))
    recommended = result.band_speed_m_min
    relation = life_for_cut(life, mat.group, result.blade_material, recommended)
    econ = cut_economics(result.area_mm2, recommended, times, relation, inputs, span)
    return econ, times, fit


def _time_source(result: Any) -> str:
    source = "cutting model"
    if result.calibration_factor != 1.0:
        source += f" × shop calibration {result.calibration_factor:.2f}"
    return source


def economics_of_cut(result: Any, mat: Any, sec: Any, saw: Any, log: Any,
                     figures: ShopFigures, *, dry: bool) -> tuple[Any, Any]:  # fmt: skip
    """The cut's economics at three speeds (life from all the group's blades), and its times."""
    life = group_life(log, mat.group)
    econ, times, fit = _economics(
        result, mat, sec, saw, None if life is None else life.group, figures, dry=dry,
        pitch=result.pitch_label,
    )  # fmt: skip
    return econ, (times, fit)


def blade_choice_for_cut(result: Any, mat: Any, sec: Any, saw: Any, log: Any,
                         figures: ShopFigures, *, dry: bool) -> Any:  # fmt: skip
    """Each blade type the log knows for the group, at its own cheapest speed (None: < 2 types)."""
    from sawplan.cutting.blade_choice import BladeOption, choose_blade
    from sawplan.errors import SawplanError

    life = group_life(log, mat.group)
    if life is None or len(life.types) < 2:
        return None
    options, not_costed = [], []
    for blade_type, part in life.types.items():
        pitch = part.pitch
        try:
            econ, _times, fit = _economics(result, mat, sec, saw, part, figures, dry=dry,
                                           pitch=pitch)  # fmt: skip
        except SawplanError as err:
            not_costed.append(f"{blade_type}: {err}")
            continue
        options.append(BladeOption(blade_type, pitch, fit.blades, fit.failures, econ))
    return choose_blade(mat.group, options, not_costed)


@dataclass(frozen=True)
class SectionEconomics:
    """One section of a plan at three band speeds, and its cuts."""

    section: str
    cuts: int
    economics: Any


@dataclass(frozen=True)
class RunQuote:
    """The saw and blade part of a job's quote with every section run at one speed."""

    run: str
    sections: tuple[SectionEconomics, ...]
    saw_and_blades: float  # Σ cuts × cost per cut at the run's speed
    time_min: float  # Σ cuts × time per cut at the run's speed


def plan_economics(plan: Any, job: Any, saw: Any, log: Any, run: str) -> RunQuote:
    """Each section of ``plan`` priced at three speeds; the quote at ``run``."""
    from sawplan.cutting import recommend

    h = job.header
    figures = ShopFigures(
        job_rate_per_h=h.shop_rate_per_h,
        job_handling_min=h.handling_time_min,
        job_blade_price=h.blade_price,
    )
    parts = []
    for (material_key, section_key), section_plan in zip(job.groups(), plan.sections, strict=True):
        mat, sec = job.materials[material_key], job.sections[section_key]
        factor = (log.calibration(saw.name, mat.group) or (1.0, 0))[0]
        result = recommend(mat, sec, saw, calibration=factor)
        econ, _ = economics_of_cut(result, mat, sec, saw, log, figures, dry=False)
        parts.append(SectionEconomics(section_plan.group, section_plan.cuts, econ))
    chosen = [p.economics.run(run).cost for p in parts]
    return RunQuote(
        run=run,
        sections=tuple(parts),
        saw_and_blades=sum(p.cuts * c.total for p, c in zip(parts, chosen, strict=True)),
        time_min=sum(p.cuts * c.time_per_cut_min for p, c in zip(parts, chosen, strict=True)),
    )
