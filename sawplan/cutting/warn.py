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
from sawplan.cutting.words import Phrase, bite_pair, power, say, share, speed
from sawplan.cutting.words import bite as um
from sawplan.cutting.words import force as newton
from sawplan.cutting.words import length as mm

CLIP_NOTICE = 1.03  # a speed held back by under 3 % is not worth a warning


def stall_reason(plan: Plan, cand: Candidate) -> Phrase:
    """'will not cut: …' — the one line a stalled cut gets."""
    chord = cand.run.stall_chord_mm
    teeth = teeth_in_chord(cand.pitch, chord)
    force = plan.saw.head_force_n or 0.0
    edge = plan.base.plough_force_n
    most = teeth_the_head_can_load(force, edge)
    return say(
        "will not cut: the head force ({}) cannot load the {} teeth of {} in the {} chord (each "
        "needs about {} before it bites, so at most {} teeth); fit a coarser pitch or add feed "
        "force",
        newton(force), f"{teeth:.0f}", cand.pitch.label, mm(chord), newton(edge), f"{most:.0f}",
    )  # fmt: skip


def _tooth_count(plan: Plan, cand: Candidate, cands: list[Candidate]) -> list[Phrase]:
    need = K.number("bite", "min_teeth")
    out = []
    if cand.too_few:
        where = thinnest_text(plan.section)
        finer = [c for c in cands if not c.too_few and not c.stalled]
        if not finer:
            out.append(
                say(
                    "walls too thin for {} teeth of any pitch: {} teeth of {} over {}; wavy set, "
                    "light feed, support the work close to the cut",
                    f"{need:.0f}",
                    f"{cand.teeth_thinnest:.1f}",
                    cand.pitch.label,
                    where,
                )  # fmt: skip
            )
        else:
            fix = min(finer, key=lambda c: (c.pitch.tpi_mean, c.time))
            out.append(
                say(
                    "only {} teeth of {} over {} (fewer than {}): teeth can snag and strip; a "
                    "finer pitch such as {} keeps {}",
                    f"{cand.teeth_thinnest:.1f}",
                    cand.pitch.label,
                    where,
                    f"{need:.0f}",
                    fix.pitch.label,
                    f"{fix.teeth_thinnest:.1f}",
                )  # fmt: skip
            )
    if cand.too_many:
        most = K.number("bite", "max_teeth_widest_chord")
        out.append(
            say(
                "{} teeth in the {} widest chord (over about {}): gullets pack; a coarser pitch "
                "cuts faster",
                f"{cand.teeth_widest:.0f}",
                mm(plan.section.max_chord_mm),
                f"{most:.0f}",
            )  # fmt: skip
        )
    return out


def _rubbing(plan: Plan, cand: Candidate, cands: list[Candidate], given: bool) -> list[Phrase]:
    run = cand.run
    if run.rubbing_share <= 0.02:
        return []
    low, floor = bite_pair(run.min_bite_mm, plan.base.rubbing_floor_mm)
    head = say(
        "tooth bite falls to {}, under the {} rubbing floor, across {} of the metal cut: teeth "
        "rub instead of cutting",
        low, floor, share(run.rubbing_share),
    )  # fmt: skip
    if not given and not cand.rubs_most:  # the choice weighed it: say where, not what else
        out = [say("{} there; keep the feed steady", head)]
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
        out = [say("{}; a coarser pitch such as {} bites deeper{}", head, fix.pitch.label, keeps)]
    elif cand.too_few:
        out = [
            say(
                "{}; a coarser pitch would bite deeper but leave even fewer teeth in the walls",
                head,
            )
        ]
    elif cand.run.governing_limit == "gullet" or dict(run.limit_shares).get("gullet", 0) > 0.2:
        out = [
            say(
                "{} where chips fill the gullets over long stretches of metal; no pitch that "
                "keeps 3 teeth bites deeper here, so keep the feed steady",
                head,
            )
        ]
    else:
        out = [say("{}; no pitch that keeps 3 teeth bites deeper here", head)]
    if plan.material.work_hardens:
        out.append(_work_hardens(plan))
    return out


def _work_hardens(plan: Plan) -> Phrase:
    return say(
        "rubbing work-hardens {}: keep the feed up and never let the blade dwell in the cut",
        plan.material.key,
    )


def _limits(plan: Plan, cand: Candidate) -> list[Phrase]:
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
            say(
                "gullets overloaded: chips fill them at a {} bite, under half the {} the "
                "material takes",
                um(run.bite_mean_mm),
                um(material_mm),
            )  # fmt: skip
        )
    if shares.get("power", 0.0) > 0.2:
        out.append(
            say(
                "power-limited for {} of the cut: {} at the blade ({} motor × {})",
                share(shares["power"]),
                power(saw.cutting_power_w),
                power(saw.motor_power_w),
                f"{saw.drive_efficiency:g}",
            )  # fmt: skip
        )
    if shares.get("force", 0.0) > 0.2:
        out.append(
            say(
                "head force {} is shared by up to {} teeth: it sets the feed for {} of the cut",
                newton(saw.head_force_n or 0.0),
                f"{cand.teeth_widest:.0f}",
                share(shares["force"]),
            )  # fmt: skip
        )
    return out


def _clipped_speed(plan: Plan) -> list[Phrase]:
    s = plan.speed
    if not s.clipped:
        return []
    wanted = s.base_m_min * s.width_factor * s.blade_factor * s.coolant_factor
    held = s.band_speed_m_min
    if max(wanted, held) / min(wanted, held) < CLIP_NOTICE:
        return []
    which = "highest" if s.clipped == "max" else "lowest"
    return [
        say(
            "band speed held at the saw's {} {} (the cut wants {})",
            which,
            speed(held),
            speed(wanted),
        )
    ]


def warnings(
    plan: Plan,
    cand: Candidate,
    cands: list[Candidate],
    extra: tuple[Phrase, ...] = (),
    *,
    given: bool = False,
) -> list[Phrase]:
    """Every warning of one cut; ``extra`` carries the speed and feed consequences (advice)."""
    if cand.stalled:
        return [stall_reason(plan, cand), *extra]
    out = _tooth_count(plan, cand, cands)
    width = plan.saw.blade_width_mm
    if cand.pitch.source != "given" and not cand.pitch.fits_blade(width):
        out.append(
            say(
                "{} is not usually made in a {} wide blade (made {} to {}, memory)",
                cand.pitch.label,
                mm(width),
                mm(cand.pitch.min_blade_width_mm),
                mm(cand.pitch.max_blade_width_mm),
            )  # fmt: skip
        )
    out += _rubbing(plan, cand, cands, given)
    out += _limits(plan, cand)
    out += _clipped_speed(plan)
    out += extra
    wheel = wheel_ratio_warning(plan.saw.blade_thickness_mm, plan.saw.wheel_diameter_mm)
    if wheel:
        out.append(say("{}", wheel))
    return out
