"""Below the minimum chip thickness: what a tooth removes, and when it cannot bite at all.

A saw tooth's edge is rounded (radius r_e of 5-15 µm on a band-saw tooth,
Sarwar et al.).  Under a minimum chip thickness h_min ≈ 0.2-0.3·r_e (Vogler,
DeVor and Kapoor 2004) the edge ploughs: it presses and smears the layer
instead of shearing it off as a chip.  What it does not cut is left for the
following teeth (the static chip-formation model of Kim, Mayor and Ni 2004),
so removal slows but does not stop:

    ρ(h) = 1                                     h ≥ h_min
    ρ(h) = ρ₀ + (1 − ρ₀)·h/h_min                 h < h_min

is the share of its nominal bite h a tooth removes; ρ₀ (``removal_floor``)
bounds the slow-down at 1/ρ₀.  An earlier rule, ρ = h/h_min with no floor,
made cut times run away to months.

On a gravity or hydraulic feed the head's force F is shared by the n teeth in
the chord, and each needs the edge force F₀ before it bites at all (the edge
term of the linear edge-force model F = F₀ + k_t·b·h).  When F/n ≤ F₀ the
teeth cannot be loaded: the cut does not progress — a state, not a time.
"""

from __future__ import annotations

from sawplan.cutting.pitch import MM_PER_IN, Pitch


def min_chip_thickness_mm(edge_radius_mm: float, ratio: float) -> float:
    """h_min = ratio × r_e."""
    return edge_radius_mm * ratio


def removal_share(bite_mm: float, floor_mm: float, removal_floor: float) -> float:
    """ρ: share of the nominal bite a tooth removes (1 at and above the floor)."""
    if bite_mm >= floor_mm:
        return 1.0
    x = max(bite_mm, 0.0) / floor_mm
    return removal_floor + (1.0 - removal_floor) * x


def teeth_in_chord(pitch: Pitch, chord_mm: float) -> float:
    """Teeth sharing the head's force: the mean pitch over the chord (at least one)."""
    return max(1.0, chord_mm * pitch.tpi_mean / MM_PER_IN)


def force_bite_mm(
    head_force_n: float, teeth: float, edge_force_n: float, thrust_n_mm2: float, kerf_mm: float
) -> float | None:
    """h = (F/n − F₀)/(k_t·kerf); None when F/n ≤ F₀ (the teeth cannot be loaded)."""
    per_tooth = head_force_n / teeth - edge_force_n
    if per_tooth <= 0.0:
        return None
    return per_tooth / (thrust_n_mm2 * kerf_mm)


def teeth_the_head_can_load(head_force_n: float, edge_force_n: float) -> float:
    """F/F₀: more teeth than this in the chord and the head cannot make them bite."""
    return head_force_n / edge_force_n
