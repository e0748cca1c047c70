"""Tooth bite limits and the time to feed through a section (reference §4).

At each depth y the bite h is the smallest of five limits — material, gullet,
tooth strength, motor power and (on gravity or hydraulic feeds) head force.
Below the rubbing floor h_min a tooth ploughs and removes only ≈ h/h_min of
its nominal bite.  Down-feed v_f = 1000·V·h/p.  Force-limited feeds follow the
chord, so t = ∫ dy / v_f(y); a constant down-feed is set for the worst depth,
so t = H / min v_f(y).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Protocol

from sawplan.cutting.pitch import MM_PER_IN, Pitch

LIMITS = ("material", "gullet", "tooth", "power", "force")

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


@dataclass(frozen=True)
class Bite:
    nominal_mm: float
    effective_mm: float
    limit: str


def bite(pitch: Pitch, chord: float, cond: CutConditions, run: float | None = None) -> Bite:
    """The limiting bite at one chord (``effective`` allows for rubbing).

    ``run`` is the longest single stretch of metal in the chord: the gullet
    fills over one stretch and empties where the tooth leaves metal (a bore,
    the gap between bars of a bundle; derived), so the gullet limit uses it
    while power and feed force use the whole chord.
    """
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
        if cond.head_force_n is not None:
            teeth = max(1.0, chord * pitch.tpi_mean / MM_PER_IN)
            force = (cond.head_force_n / teeth - cond.plough_force_n) / (
                cond.thrust_n_mm2 * cond.kerf_mm
            )
            if force < h:
                h, limit = force, "force"
    floor = cond.rubbing_floor_mm
    h = max(h, 1e-3 * floor)  # a stalled head still scrapes; keeps the time finite
    effective = h if h >= floor else h * h / floor
    return Bite(h, effective, limit)


def feed_mm_min(pitch: Pitch, effective_bite_mm: float, band_speed_m_min: float) -> float:
    """v_f = 1000·V·h/p."""
    return 1000.0 * band_speed_m_min * effective_bite_mm / pitch.spacing_mean_mm


@dataclass(frozen=True)
class FeedIntegral:
    """Time through the section for one pitch, before any shop calibration."""

    cut_time_min: float
    feed_set_mm_min: float  # constant feed: the setting; force-limited: the slowest feed
    feed_mean_mm_min: float  # H / t
    bite_mean_mm: float  # nominal bite, time-weighted
    governing_limit: str
    limit_shares: tuple[tuple[str, float], ...]  # time share of each limit, largest first
    rubbing_share: float  # share of time with the bite under the rubbing floor
    stalled: bool  # head force too low for teeth to bite at some depth
    min_bite_mm: float


def _runs(quad: Quadrature) -> tuple[float, ...]:
    return quad.runs_mm or quad.chords_mm


def _kink_runs(quad: Quadrature) -> tuple[float, ...]:
    return quad.kink_runs_mm or quad.kink_chords_mm


def integrate(
    pitch: Pitch, quad: Quadrature, cond: CutConditions, *, constant_feed: bool
) -> FeedIntegral:
    """Time through the section; see the module docstring for the two feed kinds."""
    speed = cond.band_speed_m_min
    floor = cond.rubbing_floor_mm
    height = quad.height_mm
    if constant_feed:
        worst: Bite | None = None
        for chord, run in zip(
            quad.chords_mm + quad.kink_chords_mm, _runs(quad) + _kink_runs(quad), strict=True
        ):
            b = bite(pitch, chord, cond, run)
            if worst is None or b.nominal_mm < worst.nominal_mm:
                worst = b
        assert worst is not None
        feed = feed_mm_min(pitch, worst.effective_mm, speed)
        return FeedIntegral(
            cut_time_min=height / feed,
            feed_set_mm_min=feed,
            feed_mean_mm_min=feed,
            bite_mean_mm=worst.nominal_mm,
            governing_limit=worst.limit,
            limit_shares=((worst.limit, 1.0),),
            rubbing_share=1.0 if worst.nominal_mm < floor else 0.0,
            stalled=worst.nominal_mm <= 1.0001e-3 * floor,
            min_bite_mm=worst.nominal_mm,
        )
    total = 0.0
    bite_time = 0.0
    rubbing = 0.0
    slowest = math.inf
    min_bite = math.inf
    stalled = False
    shares = dict.fromkeys(LIMITS, 0.0)
    for chord, run, weight in zip(quad.chords_mm, _runs(quad), quad.weights_mm, strict=True):
        b = bite(pitch, chord, cond, run)
        feed = feed_mm_min(pitch, b.effective_mm, speed)
        dt = weight / feed
        total += dt
        shares[b.limit] += dt
        bite_time += b.nominal_mm * dt
        if b.nominal_mm < floor:
            rubbing += dt
            stalled = stalled or b.nominal_mm <= 1.0001e-3 * floor
        slowest = min(slowest, feed)
        min_bite = min(min_bite, b.nominal_mm)
    for chord, run in zip(quad.kink_chords_mm, _kink_runs(quad), strict=True):
        b = bite(pitch, chord, cond, run)
        slowest = min(slowest, feed_mm_min(pitch, b.effective_mm, speed))
    ranked = tuple(
        sorted(((k, v / total) for k, v in shares.items() if v > 0), key=lambda kv: -kv[1])
    )
    return FeedIntegral(
        cut_time_min=total,
        feed_set_mm_min=slowest,
        feed_mean_mm_min=height / total,
        bite_mean_mm=bite_time / total,
        governing_limit=ranked[0][0],
        limit_shares=ranked,
        rubbing_share=rubbing / total,
        stalled=stalled,
        min_bite_mm=min_bite,
    )


def power_limited_rate_mm2_min(
    power_w: float, efficiency: float, unit_energy_j_mm3: float, kerf_mm: float
) -> float:
    """Cutting rate the motor alone allows: A′ = η·P / (u·kerf) (reference §4)."""
    return efficiency * power_w * 60.0 / (unit_energy_j_mm3 * kerf_mm)
