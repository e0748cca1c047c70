"""What goes wrong with a cut, each warning with its consequence and, where one exists, a fix.

The rules that keep a screen from contradicting itself: a fix is only
offered when a catalogued pitch really does better (a coarser pitch that
still keeps three teeth, a finer one that reaches three); walls too thin for
any pitch get one warning; a cut that will not progress says so once and
nothing about its time.
"""

from __future__ import annotations

from sawplan.cutting import constants as K
from sawplan.cutting.explain import thinnest_text
from sawplan.cutting.mechanics import wheel_ratio_warning
from sawplan.cutting.plan import Candidate, Plan, single_solid
from sawplan.cutting.ploughing import teeth_in_chord, teeth_the_head_can_load
from sawplan.cutting.words import bite as um
from sawplan.cutting.words import force as newton
from sawplan.cutting.words import length as mm
from sawplan.cutting.words import power, share, speed

CLIP_NOTICE = 1.03  # a speed held back by under 3 % is not worth a warning


def stall_reason(plan: Plan, cand: Candidate) -> str:
    """'will not cut: …' — the one line a stalled cut gets."""
    chord = cand.run.stall_chord_mm
    teeth = teeth_in_chord(cand.pitch, chord)
    force = plan.saw.head_force_n or 0.0
    edge = plan.base.plough_force_n
    most = teeth_the_head_can_load(force, edge)
    return (
        f"will not cut: the head force ({newton(force)}) cannot load the {teeth:.0f} teeth of "
        f"{cand.pitch.label} in the {mm(chord)} chord (each needs about {newton(edge)} before it "
        f"bites, so at most {most:.0f} teeth); fit a coarser pitch or add feed force"
    )


def _tooth_count(plan: Plan, cand: Candidate, cands: list[Candidate]) -> list[str]:
    need = K.number("bite", "min_teeth")
    out = []
    if cand.too_few:
        where = thinnest_text(plan.section)
        finer = [c for c in cands if not c.too_few and not c.stalled]
        if not finer:
            out.append(
                f"walls too thin for {need:.0f} teeth of any pitch: {cand.teeth_thinnest:.1f} "
                f"teeth of {cand.pitch.label} over {where}; wavy set, light feed, support the "
                "work close to the cut"
            )
        else:
            fix = min(finer, key=lambda c: (c.pitch.tpi_mean, c.time))
            out.append(
                f"only {cand.teeth_thinnest:.1f} teeth of {cand.pitch.label} over {where} "
                f"(fewer than {need:.0f}): teeth can snag and strip; a finer pitch such as "
                f"{fix.pitch.label} keeps {fix.teeth_thinnest:.1f}"
            )
    if cand.too_many:
        most = K.number("bite", "max_teeth_widest_chord")
        out.append(
            f"{cand.teeth_widest:.0f} teeth in the {mm(plan.section.max_chord_mm)} widest chord "
            f"(over about {most:.0f}): gullets pack; a coarser pitch cuts faster"
        )
    return out


def _rubbing(plan: Plan, cand: Candidate, cands: list[Candidate], given: bool) -> list[str]:
    run = cand.run
    if run.rubbing_share <= 0.02:
        return []
    floor = plan.base.rubbing_floor_mm
    digits = 2 if um(run.min_bite_mm) != um(floor) else 3
    head = (
        f"tooth bite falls to {um(run.min_bite_mm, digits)}, under the {um(floor, digits)} "
        f"rubbing floor, across {share(run.rubbing_share)} of the metal cut: teeth rub instead "
        "of cutting"
    )
    if not given and not cand.rubs_most:  # the choice weighed it: say where, not what else
        out = [f"{head} there; keep the feed steady"]
        if plan.material.work_hardens:
            out.append(_work_hardens(plan))
        return out
    better = [
        c
        for c in cands
        if c.allowed  # keeps 3 teeth (and, on a solid, at most about 24)
        and c.run.rubbing_share < run.rubbing_share - 0.1
        and c.time <= cand.time * 1.5
    ]
    if better:
        fix = min(
            better, key=lambda c: (c.run.rubbing_share > 0, c.pitch.kind != "variable", c.time)
        )
        keeps = "" if single_solid(plan.section) else " and still keeps 3 teeth in the walls"
        out = [f"{head}; a coarser pitch such as {fix.pitch.label} bites deeper{keeps}"]
    elif cand.too_few:
        out = [f"{head}; a coarser pitch would bite deeper but leave even fewer teeth in the walls"]
    elif cand.run.governing_limit == "gullet" or dict(run.limit_shares).get("gullet", 0) > 0.2:
        out = [
            f"{head} where chips fill the gullets over long stretches of metal; no pitch that "
            "keeps 3 teeth bites deeper here, so keep the feed steady"
        ]
    else:
        out = [f"{head}; no pitch that keeps 3 teeth bites deeper here"]
    if plan.material.work_hardens:
        out.append(_work_hardens(plan))
    return out


def _work_hardens(plan: Plan) -> str:
    return (
        f"rubbing work-hardens {plan.material.key}: keep the feed up and never let the "
        "blade dwell in the cut"
    )


def _limits(plan: Plan, cand: Candidate) -> list[str]:
    run, saw = cand.run, plan.saw
    shares = dict(run.limit_shares)
    out = []
    material_mm = plan.base.material_bite_mm
    rubbing_told = run.rubbing_share > 0.02  # the rubbing warning names the gullets already
    if (
        shares.get("gullet", 0.0) > 0.5
        and run.bite_mean_mm < 0.5 * material_mm
        and not rubbing_told
    ):
        out.append(
            f"gullets overloaded: chips fill them at a {um(run.bite_mean_mm)} bite, under half "
            f"the {um(material_mm)} the material takes"
        )
    if shares.get("power", 0.0) > 0.2:
        out.append(
            f"power-limited for {share(shares['power'])} of the cut: "
            f"{power(saw.cutting_power_w)} at the blade "
            f"({power(saw.motor_power_w)} motor × {saw.drive_efficiency:g})"
        )
    if shares.get("force", 0.0) > 0.2:
        out.append(
            f"head force {newton(saw.head_force_n or 0.0)} is shared by up to {cand.teeth_widest:.0f} "
            f"teeth: it sets the feed for {share(shares['force'])} of the cut"
        )
    return out


def _clipped_speed(plan: Plan) -> list[str]:
    s = plan.speed
    if not s.clipped:
        return []
    wanted = s.base_m_min * s.width_factor * s.blade_factor * s.coolant_factor
    held = s.band_speed_m_min
    if max(wanted, held) / min(wanted, held) < CLIP_NOTICE:
        return []
    which = "highest" if s.clipped == "max" else "lowest"
    return [f"band speed held at the saw's {which} {speed(held)} (the cut wants {speed(wanted)})"]


def warnings(
    plan: Plan,
    cand: Candidate,
    cands: list[Candidate],
    extra: tuple[str, ...] = (),
    *,
    given: bool = False,
) -> list[str]:
    """Every warning of one cut; ``extra`` carries the speed and feed consequences (advice)."""
    if cand.stalled:
        return [stall_reason(plan, cand), *extra]
    out = _tooth_count(plan, cand, cands)
    width = plan.saw.blade_width_mm
    if cand.pitch.source != "given" and not cand.pitch.fits_blade(width):
        out.append(
            f"{cand.pitch.label} is not usually made in a {width:g} mm wide blade "
            f"(made {cand.pitch.min_blade_width_mm:g}-{cand.pitch.max_blade_width_mm:g} mm, memory)"
        )
    out += _rubbing(plan, cand, cands, given)
    out += _limits(plan, cand)
    out += _clipped_speed(plan)
    out += extra
    wheel = wheel_ratio_warning(plan.saw.blade_thickness_mm, plan.saw.wheel_diameter_mm)
    if wheel:
        out.append(wheel)
    return out
