"""One bar of a plan: where each piece lies from the head, the cuts, the remnant, the weights.

Length bookkeeping (the optimiser's, docs/cut-lists.md): the first piece starts
at ``trim`` (the squaring cut's kerf lies inside the trim); each piece costs its
length plus one kerf; the tail after the last piece loses one more kerf when
the last cut is made, and what is left is the remnant.  A bar filled exactly
(no tail) needs no last cut.
"""

from __future__ import annotations

from functools import lru_cache
from typing import Any

from sawplan.cutlist.jobfile.types import PartLine, StockLine
from sawplan.cutlist.plan.types import BarCut, PieceCut
from sawplan.display import Q, say


@lru_cache(maxsize=4096)
def _assess(mass_kg: float, shape: str, length_mm: float, width_mm: float) -> Any:
    """Handling of one piece; pieces of a part are alike, so each is assessed once."""
    from sawplan.piece_handling import Piece, assess_piece

    return assess_piece(mass_kg, Piece(shape, length_mm, width_mm))


@lru_cache(maxsize=1024)
def _stock_words(label: str, length_mm: float, remnant: bool) -> Any:
    """What a bar is cut from; one phrase (immutable) for all the bars of a stock line."""
    return say("{} × {}{}", label, Q("bar_length", length_mm), " (rack remnant)" * remnant)


def bar_layout(
    length_mm: float, piece_lengths_mm: list[float], kerf_mm: float, trim_mm: float
) -> tuple[list[tuple[float, float]], float | None, float | None, float, float]:
    """Positions on one bar from the head (the bookkeeping of docs/cut-lists.md).

    Returns (piece (start, end) list, squaring-cut position or None, last-cut
    position or None, remnant start, remnant length).  The squaring cut parts
    the trim at ``trim``; piece i+1 starts one kerf after piece i ends; if
    anything is left after the last piece, the last cut is made there and the
    remnant is what remains after its kerf.
    """
    spans: list[tuple[float, float]] = []
    x = trim_mm
    for i, ell in enumerate(piece_lengths_mm):
        if i:
            x += kerf_mm
        spans.append((x, x + ell))
        x += ell
    tail = length_mm - x
    if tail <= 1e-9:
        return spans, (trim_mm if trim_mm > 0 else None), None, length_mm, 0.0
    remnant = max(tail - kerf_mm, 0.0)
    return spans, (trim_mm if trim_mm > 0 else None), x, length_mm - remnant, remnant


def bar_cut(
    number: int,
    label: str,
    s: StockLine,
    parts: list[PartLine],
    marks: dict[int, str],
    kerf_mm: float,
    trim_mm: float,
    kg_per_m: float,
    time_per_cut: float,
    min_remnant_mm: float,
    section: Any,
) -> BarCut:
    """Bar ``number`` with its pieces placed, its cuts counted, weights, handling and cost.

    Handling goes by weight, shape and length (``sawplan.piece_handling``): a
    light bar of several metres is still a lift for two.
    """

    def handling(mass_kg: float, length_mm: float):
        return _assess(mass_kg, section.shape, length_mm, section.width_mm)

    spans, trim_cut, last_cut, rem_start, remnant = bar_layout(
        s.length_mm, [p.length_mm for p in parts], kerf_mm, trim_mm
    )
    pieces = []
    for seq, (p, (a, b)) in enumerate(zip(parts, spans, strict=True), start=1):
        w = kg_per_m * p.length_mm / 1000.0
        pieces.append(
            PieceCut(
                seq=seq, part=p.name, mark=marks[p.index], start_mm=a, end_mm=b,
                length_mm=p.length_mm, weight_kg=w, handling=handling(w, p.length_mm).handling,
                drawing=p.drawing, tolerance=p.tolerance,
            )
        )  # fmt: skip
    # squaring cut (if any) + one per piece, less the last when the bar is used exactly
    cuts = (1 if trim_cut is not None else 0) + len(parts) - (0 if last_cut is not None else 1)
    weight = kg_per_m * s.length_mm / 1000.0
    lift = handling(weight, s.length_mm)
    # Kept or scrap is decided on the exact remnant shown on the sheet (the
    # optimiser saw lengths rounded to 0.1 mm, pieces up and bars down).
    kept = remnant > 1e-9 and remnant + 1e-9 >= min_remnant_mm
    return BarCut(
        bar=number,
        group=label,
        material=s.material,
        section=s.section_text,
        stock=_stock_words(label, s.length_mm, s.remnant),
        stock_entry=s.index,
        location=s.location,
        heat=s.heat,
        from_rack_remnant=s.remnant,
        length_mm=s.length_mm,
        kerf_mm=kerf_mm,
        trim_mm=trim_mm,
        trim_cut_mm=trim_cut,
        pieces=tuple(pieces),
        last_cut_mm=last_cut,
        cuts=cuts,
        remnant_start_mm=rem_start,
        remnant_mm=remnant,
        remnant_kept=kept,
        remnant_weight_kg=kg_per_m * remnant / 1000.0,
        weight_kg=weight,
        handling=lift.handling,
        lifting_index=lift.lifting_index,
        cost=bar_cost(s, kg_per_m),
        cut_time_min=cuts * time_per_cut,
    )


def bar_cost(s: StockLine, kg_per_m: float) -> float:
    """Price per bar, or price per kg × the bar's weight; an unpriced rack remnant is free."""
    if s.price is not None:
        return s.price
    if s.price_per_kg is not None:
        return s.price_per_kg * kg_per_m * s.length_mm / 1000.0
    return 0.0
