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
from hypothesis import given, settings
from hypothesis import strategies as st

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
        b10_ci_cm2=(0.0, 0.0),
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
o each cut   ▚ trend (median of 5)   ── steady rate 58.8, and end-of-life signs (time per area +30 %)
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


# --- axis ticks of the Weibull plot ---------------------------------------------------------

WIDE_LIVES = [8.66, 37.1, 685.0, 1390.0, 3590.0, 7660.0, 17300.0, 36500.0, 55200.0, 72700.0]
PROBABILITY_LABELS = {"1%", "2%", "5%", "10%", "20%", "50%", "63.2%", "90%", "99%"}


def _weibull_axes(text: str) -> tuple[list[str], list[str]]:
    """(probability labels down the left, tick labels under the plot) of a Weibull chart."""
    lines = text.split("\n")
    y_labels = [line.split("┤")[0].strip() for line in lines if "┤" in line]
    bottom = next(i for i, line in enumerate(lines) if line.lstrip().startswith("└"))
    return y_labels, lines[bottom + 1].split()


def _number(label: str) -> float:
    return float(label.replace(",", ""))


def _is_round_log_value(v: float) -> bool:
    """m × 10ⁿ with m a whole number 1-9."""
    mantissa = v / 10 ** math.floor(math.log10(v) + 1e-9)
    return abs(mantissa - round(mantissa)) < 1e-6 and 1 <= round(mantissa) <= 9


def test_weibull_ticks_reach_the_decade_of_the_longest_life():
    # failures only, no fitted line: the axis ends at the longest life × e^0.05 (the margin)
    text = weibull_chart(weibull_plot(WIDE_LIVES, [True] * len(WIDE_LIVES), None))
    _, x_labels = _weibull_axes(text)
    ticks = [_number(label) for label in x_labels]
    axis_end = max(WIDE_LIVES) * math.exp(0.05)
    # the largest 1-2-5 × 10ⁿ value on the axis, found by counting up (derived)
    top = max(m * 10.0**e for e in range(0, 8) for m in (1, 2, 5) if m * 10.0**e <= axis_end)
    assert top == 50000.0
    assert ticks[-1] == top
    assert ticks == sorted(ticks) and all(_is_round_log_value(t) for t in ticks)
    assert ticks[0] <= 10 * min(WIDE_LIVES)  # and they start within a decade of the shortest


@pytest.mark.parametrize("height", [8, 10, 12, 14, 16, 20, 30])
@pytest.mark.parametrize("width", [30, 50, 72, 120])
def test_weibull_axis_labels_never_overprint(width, height):
    plot = weibull_plot(WIDE_LIVES, [True] * len(WIDE_LIVES), fixed_fit(0.6, 9000.0))
    y_labels, x_labels = _weibull_axes(weibull_chart(plot, width=width, height=height))
    shown = [label for label in y_labels if label]
    # each label is a whole probability level ("6390%" would be 63.2% and 90% on one row)
    assert shown and set(shown) <= PROBABILITY_LABELS
    assert len(shown) == len(set(shown))
    ticks = [_number(label) for label in x_labels]  # a merged "1,00010,000" would not parse
    assert ticks and all(_is_round_log_value(t) for t in ticks)
    assert ticks == sorted(set(ticks))


@settings(max_examples=40, deadline=None)
@given(
    lives=st.lists(st.floats(1.0, 1.0e6), min_size=2, max_size=12, unique=True),
    width=st.integers(30, 140),
    height=st.integers(8, 40),
)
def test_weibull_axis_labels_never_overprint_for_any_lives(lives, width, height):
    text = weibull_chart(weibull_plot(lives, [True] * len(lives), None), width=width, height=height)
    y_labels, x_labels = _weibull_axes(text)
    shown = [label for label in y_labels if label]
    assert set(shown) <= PROBABILITY_LABELS and len(shown) == len(set(shown))
    ticks = [_number(label) for label in x_labels]
    assert ticks == sorted(set(ticks))


def test_wear_chart_verdict_can_be_given():
    text = wear_chart(wear_curve(AREAS[:2], TIMES[:2]), verdict="retired after 400 cm² (weld)")
    assert text.endswith("verdict: retired after 400 cm² (weld)")
    assert "still breaking in" in wear_chart(wear_curve(AREAS[:2], TIMES[:2]))  # 400 < 650 cm²
