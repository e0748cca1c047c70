"""A bar's cut list as sheet rows, worked out once for every bar cut alike.

A large job repeats a few bar patterns thousands of times (the optimiser's
fillings); formatting every position and weight again for each bar is most of
a sheet's time.  ``PerPattern`` keeps the text of each pattern, keyed by
everything a bar's rows and drawing read apart from its number and its stock
line, and ``StockText`` the text of each stock line.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Generic, TypeVar

from sawplan.display import Display

T = TypeVar("T")


def pattern(bar) -> tuple:
    """What a bar's cut rows and drawing depend on, apart from its number and stock line."""
    return (
        bar.pieces, bar.trim_mm, bar.trim_cut_mm, bar.length_mm, bar.remnant_start_mm,
        bar.remnant_mm, bar.remnant_kept, bar.remnant_weight_kg, bar.heat, bar.weight_kg,
        bar.handling, bar.cuts,
    )  # fmt: skip


class PerPattern(Generic[T]):
    """``make(bar)`` called once per bar pattern; bars cut alike get the same result."""

    def __init__(self, make: Callable[[object], T]) -> None:
        self.make = make
        self.seen: dict[tuple, T] = {}

    def __call__(self, bar) -> T:
        key = pattern(bar)
        found = self.seen.get(key)
        if found is None:
            found = self.seen[key] = self.make(bar)
        return found


class StockText:
    """What to fetch, in the sheet's units, once per stock line (a bar's ``stock``
    text is made from its stock entry: same entry and wording, same quantities)."""

    def __init__(self, d: Display) -> None:
        self.d = d
        self.seen: dict[tuple[int, str], str] = {}

    def __call__(self, bar) -> str:
        key = (bar.stock_entry, str(bar.stock))
        found = self.seen.get(key)
        if found is None:
            found = self.seen[key] = self.d.text(bar.stock)
        return found


@dataclass(frozen=True)
class PieceRow:
    """One line of a bar's cut list: a piece, or a run of equal pieces in a row."""

    first: object  # PieceCut
    last: object
    count: int

    def step(self, d: Display) -> str:
        return str(self.first.seq) if self.count == 1 else f"{self.first.seq}–{self.last.seq}"

    def span(self, d: Display) -> str:
        return d.span(self.first.start_mm, self.last.end_mm)

    def what(self, d: Display) -> str:
        p = self.first
        text = f"{p.mark} {p.part} ({d.tape(p.length_mm)})"
        if self.count > 1:
            pitch = (self.last.start_mm - p.start_mm) / (self.count - 1)
            text += f" ×{self.count}, one every {d.tape(pitch)}"
        return text

    def weight(self, d: Display) -> str:
        return d.fmt("mass", self.first.weight_kg) + (" each" if self.count > 1 else "")


def piece_rows(bar, run: int = 3) -> list[PieceRow]:
    """The bar's pieces, with ``run`` or more equal pieces in a row on one line."""
    groups: list[list] = []
    for p in bar.pieces:
        if groups and groups[-1][0].mark == p.mark:
            groups[-1].append(p)
        else:
            groups.append([p])
    rows: list[PieceRow] = []
    for g in groups:
        if len(g) >= run:
            rows.append(PieceRow(g[0], g[-1], len(g)))
        else:
            rows += [PieceRow(p, p, 1) for p in g]
    return rows
