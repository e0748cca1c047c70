"""Tooth bite limits and the time to feed through a section (docs/feed-and-time.md).

At each depth y the bite h is the smallest of five limits — material, gullet,
tooth strength, motor power and (on gravity or hydraulic feeds) head force.
Below the rubbing floor h_min a tooth ploughs and removes only a share ρ(h) of
its nominal bite (``ploughing``).  Down-feed v_f = 1000·V·h/p.  Force-limited
feeds follow the chord, so t = ∫ dy / v_f(y); a constant down-feed is set for
the worst depth, so t = H / min v_f(y).  A head too weak to load its teeth
stalls the cut: the time is then infinite and the result says so.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Protocol

from sawplan.cutting.pitch import MM_PER_IN, Pitch
from sawplan.cutting.ploughing import force_bite_mm, removal_share, teeth_in_chord

LIMITS = ("material", "gullet", "tooth", "power", "force", "set")
# 4-point Gauss-Legendre rule on [-1, 1]: exact for cubics, good on the smooth
# pieces between the section's kinks.
_GL_X = (-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526)
_GL_W = (0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538)
SUBINTERVALS = 40  # over the whole height; each kink-free piece gets its share (min 1)


class ChordProfile(Protocol):
    """What feed needs from a section (``sawplan.sections.Section`` has it)."""

    height_mm: float

    def chord_mm(self, y_mm: float) -> float: ...

    def breakpoints_mm(self) -> list[float]: ...


@dataclass(frozen=True)
class Quadrature:
    """Depths, weights and chords of one section, sampled once for all pitches."""

    height_mm: float
    depths_mm: tuple[float, ...]
    weights_mm: tuple[float, ...]
    chords_mm: tuple[float, ...]
    kink_chords_mm: tuple[float, ...]  # chords at the kinks, for the worst depth
    runs_mm: tuple[float, ...] = ()  # longest single stretch of metal at each depth
    kink_runs_mm: tuple[float, ...] = ()


def sample(section: ChordProfile, subintervals: int = SUBINTERVALS) -> Quadrature:
    """Gauss-Legendre nodes between the section's breakpoints."""
    height = float(section.height_mm)
    marks = sorted({0.0, height, *(float(b) for b in section.breakpoints_mm() if 0 <= b <= height)})
    depths: list[float] = []
    weights: list[float] = []
    for a, b in zip(marks, marks[1:], strict=False):
        span = b - a
        if span <= 1e-12:
            continue
        pieces = max(1, math.ceil(subintervals * span / height))
        step = span / pieces
        for k in range(pieces):
            mid = a + (k + 0.5) * step
            half = step / 2
            for x, w in zip(_GL_X, _GL_W, strict=True):
                depths.append(mid + half * x)
                weights.append(half * w)
    chord = section.chord_mm
    chords = tuple(max(0.0, float(chord(y))) for y in depths)
    kinks = tuple(max(0.0, float(chord(y))) for y in marks)
    run = getattr(section, "longest_run_mm", None)
    if run is None or getattr(section, "is_solid", False) and getattr(section, "pieces", 1) == 1:
        return Quadrature(height, tuple(depths), tuple(weights), chords, kinks, chords, kinks)
    runs = tuple(max(0.0, float(run(y))) for y in depths)
    kink_runs = tuple(max(0.0, float(run(y))) for y in marks)
    return Quadrature(height, tuple(depths), tuple(weights), chords, kinks, runs, kink_runs)


@dataclass(frozen=True)
class CutConditions:
    """Everything but the chord that sets the bite (core units: mm, m/min, W, N)."""

    band_speed_m_min: float
    kerf_mm: float
    material_bite_mm: float
    tooth_max_mm: float
    rubbing_floor_mm: float
    gullet_factor: float  # c, gullet area = c·p²
    fill_fraction: float  # φ_s
    unit_energy_j_mm3: float
    cutting_power_w: float  # η·P at the blade
    head_force_n: float | None  # None: constant down-feed (no force limit)
    thrust_n_mm2: float  # k_t
    plough_force_n: float  # F0 per tooth
    removal_floor: float = 0.2  # ρ₀: least share of its bite a ploughing tooth removes


@dataclass(frozen=True)
class Bite:
    nominal_mm: float
    effective_mm: float  # what the tooth removes: ρ(h)·h
    limit: str
    stalled: bool = False  # the head cannot load the teeth in this chord


def _advice_bite(pitch: Pitch, chord: float, cond: CutConditions, run: float | None) -> Bite:
    """The smallest of the material, tooth, gullet and power limits (no head force)."""
    h = cond.material_bite_mm
    limit = "material"
    if cond.tooth_max_mm < h:
        h, limit = cond.tooth_max_mm, "tooth"
    if chord > 0:
        p_fine = pitch.spacing_fine_mm
        loaded = chord if run is None or run <= 0 else min(run, chord)
        gullet = cond.fill_fraction * cond.gullet_factor * p_fine * p_fine / loaded
        if gullet < h:
            h, limit = gullet, "gullet"
        # power: u·kerf·W·v_f ≤ η·P  (J/min on both sides), v_f = 1000·V·h/p
        feed_cap = cond.cutting_power_w * 60.0 / (cond.unit_energy_j_mm3 * cond.kerf_mm * chord)
        power = feed_cap * pitch.spacing_mean_mm / (1000.0 * cond.band_speed_m_min)
        if power < h:
            h, limit = power, "power"
    return Bite(h, h, limit)


def _force_bite(pitch: Pitch, chord: float, cond: CutConditions) -> float | None:
    """The bite the head's force allows (inf without a force limit, None when stalled)."""
    if cond.head_force_n is None or chord <= 0:
        return math.inf
    teeth = teeth_in_chord(pitch, chord)
    return force_bite_mm(
        cond.head_force_n, teeth, cond.plough_force_n, cond.thrust_n_mm2, cond.kerf_mm
    )


def _removed(h: float, cond: CutConditions) -> float:
    return h * removal_share(h, cond.rubbing_floor_mm, cond.removal_floor)


def _node_bites(
    pitch: Pitch, cond: CutConditions, chords: tuple[float, ...], runs: tuple[float, ...]
) -> tuple[list[float], list[str], float]:
    """Nominal bites and their limits at many chords at once (the hot loop of ``integrate``).

    The same arithmetic as ``bite``, written out so a whole catalogue of pitches
    can be scored through a bundle in a few milliseconds.  Returns the bites,
    the limits and the widest chord where the head cannot load its teeth (0 if
    none); a stalled chord gets a bite of 0.
    """
    p_fine = pitch.spacing_fine_mm
    gullet_area = cond.fill_fraction * cond.gullet_factor * p_fine * p_fine
    power_k = (
        cond.cutting_power_w
        * 60.0
        / (cond.unit_energy_j_mm3 * cond.kerf_mm)
        * pitch.spacing_mean_mm
        / (1000.0 * cond.band_speed_m_min)
    )
    h_mat, lim_mat = cond.material_bite_mm, "material"
    if cond.tooth_max_mm < h_mat:
        h_mat, lim_mat = cond.tooth_max_mm, "tooth"
    force = cond.head_force_n
    teeth_per_mm = pitch.tpi_mean / MM_PER_IN
    edge = cond.plough_force_n
    stiffness = cond.thrust_n_mm2 * cond.kerf_mm
    bites: list[float] = []
    limits: list[str] = []
    stall = 0.0
    for chord, run in zip(chords, runs, strict=True):
        h, limit = h_mat, lim_mat
        if chord > 0:
            loaded = chord if run <= 0 or run > chord else run
            g = gullet_area / loaded
            if g < h:
                h, limit = g, "gullet"
            pw = power_k / chord
            if pw < h:
                h, limit = pw, "power"
            if force is not None:
                teeth = chord * teeth_per_mm
                per_tooth = force / (teeth if teeth > 1.0 else 1.0) - edge
                if per_tooth <= 0.0:
                    if chord > stall:
                        stall = chord
                    h, limit = 0.0, "force"
                elif per_tooth / stiffness < h:
                    h, limit = per_tooth / stiffness, "force"
        bites.append(h)
        limits.append(limit)
    return bites, limits, stall


def bite(pitch: Pitch, chord: float, cond: CutConditions, run: float | None = None) -> Bite:
    """The limiting bite at one chord (``effective`` allows for ploughing).

    ``run`` is the longest single stretch of metal in the chord: the gullet
    fills over one stretch and empties where the tooth leaves metal (a bore,
    the gap between bars of a bundle; derived), so the gullet limit uses it
    while power and feed force use the whole chord.
    """
    b = _advice_bite(pitch, chord, cond, run)
    force = _force_bite(pitch, chord, cond)
    if force is None:
        return Bite(0.0, 0.0, "force", stalled=True)
    h, limit = (force, "force") if force < b.nominal_mm else (b.nominal_mm, b.limit)
    return Bite(h, _removed(h, cond), limit)


def feed_mm_min(pitch: Pitch, effective_bite_mm: float, band_speed_m_min: float) -> float:
    """v_f = 1000·V·h/p."""
    return 1000.0 * band_speed_m_min * effective_bite_mm / pitch.spacing_mean_mm


def bite_at_feed_mm(pitch: Pitch, feed: float, band_speed_m_min: float) -> float:
    """h = v_f·p/(1000·V): the bite a down-feed gives."""
    return feed * pitch.spacing_mean_mm / (1000.0 * band_speed_m_min)


@dataclass(frozen=True)
class Overload:
    """A set down-feed above what the model allows, at its worst depth."""

    ratio: float  # set bite ÷ allowed bite where it is worst
    limit: str  # the limit the set feed goes over there
    share: float  # share of the metal area cut over the allowed bite


@dataclass(frozen=True)
class FeedIntegral:
    """Time through the section for one pitch, before any shop calibration."""

    cut_time_min: float  # inf when stalled
    feed_set_mm_min: float  # constant feed: the setting; force-limited: the slowest feed
    feed_mean_mm_min: float  # H / t
    bite_mean_mm: float  # nominal bite, time-weighted
    governing_limit: str
    limit_shares: tuple[tuple[str, float], ...]  # time share of each limit, largest first
    rubbing_share: float  # share of the metal area cut with the bite under the rubbing floor
    stalled: bool  # the head cannot load the teeth at some depth
    min_bite_mm: float
    stall_chord_mm: float = 0.0  # the widest chord where the head cannot load the teeth
    overload: Overload | None = None  # only with a set feed


def _runs(quad: Quadrature) -> tuple[float, ...]:
    return quad.runs_mm or quad.chords_mm


def _kink_runs(quad: Quadrature) -> tuple[float, ...]:
    return quad.kink_runs_mm or quad.kink_chords_mm


def _stalled(quad: Quadrature, stall_chord: float) -> FeedIntegral:
    return FeedIntegral(
        cut_time_min=math.inf,
        feed_set_mm_min=0.0,
        feed_mean_mm_min=0.0,
        bite_mean_mm=0.0,
        governing_limit="force",
        limit_shares=(("force", 1.0),),
        rubbing_share=1.0,
        stalled=True,
        min_bite_mm=0.0,
        stall_chord_mm=stall_chord,
    )


def _area_share(quad: Quadrature, flags: list[bool]) -> float:
    total = sum(w * c for w, c in zip(quad.weights_mm, quad.chords_mm, strict=True))
    if total <= 0:
        return 0.0
    part = sum(w * c for w, c, f in zip(quad.weights_mm, quad.chords_mm, flags, strict=True) if f)
    return part / total


def integrate(
    pitch: Pitch,
    quad: Quadrature,
    cond: CutConditions,
    *,
    constant_feed: bool,
    set_feed_mm_min: float | None = None,
) -> FeedIntegral:
    """Time through the section; see the module docstring for the two feed kinds.

    ``set_feed_mm_min`` is a down-feed the operator chose: a constant-feed saw
    runs it everywhere; a force-fed saw runs it where the head's force can
    push it and slower where it cannot.  The result's ``overload`` says where
    it goes over what the model allows.
    """
    chords, runs = quad.chords_mm, _runs(quad)
    kinks, kink_runs = quad.kink_chords_mm, _kink_runs(quad)
    bites, limits, stall = _node_bites(pitch, cond, chords, runs)
    kink_bites, kink_limits, kink_stall = _node_bites(pitch, cond, kinks, kink_runs)
    if max(stall, kink_stall) > 0:
        return _stalled(quad, max(stall, kink_stall))
    if set_feed_mm_min is not None:
        return _integrate_set(pitch, quad, cond, set_feed_mm_min, constant_feed=constant_feed)
    to_feed = 1000.0 * cond.band_speed_m_min / pitch.spacing_mean_mm  # v_f = to_feed·ρ·h
    floor = cond.rubbing_floor_mm
    height = quad.height_mm
    if constant_feed:
        all_bites, all_limits = bites + kink_bites, limits + kink_limits
        k = min(range(len(all_bites)), key=all_bites.__getitem__)
        h = all_bites[k]
        feed = to_feed * _removed(h, cond)
        return FeedIntegral(
            cut_time_min=height / feed,
            feed_set_mm_min=feed,
            feed_mean_mm_min=feed,
            bite_mean_mm=h,
            governing_limit=all_limits[k],
            limit_shares=((all_limits[k], 1.0),),
            rubbing_share=1.0 if h < floor else 0.0,
            stalled=False,
            min_bite_mm=h,
        )
    rho0 = cond.removal_floor
    total = 0.0
    bite_time = 0.0
    shares = dict.fromkeys(LIMITS, 0.0)
    for h, limit, weight in zip(bites, limits, quad.weights_mm, strict=True):
        removed = h if h >= floor else h * (rho0 + (1.0 - rho0) * h / floor)
        dt = weight / (to_feed * removed)
        total += dt
        shares[limit] += dt
        bite_time += h * dt
    least = min(bites + kink_bites)
    slowest = to_feed * _removed(least, cond)
    ranked = _ranked(shares, total)
    return FeedIntegral(
        cut_time_min=total,
        feed_set_mm_min=slowest,
        feed_mean_mm_min=height / total,
        bite_mean_mm=bite_time / total,
        governing_limit=ranked[0][0],
        limit_shares=ranked,
        rubbing_share=_area_share(quad, [h < floor for h in bites]),
        stalled=False,
        min_bite_mm=min(bites),
    )


def _ranked(shares: dict[str, float], total: float) -> tuple[tuple[str, float], ...]:
    return tuple(
        sorted(((k, v / total) for k, v in shares.items() if v > 0), key=lambda kv: -kv[1])
    )


def _integrate_set(
    pitch: Pitch, quad: Quadrature, cond: CutConditions, set_feed: float, *, constant_feed: bool
) -> FeedIntegral:
    """A down-feed the operator set; see ``integrate``."""
    speed = cond.band_speed_m_min
    floor = cond.rubbing_floor_mm
    set_bite = bite_at_feed_mm(pitch, set_feed, speed)
    total = 0.0
    bite_time = 0.0
    min_bite = math.inf
    worst_ratio, worst_limit = 0.0, "material"
    over: list[bool] = []
    rubbing: list[bool] = []
    shares = dict.fromkeys(LIMITS, 0.0)
    nodes = zip(quad.chords_mm, _runs(quad), quad.weights_mm, strict=True)
    for chord, run, weight in nodes:
        advice = _advice_bite(pitch, chord, cond, run)
        force = _force_bite(pitch, chord, cond)  # never None here: stalls are caught first
        h, limit = set_bite, "set"
        if not constant_feed and force is not None and force < h:
            h, limit = force, "force"
        feed = feed_mm_min(pitch, _removed(h, cond), speed) if limit == "force" else set_feed
        dt = weight / feed
        total += dt
        shares[limit] += dt
        bite_time += h * dt
        min_bite = min(min_bite, h)
        ratio = h / advice.nominal_mm
        over.append(ratio > 1.0 + 1e-9)
        rubbing.append(h < floor)
        if ratio > worst_ratio:
            worst_ratio, worst_limit = ratio, advice.limit
    overload = None
    if any(over):
        overload = Overload(
            ratio=worst_ratio,
            limit=worst_limit,
            share=_area_share(quad, over),
        )
    ranked = _ranked(shares, total)
    return FeedIntegral(
        cut_time_min=total,
        feed_set_mm_min=set_feed,
        feed_mean_mm_min=quad.height_mm / total,
        bite_mean_mm=bite_time / total,
        governing_limit=ranked[0][0],
        limit_shares=ranked,
        rubbing_share=_area_share(quad, rubbing),
        stalled=False,
        min_bite_mm=min_bite,
        overload=overload,
    )


def power_limited_rate_mm2_min(
    power_w: float, efficiency: float, unit_energy_j_mm3: float, kerf_mm: float
) -> float:
    """Cutting rate the motor alone allows: A′ = η·P / (u·kerf) (derived)."""
    return efficiency * power_w * 60.0 / (unit_energy_j_mm3 * kerf_mm)
