"""Terminal charts of the log: golden text for a small fixed data set, plus checks of geometry.

The golden strings are the reviewed, colourless output of plotext 6 for the
inputs below; they pin the layout (axes, ticks, key).  The other checks do not
rest on that output: bar lengths must be proportional to the counts and costs
(computed here from the inputs), every failure must appear as a point, and the
probability axis must carry the median-rank probabilities.
"""

from __future__ import annotations

import math

import pytest

from sawplan.charts import cost_chart, modes_chart, wear_chart, weibull_chart
from sawplan.life import (
    WeibullFit,
    blade_cost_per_area,
    rank_failure_modes,
    wear_curve,
    weibull_plot,
)

AREAS = [200.0] * 10  # cm² per cut
TIMES = [4.0, 3.6, 3.4, 3.3, 3.3, 3.4, 3.5, 3.9, 4.4, 4.8]  # min per cut: break-in, steady, wear
LIVES = [800.0, 1500.0, 2500.0, 3000.0, 4000.0, 5200.0]  # cm²
FAILED = [True, True, True, False, True, True]
MODES = ["stripped", "stripped", "stripped", "dull", "weld", "dull", None]
COSTS = (("M42 3/4", 60.0, 20000.0), ("M42 5/8", 55.0, 10000.0))  # type, price, life cm²


def fixed_fit(shape: float, scale: float) -> WeibullFit:
    """A fit with chosen parameters (the plot uses shape, scale and B10 only)."""
    return WeibullFit(
        shape=shape,
        scale_cm2=scale,
        n=6,
        failures=5,
        censored=1,
        shape_ci=(shape, shape),
        scale_ci_cm2=(scale, scale),
        confidence=0.9,
        log_likelihood=0.0,
        median_life_cm2=scale * math.log(2) ** (1 / shape),
        b10_life_cm2=scale * (-math.log(0.9)) ** (1 / shape),
        b10_ci_cm2=(0.0, 0.0),
        mean_life_cm2=scale * math.gamma(1 + 1 / shape),
        shape_se=0.0,
        scale_se_cm2=0.0,
    )


def charts() -> dict[str, str]:
    costs = [blade_cost_per_area(t, p, life_cm2=life) for t, p, life in COSTS]
    return {
        "wear": wear_chart(wear_curve(AREAS, TIMES), title="blade T-1", width=60, height=14),
        "weibull": weibull_chart(
            weibull_plot(LIVES, FAILED, fixed_fit(2.0, 3500.0)), width=60, height=14
        ),
        "modes": modes_chart(rank_failure_modes(MODES), width=50),
        "cost": cost_chart(costs, width=50),
    }


WEAR = """\
                          blade T-1
  ┌────────────────────────────────────────────────────────┐
  │                                                        │
60┼────────────────o─────o▄▄▞▀o▀▀▀▀o▀▚▄▄▄▄▄▄▄▄▄▄▄▄▄────────┤
  │           o▄▄▄▄▀▀▀▀▀▀▘               o         ▀▀▀▄▖   │
50┤     o▄▄▀▀▀▀                               o        ▝▀▘ │
  ├─────────────────────────────────────────────────o──────┤
  │                                                      o │
40┤                                                        │
  │                                                        │
30┤                                                        │
  └┬──────────────────────────┬──────────────────────────┬─┘
   0                        1,000                     2,000
rate (cm²/min)          area cut (cm²)
o each cut   ▚ trend (median of 5)   ── steady rate 58.8, and end-of-life signs (time per area +30%)
verdict: steady wear
"""

WEIBULL = """\
                   Weibull probability plot
     ┌─────────────────────────────────────────────────────┐
  90%┤                                                 ▄▄▖ │
     │                                          ▗▄▄▄▀▀o    │
63.2%┤                                    ▄▄▄▞▀▀o          │
  50%┤                             ▗▄o▄▀▀▀                 │
     │                   o   ▗▄▄▞▀▀▘                       │
  20%┤                 ▄▄▄▀▀▀▘                             │
  10%┤    o     ▗▄▄▞▀▀▀                                    │
   5%┤    ▄▄▄▀▀▀▘                                          │
     │ ▝▀▀                                                 │
     └─────────┬────────────────┬────────────────────┬─────┘
             1,000            2,000                5,000
failed         life, area cut (cm², log scale)
o failures (median ranks)   ▚ fitted Weibull
"""

MODES_CHART = """\
                   failure modes
        ┌────────────────────────────────────────┐
        │████████████████████████████████████████│
stripped┤████████████████████████████████████████│
        │████████████████████████████████████████│
        │███████████████████████████             │
    dull┤███████████████████████████             │
        │███████████████████████████             │
        │██████████████                          │
    weld┤██████████████                          │
        │██████████████                          │
        └┬────────────┬────────────┬────────────┬┘
         0            1            2            3
                       blades
1 failure(s) without a recorded mode are not shown
"""

COST = """\
              blade cost per area cut
       ┌─────────────────────────────────────────┐
       │█████████████████████                    │
M42 3/4┤█████████████████████                    │
       │█████████████████████                    │
       │██████████████████████████████████████   │
M42 5/8┤██████████████████████████████████████   │
       │██████████████████████████████████████   │
       └┬────────────┬─────────────┬────────────┬┘
        0            20            40          60
                  cost per m² cut
"""


@pytest.mark.parametrize(
    ("name", "golden"),
    [
        pytest.param("wear", WEAR, id="wear curve"),
        pytest.param("weibull", WEIBULL, id="Weibull plot"),
        pytest.param("modes", MODES_CHART, id="failure modes"),
        pytest.param("cost", COST, id="cost per area"),
    ],
)
def test_golden_text(name, golden):
    assert charts()[name] == golden.rstrip("\n")


def test_charts_are_colourless_and_sized():
    for text in charts().values():
        assert "\x1b[" not in text
    plot_lines = charts()["wear"].split("\n")[:14]
    assert max(len(line) for line in plot_lines) == 60


def _bar_lengths(text: str, labels: list[str]) -> dict[str, int]:
    lengths = {}
    for line in text.split("\n"):
        for label in labels:
            if line.lstrip().startswith(label + "┤"):
                lengths[label] = line.count("█")
    return lengths


def test_mode_bars_are_proportional_to_counts():
    text = charts()["modes"]
    counts = {"stripped": 3, "dull": 2, "weld": 1}  # counted from MODES
    lengths = _bar_lengths(text, list(counts))
    full = lengths["stripped"]
    for mode, n in counts.items():
        assert lengths[mode] == pytest.approx(full * n / 3, abs=1)
    # most frequent on top
    order = [
        line.lstrip().split("┤")[0] for line in text.split("\n") if "┤" in line and "█" in line
    ]
    assert order == ["stripped", "dull", "weld"]
    assert "1 failure(s) without a recorded mode" in text


def test_cost_bars_are_proportional_to_price_over_life():
    lengths = _bar_lengths(charts()["cost"], ["M42 3/4", "M42 5/8"])
    per_m2 = {t: p / life * 1e4 for t, p, life in COSTS}  # price ÷ life, 1 m² = 10⁴ cm²
    ratio = per_m2["M42 3/4"] / per_m2["M42 5/8"]
    assert lengths["M42 3/4"] / lengths["M42 5/8"] == pytest.approx(ratio, abs=0.05)


def test_every_failure_is_a_point_on_the_weibull_plot():
    text = charts()["weibull"]
    plot_lines = text.split("\n")[1:-3]  # between the title and the axis labels and key
    assert sum(line.count("o") for line in plot_lines) == sum(FAILED)
    for label in ("10%", "50%", "90%", "1,000", "2,000", "5,000"):
        assert label in text


def test_wear_points_and_verdict():
    curve = wear_curve(AREAS, TIMES)
    text = charts()["wear"]
    plot_lines = text.split("\n")[1:12]
    assert sum(line.count("o") for line in plot_lines) == len(AREAS)
    assert "verdict: steady wear" in text and curve.status == "steady"


def test_empty_data_says_so():
    assert "no timed cuts" in wear_chart(wear_curve([], []))
    assert "no failures" in modes_chart(rank_failure_modes([]))
    assert "no blade type" in cost_chart([])
