"""Bounded knapsack by dynamic programming over capacity.

This is the pricing step of column generation: given a value per piece (the
dual prices of the master LP) find the bar filling of greatest value.  One
table answers every capacity up to the largest, so one solve prices all stock
lengths at once.  Each item of bound b is split into 0/1 parts of 1, 2, 4, ...
copies (binary splitting), and each part updates the whole capacity row with
one numpy operation.  Weights and capacities are divided by the gcd of the
weights first, which makes fine resolutions (0.1 mm) cheap when the sizes allow.

The table of choices is kept one bit per (part, capacity), packed eight to a
byte, and refused (``TableTooLarge``) past ``MAX_TABLE_BITS``: a thousand
lengths on a 12 m bar at 0.1 mm would otherwise take a gigabyte per pricing.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from math import gcd
from typing import Any

_TIE = 1e-12
MAX_TABLE_BITS = 1_000_000_000  # 125 MB of choices; seconds of numpy work per pricing


class TableTooLarge(ValueError):
    """The pricing table would outgrow its memory budget."""


@dataclass(frozen=True)
class KnapsackTable:
    """Best value for every capacity, and the choices needed to read a filling back."""

    best: Any  # numpy float array: best[c] = best value with total weight <= c * unit
    unit: int  # the gcd the weights were divided by
    parts: tuple[tuple[int, int, int], ...]  # (item, copies, reduced weight) per 0/1 part
    take: Any  # numpy uint8 [part, capacity bits packed]: part taken in the best filling
    n_items: int

    def _index(self, capacity: int) -> int:
        return min(capacity // self.unit, len(self.best) - 1)

    def value(self, capacity: int) -> float:
        """Greatest value of a filling whose total weight is at most ``capacity``."""
        if capacity < 0:
            return 0.0
        return float(self.best[self._index(capacity)])

    def filling(self, capacity: int) -> tuple[int, ...]:
        """Copies of each item in a best filling for ``capacity``."""
        if capacity < 0:
            return (0,) * self.n_items
        return self._filling_at(self._index(capacity))

    def good_fillings(self, capacity: int, above: float, limit: int) -> list[tuple[int, ...]]:
        """Up to ``limit`` different best fillings for capacities at most ``capacity``
        whose value exceeds ``above``, best first (extra columns from one solve)."""
        import numpy as np

        if capacity < 0:
            return []
        top = self._index(capacity)
        best = self.best[: top + 1]
        steps = np.flatnonzero(np.diff(best) > _TIE) + 1  # where the best value rises
        steps = steps[best[steps] > above][::-1][:limit]
        return [self._filling_at(int(c)) for c in steps]

    def _filling_at(self, c: int) -> tuple[int, ...]:
        """Walk the parts back from the last: each taken part frees its weight."""
        import numpy as np

        counts = [0] * self.n_items
        p = len(self.parts)
        while p > 0:
            bits = (self.take[:p, c >> 3] >> (7 - (c & 7))) & 1  # np.packbits is big-endian
            taken = np.flatnonzero(bits)  # the next part back taken at c
            if not len(taken):
                break
            p = int(taken[-1])
            item, copies, weight = self.parts[p]
            counts[item] += copies
            c -= weight
        return tuple(counts)


def solve_bounded_knapsack(
    weights: Sequence[int],
    values: Sequence[float],
    bounds: Sequence[int],
    capacity: int,
) -> KnapsackTable:
    """Maximise sum(values[j] * a[j]) with sum(weights[j] * a[j]) <= c, 0 <= a[j] <= bounds[j].

    Solved for every c up to ``capacity``; items of zero value or bound are left out.
    """
    import numpy as np

    n_items = len(weights)
    active = [
        j
        for j in range(n_items)
        if values[j] > _TIE and bounds[j] > 0 and 0 < weights[j] <= capacity
    ]
    unit = 0
    for j in active:
        unit = gcd(unit, weights[j])
    unit = max(unit, 1)
    size = capacity // unit
    parts: list[tuple[int, int, int]] = []
    for j in active:
        w = weights[j] // unit
        bound = min(bounds[j], size // w)
        copies = 1
        while bound > 0:
            take = min(copies, bound)
            parts.append((j, take, w * take))
            bound -= take
            copies *= 2
    if len(parts) * (size + 1) > MAX_TABLE_BITS:
        raise TableTooLarge(
            f"{len(parts):,} parts × {size + 1:,} capacities exceed {MAX_TABLE_BITS:,} bits"
        )
    best = np.zeros(size + 1)
    buffer = np.empty(size + 1)
    row = np.zeros(size + 1, dtype=bool)
    take_table = np.empty((len(parts), (size + 8) // 8), dtype=np.uint8)
    for p, (j, copies, w) in enumerate(parts):
        n = size + 1 - w
        candidate = buffer[:n]
        np.add(best[:n], values[j] * copies - _TIE, out=candidate)  # ties keep the part out
        row[:w] = False  # capacities below the part's weight cannot take it
        better = row[w:]
        np.greater(candidate, best[w:], out=better)
        np.add(candidate, _TIE, out=best[w:], where=better)
        take_table[p] = np.packbits(row)
    return KnapsackTable(best, unit, tuple(parts), take_table, n_items)
