"""The cut-list optimiser on generated hard orders and shop orders, beside plain FFD.

Run:  python bench/bench_hard_orders.py [--quick]

Sets (generators as published, recalled from memory):
- Falkenauer triplets (Falkenauer 1996): bars of 1000; a first piece uniform in
  [380, 490], a second in [250, (1000 - first) / 2], the third fills the bar:
  optimum = pieces / 3 by construction.
- Schwerin-style (Schwerin & Wäscher 1997): bars of 1000, 100 or 120 pieces
  uniform in [150, 200]; the optimum is taken as ⌈LP⌉ (their sets meet it).
- Wäscher-style (CUTGEN1, Gau & Wäscher 1995): bars of 1000, m lengths uniform in
  [v1·1000, v2·1000], demands a random split of m × mean demand.
- Shop orders: 1,000 pieces × 40 lengths on one stock length; 10,000 pieces ×
  200 lengths on ten stock lengths (priced; goal within 0.1 % of the LP bound).
Per set: runs, optimum hits (plan = known optimum, else its bound), worst gap,
median and max time, median CPU time of the process (a steadier figure than the
wall clock when other work shares the machine), the process's peak memory, and
the same for FFD.  The search is budgeted by work, so a busy machine changes
the times, never the plans.
Goals (issue): triplets of 501 pieces at the optimum in under 10 s; 10,000
pieces × 200 lengths × 10 stock lengths within 0.1 % of the LP bound in under
5 s; peak memory under 500 MB; every plan at least as good as FFD.
"""

from __future__ import annotations

import argparse
import random
import resource
import statistics
import sys
import time
from collections import Counter
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench_optimise import random_order  # noqa: E402

from sawplan.cutlist.optimise.solve import (  # noqa: E402
    Allowances,
    Demand,
    StockType,
    first_fit_decreasing,
    optimise,
)

BAR = [StockType("bar", 1000, None, 1.0)]


def triplets(n_bars: int, rng: random.Random) -> list[Demand]:
    lengths: list[int] = []
    for _ in range(n_bars):
        first = rng.randint(380, 490)
        second = rng.randint(250, (1000 - first) // 2)
        lengths += [first, second, 1000 - first - second]
    return _demand(lengths)


def schwerin(pieces: int, rng: random.Random) -> list[Demand]:
    return _demand([rng.randint(150, 200) for _ in range(pieces)])


def waescher(kinds: int, mean: int, v1: float, v2: float, rng: random.Random) -> list[Demand]:
    lengths = rng.sample(range(int(v1 * 1000), int(v2 * 1000) + 1), kinds)
    weights = [rng.random() for _ in range(kinds)]
    total = kinds * mean
    counts = [max(1, round(w / sum(weights) * total)) for w in weights]
    return [Demand(f"L{n}", n, c) for n, c in zip(lengths, counts, strict=True)]


def _demand(lengths: list[int]) -> list[Demand]:
    return [Demand(f"L{n}", n, c) for n, c in sorted(Counter(lengths).items())]


def shop(pieces: int, kinds: int, rng: random.Random) -> list[Demand]:
    """A shop order as bench_optimise draws it: lengths 150 to 2500 mm, counts split at random."""
    return random_order(rng, pieces, kinds, 150, 2500)


TEN_LENGTHS = [StockType(f"{m} m", m * 600, None, 6.0 * m + 1.0) for m in range(1, 11)]
SHOP_ALLOW = Allowances(kerf=2, trim=5, grip=40, min_remnant=300)


def sets(quick: bool):
    seeds = range(3 if quick else 5)
    yield "triplets 60", [(BAR, triplets(20, random.Random(s)), Allowances(), 20) for s in seeds]
    yield "triplets 120", [(BAR, triplets(40, random.Random(s)), Allowances(), 40) for s in seeds]
    yield "triplets 249", [(BAR, triplets(83, random.Random(s)), Allowances(), 83) for s in seeds]
    if not quick:
        yield (
            "triplets 501",
            [(BAR, triplets(167, random.Random(s)), Allowances(), 167) for s in seeds],
        )
    yield (
        "Schwerin 100",
        [(BAR, schwerin(100, random.Random(s)), Allowances(), None) for s in seeds],
    )
    yield (
        "Schwerin 120",
        [(BAR, schwerin(120, random.Random(s)), Allowances(), None) for s in seeds],
    )
    yield (
        "Waescher m=20",
        [(BAR, waescher(20, 10, 0.1, 0.8, random.Random(s)), Allowances(), None) for s in seeds],
    )
    yield (
        "Waescher m=40",
        [(BAR, waescher(40, 10, 0.2, 0.8, random.Random(s)), Allowances(), None) for s in seeds],
    )
    yield (
        "shop 1k x 40",
        [
            (
                [StockType("6 m", 6000, None, 1.0)],
                shop(1000, 40, random.Random(s)),
                SHOP_ALLOW,
                None,
            )
            for s in seeds
        ],
    )
    yield (
        "shop 10k x 200 x 10",
        [
            (TEN_LENGTHS, shop(10_000, 200, random.Random(s)), SHOP_ALLOW, None)
            for s in range(1 if quick else 2)
        ],
    )


def gap_of(plan, optimum: int | None) -> float:
    """Bars above the optimum (or ⌈LP⌉); with several stock types, % of cost above the bound."""
    if plan.objective == "bars":
        best = optimum if optimum is not None else plan.objective_bound
        return plan.bar_count - best
    return 100.0 * plan.gap / plan.objective_value if plan.objective_value else 0.0


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="fewer seeds, no 501-piece set")
    parser.add_argument("--time-limit", type=float, default=60.0)
    args = parser.parse_args()
    optimise(BAR, [Demand("a", 10, 1)])  # imports
    head = (
        f"{'set':<20} {'runs':>4} {'hits':>4} {'worst':>7} {'median s':>8} {'max s':>6} "
        f"{'cpu s':>6} {'peak MB':>7} | {'FFD hits':>8} {'FFD worst':>9}"
    )
    print(head)
    print("-" * len(head))
    for name, cases in sets(args.quick):
        times, cpu, gaps, ffd_gaps = [], [], [], []
        for stock, demand, allow, optimum in cases:
            started, cpu_started = time.perf_counter(), time.process_time()
            plan = optimise(stock, demand, allow, time_limit_s=args.time_limit)
            times.append(time.perf_counter() - started)
            cpu.append(time.process_time() - cpu_started)
            ffd = first_fit_decreasing(stock, demand, allow)
            gaps.append(gap_of(plan, optimum))
            if plan.objective == "bars":
                ffd_gaps.append(ffd.bar_count - (optimum or plan.objective_bound))
            else:
                ffd_gaps.append(
                    100.0 * (ffd.material_cost - plan.objective_bound) / ffd.material_cost
                )
            assert plan.bar_count <= ffd.bar_count or plan.objective != "bars", name
        unit = "" if cases[0][0] is BAR or len(cases[0][0]) == 1 else " %"
        peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
        print(
            f"{name:<20} {len(cases):>4} {sum(g <= 1e-9 for g in gaps):>4} "
            f"{max(gaps):>5.3g}{unit:<2} {statistics.median(times):>8.2f} {max(times):>6.2f} "
            f"{statistics.median(cpu):>6.2f} {peak:>7.0f} | {sum(g <= 1e-9 for g in ffd_gaps):>8} {max(ffd_gaps):>7.3g}{unit:<2}"
        )


if __name__ == "__main__":
    main()
