"""Speed and quality of the cut-list optimiser on random orders.

Run:  python bench/bench_optimise.py [--seeds N]

Orders are random (fixed seeds): pieces of 50 (or 200) distinct lengths drawn
uniformly from a range, counts split at random, cut from 6 m bars with a 2 mm
kerf, 5 mm squaring trim, 50 mm grip and 300 mm shortest kept remnant.  The
table shows the time, bars used, the LP bound rounded up, the gap, FFD alone for
comparison, waste as a share of the stock used, the material cost and the LP
bound of the cost.  The "mixed" rows cut from 6, 4 and 3 m bars (the 3 m ones
limited to 20) and ten remnants.  Goals: 1,000 pieces in
under 1 s within one bar of ceil(LP); 10,000 pieces in under 10 s.  The 0.1 mm
rows draw lengths to 0.1 mm with a 1.8 mm kerf (no common divisor to exploit).
The optimiser runs with its default time limit (5 s).
"""

from __future__ import annotations

import argparse
import random
import sys
import time
from math import ceil
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from sawplan.cutlist.optimise.solve import (  # noqa: E402
    Allowances,
    Demand,
    StockType,
    first_fit_decreasing,
    optimise,
)


def random_order(rng: random.Random, pieces: int, kinds: int, low: int, high: int) -> list[Demand]:
    lengths = rng.sample(range(low, high + 1), kinds)
    cuts = sorted(rng.sample(range(1, pieces), kinds - 1))
    counts = [b - a for a, b in zip([0, *cuts], [*cuts, pieces], strict=True)]
    return [Demand(f"P{i + 1}", n, c) for i, (n, c) in enumerate(zip(lengths, counts, strict=True))]


def one_length(factor: int, rng: random.Random) -> list[StockType]:
    return [StockType("6 m bar", 6_000 * factor, None, 1.0)]


def mixed_stock(factor: int, rng: random.Random) -> list[StockType]:
    """Three bar lengths (the 3 m ones limited) and ten remnants on the rack."""
    stock = [
        StockType("6 m", 6_000, None, 60.0),
        StockType("4 m", 4_000, None, 42.0),
        StockType("3 m", 3_000, 20, 33.0),
    ]
    for i in range(10):
        stock.append(StockType(f"R{i + 1}", rng.randint(800, 2_500), 1, 0.0, is_remnant=True))
    return stock


CASES = [
    # label, pieces, distinct lengths, shortest, longest (mm), resolution factor, stock
    ("1k x 50, 1 mm", 1_000, 50, 150, 2_500, 1, one_length),
    ("1k x 50 long, 1 mm", 1_000, 50, 1_000, 3_000, 1, one_length),
    ("1k x 50, 0.1 mm", 1_000, 50, 150, 2_500, 10, one_length),
    ("1k x 50, mixed", 1_000, 50, 150, 2_500, 1, mixed_stock),
    ("10k x 50, 1 mm", 10_000, 50, 150, 2_500, 1, one_length),
    ("10k x 200, 1 mm", 10_000, 200, 150, 2_500, 1, one_length),
    ("10k x 200, 0.1 mm", 10_000, 200, 150, 2_500, 10, one_length),
]


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seeds", type=int, default=3, help="random orders per row")
    args = parser.parse_args()
    header = (
        f"{'case':<20} {'seed':>4} {'pieces':>6} {'time s':>7} {'bars':>5} "
        f"{'ceil LP':>7} {'gap':>3} {'FFD':>5} {'method':<18} {'waste %':>7} {'cost':>8} "
        f"{'LP cost':>8}"
    )
    print(header)
    print("-" * len(header))
    optimise([StockType("warm-up", 100, None, 1.0)], [Demand("a", 10, 1)])  # imports
    for label, pieces, kinds, low, high, factor, make_stock in CASES:
        for seed in range(args.seeds):
            rng = random.Random(1_000 * seed + pieces + kinds)
            order = random_order(rng, pieces, kinds, low * factor, high * factor)
            stock = make_stock(factor, rng)
            kerf = 18 if factor == 10 else 2
            allow = Allowances(kerf, trim=5 * factor, grip=50 * factor, min_remnant=300 * factor)
            started = time.perf_counter()
            plan = optimise(stock, order, allow)
            seconds = time.perf_counter() - started
            ffd = first_fit_decreasing(stock, order, allow)
            used = sum(b.stock_length for b in plan.bars)
            print(
                f"{label:<20} {seed:>4} {pieces:>6} {seconds:>7.2f} {plan.bar_count:>5} "
                f"{ceil(plan.lp_bound_bars - 1e-6):>7} {plan.gap_bars:>3} {ffd.bar_count:>5} "
                f"{plan.method:<18} {100 * plan.waste / used:>7.2f} {plan.material_cost:>8.0f} "
                f"{plan.lp_bound_cost:>8.0f}"
            )


if __name__ == "__main__":
    main()
