"""Planning a job from its file: layouts, weights, time, blades and cost.

Check values come from outside the code: the pieces-per-bar formula
worked by hand (derived), closed-form weights (π/4·D²·L·ρ) and the shop weight
formulas for steel (common practice), the handling classes (NIOSH load constant,
Waters et al. 1993; common practice), and a small job costed by hand.  Hypothesis checks that every
plan is feasible.
"""

from __future__ import annotations

import math
from collections import Counter

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from sawplan.cutlist.jobfile.load import parse_job
from sawplan.cutlist.plan.job import bar_layout, plan_job
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw

IN = 25.4  # mm, exact by definition
LB = 0.45359237  # kg, exact by definition


@pytest.fixture(scope="module")
def catalogue():
    return load_catalogue()


@pytest.fixture(scope="module")
def saw():
    return get_saw("mid-production")


def job_text(
    *,
    stock: list[dict],
    parts: list[dict],
    kerf: str | None = "2mm",
    trim: str = "0mm",
    grip: str = "0mm",
    min_remnant: str = "300mm",
    extra: str = "",
) -> str:
    """A job file built from plain values (so the test goes through the real loader)."""
    lines = ["[job]", 'name = "test"', f'trim = "{trim}"', f'grip = "{grip}"']
    lines.append(f'min_remnant = "{min_remnant}"')
    if kerf is not None:
        lines.append(f'kerf = "{kerf}"')
    lines.append(extra)
    for table, items in (("stock", stock), ("part", parts)):
        for item in items:
            lines.append(f"\n[[{table}]]")
            for key, value in item.items():
                if isinstance(value, bool):
                    lines.append(f"{key} = {'true' if value else 'false'}")
                elif isinstance(value, str):
                    lines.append(f'{key} = "{value}"')
                else:
                    lines.append(f"{key} = {value}")
    return "\n".join(lines) + "\n"


def plan_of(text: str, catalogue, saw, **kwargs):
    return plan_job(parse_job(text, catalogue, file="job.toml"), saw, time_limit_s=2.0, **kwargs)


ROUND50 = {"material": "1018", "section": "round 50mm"}


# --- the pieces-per-bar formula, by hand ---------------------------------------------------------


@pytest.mark.parametrize(
    ("bar", "trim", "grip", "kerf", "piece", "n", "remnant_mm", "cuts"),
    [
        # n = ⌊(6000 − 5 − 20 + 1.6)/(250 + 1.6)⌋ = ⌊5976.6/251.6⌋ = ⌊23.75⌋ = 23;
        # remnant = 6000 − 5 − 23·250 − 23·1.6 = 208.2 mm (derived, by hand)
        pytest.param("6000mm", "5mm", "20mm", "1.6mm", "250mm", 23, 208.2, 24, id="6m-250mm-trim-grip"),
        # n = ⌊(3000 + 2)/(498 + 2)⌋ = ⌊6.004⌋ = 6; tail 3000 − 6·498 − 5·2 = 2 mm is
        # taken by the last kerf: remnant 0, but the last cut is still made (by hand)
        pytest.param("3000mm", "0mm", "0mm", "2mm", "498mm", 6, 0.0, 6, id="3m-498mm-last-kerf"),
        # n = (1000 + 2)/(248.5 + 2) = 4 exactly: 4·248.5 + 3·2 = 1000, the bar is used
        # exactly and needs no last cut: 3 cuts (derived, by hand)
        pytest.param("1000mm", "0mm", "0mm", "2mm", "248.5mm", 4, 0.0, 3, id="1m-exact-fill"),
        # inch sizes: n = ⌊(144 − 0.25 − 1 + 0.063)/(7.25 + 0.063)⌋ in = ⌊142.813/7.313⌋
        # = ⌊19.53⌋ = 19; remnant = 144 − 0.25 − 19·7.25 − 19·0.063 in = 4.803 in (by hand)
        pytest.param("12ft", "1/4in", "1in", "0.063in", "7-1/4in", 19, 4.803 * IN, 20, id="12ft-7-1/4in"),
    ],
)  # fmt: skip
def test_pieces_per_bar_follow_the_kerf_formula(
    catalogue, saw, bar, trim, grip, kerf, piece, n, remnant_mm, cuts
):
    stock = [{**ROUND50, "length": bar}]
    full = plan_of(
        job_text(stock=stock, parts=[{"name": "p", **ROUND50, "length": piece, "count": n}],
                 kerf=kerf, trim=trim, grip=grip),
        catalogue, saw,
    )  # fmt: skip
    assert full.bars_used == 1
    (b,) = full.bars
    assert len(b.pieces) == n
    assert b.remnant_mm == pytest.approx(remnant_mm, abs=1e-6)
    assert b.cuts == cuts
    one_more = plan_of(
        job_text(stock=stock, parts=[{"name": "p", **ROUND50, "length": piece, "count": n + 1}],
                 kerf=kerf, trim=trim, grip=grip),
        catalogue, saw,
    )  # fmt: skip
    assert one_more.bars_used == 2


def test_layout_positions_by_hand():
    # 1000 mm bar, trim 5, kerf 2, pieces 300 and 200: first piece 5–305, second
    # 307–507, last cut at 507, remnant from 509: 1000 − 509 = 491 mm (by hand).
    spans, trim_cut, last_cut, start, remnant = bar_layout(1000.0, [300.0, 200.0], 2.0, 5.0)
    assert spans == [(5.0, 305.0), (307.0, 507.0)]
    assert (trim_cut, last_cut, start, remnant) == (5.0, 507.0, 509.0, 491.0)


# --- feasibility, for any job --------------------------------------------------------------------


@st.composite
def random_jobs(draw):
    # 1.6002 mm is a 0.063 in kerf: off the optimiser's 0.1 mm grid
    kerf = draw(st.sampled_from([1.0, 1.6, 2.5, 1.6002]))
    scale = draw(st.sampled_from([10, 100]))  # piece lengths to 0.1 mm or to 0.01 mm
    trim = draw(st.sampled_from([0.0, 3.0, 5.5]))
    grip = draw(st.sampled_from([0.0, 20.0]))
    min_remnant = draw(st.sampled_from([0.0, 150.0, 300.0]))
    lengths = sorted(
        draw(st.lists(st.integers(8_000, 40_000), min_size=1, max_size=3, unique=True))
    )  # in 0.1 mm
    longest = lengths[-1] / 10
    usable = int((longest - trim - grip) * scale)
    parts = []
    for i in range(draw(st.integers(1, 4))):
        ell = draw(st.integers(30 * scale, usable)) / scale
        parts.append(
            {"name": f"p{i}", **ROUND50, "length": f"{ell}mm", "count": draw(st.integers(1, 6))}
        )
    total = sum(p["count"] for p in parts)
    stock = []
    for i, ell in enumerate(lengths):
        entry = {**ROUND50, "length": f"{ell / 10}mm", "heat": f"H{i}"}
        if i < len(lengths) - 1:
            entry["count"] = draw(st.integers(0, 3))
        elif draw(st.booleans()):
            entry["count"] = total  # one longest bar per piece is always enough
        entry["remnant"] = i == 0 and draw(st.booleans())
        stock.append(entry)
    text = job_text(
        stock=stock, parts=parts, kerf=f"{kerf}mm", trim=f"{trim}mm", grip=f"{grip}mm",
        min_remnant=f"{min_remnant}mm",
    )  # fmt: skip
    return text, kerf, trim, grip, min_remnant, parts, stock


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(random_jobs())
def test_every_plan_is_feasible(catalogue, saw, case):
    text, k, trim, grip, min_remnant, parts, stock = case
    plan = plan_of(text, catalogue, saw)
    # every part cut exactly as ordered
    cut = Counter(p.part for b in plan.bars for p in b.pieces)
    assert cut == Counter({p["name"]: p["count"] for p in parts})
    used = Counter(b.stock_entry for b in plan.bars)
    for i, s in enumerate(stock, start=1):
        if "count" in s:
            assert used[i] <= s["count"]  # bars on hand respected
    for b in plan.bars:
        n = len(b.pieces)
        total = sum(p.length_mm for p in b.pieces)
        # trim + Σℓ + (n − 1)k + grip ≤ L  (bar arithmetic, derived), to within the documented
        # 0.001 mm per length that the 0.1 mm grid may round away
        assert trim + total + (n - 1) * k + grip <= b.length_mm + 0.001 * (2 * n + 2)
        # positions increase, pieces one kerf apart, inside the bar
        assert b.pieces[0].start_mm == pytest.approx(trim)
        for p, q in zip(b.pieces, b.pieces[1:], strict=False):
            assert q.start_mm == pytest.approx(p.end_mm + k)
        for p in b.pieces:
            assert p.end_mm - p.start_mm == pytest.approx(p.length_mm)
            assert 0 <= p.start_mm < p.end_mm <= b.length_mm - grip + 0.001 * (2 * n + 2)
        # the remnant is what is left after the last kerf (none after an exact fill)
        tail = b.length_mm - trim - total - (n - 1) * k
        expected = max(tail - k, 0.0) if tail > 1e-9 else 0.0
        assert b.remnant_mm == pytest.approx(expected, abs=1e-6)
        assert b.remnant_kept == (expected > 1e-9 and expected >= min_remnant - 1e-9)
        assert b.cuts == (trim > 0) + n - (0 if tail > 1e-9 else 1)
    assert plan.lp_bound_bars <= plan.bars_used
    assert plan.gap_bars == plan.bars_used - plan.lp_bound_bars
    # waste: stock used that is neither a piece nor a kept remnant
    pieces = sum(p.length_mm for b in plan.bars for p in b.pieces)
    kept = sum(b.remnant_mm for b in plan.bars if b.remnant_kept)
    assert plan.waste_mm == pytest.approx(plan.stock_length_mm - pieces - kept, abs=1e-6)


def test_parts_go_only_to_their_own_material_and_section(catalogue, saw):
    other = {"material": "304", "section": "round 50mm"}
    square = {"material": "1018", "section": "square 50mm"}
    text = job_text(
        stock=[{**ROUND50, "length": "3m"}, {**other, "length": "3m"}, {**square, "length": "3m"}],
        parts=[
            {"name": "a", **ROUND50, "length": "400mm", "count": 3},
            {"name": "b", **other, "length": "400mm", "count": 3},
            {"name": "c", **square, "length": "400mm", "count": 3},
        ],
    )
    plan = plan_of(text, catalogue, saw)
    want = {"a": ("1018", "round 50mm"), "b": ("304", "round 50mm"), "c": ("1018", "square 50mm")}
    assert plan.bars_used == 3  # three 400 mm pieces fit one 3 m bar; one bar per group
    for b in plan.bars:
        for p in b.pieces:
            assert (b.material, b.section) == want[p.part]
    assert len(plan.sections) == 3


def test_too_few_bars_for_the_layout_is_a_short_plan(catalogue, saw):
    # Two 1000 mm bars (capacity 1002 mm each with k = 2) and three 600 mm pieces:
    # 3 × 602 = 1806 mm ≤ 2004 mm fits by length, but a bar holds only one piece
    # (2 × 602 = 1204 > 1002), so one piece cannot be cut and one bar is to order (by hand).
    text = job_text(
        stock=[{**ROUND50, "length": "1000mm", "count": 2}],
        parts=[{"name": "p", **ROUND50, "length": "600mm", "count": 3}],
    )
    plan = plan_of(text, catalogue, saw)
    assert not plan.complete and plan.bars_used == 2
    (short,) = plan.shortfalls
    assert short.pieces == (("p", 1),)
    assert [(o.count, o.length_mm) for o in short.order] == [(1, 1000.0)]


# --- weights and handling --------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("material", "section", "bar", "expected_kg", "rel"),
    [
        # closed form π/4·D²·L·ρ, ρ(4140) = 7.85 g/cm³ (ASM data / producers' sheets)
        pytest.param("4140", "round 60mm", "3m", math.pi / 4 * 0.06**2 * 3 * 7850, 1e-9, id="4140-round-exact"),
        # shop formula 0.006165·D² kg/m for steel of 7.85 (common practice)
        pytest.param("4140", "round 60mm", "3m", 0.006165 * 60**2 * 3, 1e-3, id="4140-round-shop"),
        # shop formula flat 3.40·w·t lb/ft, ρ = 0.2836 lb/in³ (common practice)
        pytest.param("A36", "flat 4in 1in", "12ft", 3.40 * 4 * 1 * 12 * LB, 2e-3, id="A36-flat-shop"),
        # shop formula hex 2.94·F² lb/ft (common practice)
        pytest.param("1045", "hex 2in", "10ft", 2.94 * 2**2 * 10 * LB, 5e-3, id="1045-hex-shop"),
        # closed form, ρ(6061) = 2.70 g/cm³ (ASM data / producers' sheets)
        pytest.param("6061-T6", "round 100mm", "1m", math.pi / 4 * 0.1**2 * 1 * 2700, 1e-9, id="6061-round-exact"),
    ],
)  # fmt: skip
def test_bar_weights_match_closed_forms(catalogue, saw, material, section, bar, expected_kg, rel):
    spec = {"material": material, "section": section}
    text = job_text(
        stock=[{**spec, "length": bar}], parts=[{"name": "p", **spec, "length": "100mm"}]
    )
    (b,) = plan_of(text, catalogue, saw).bars
    assert b.weight_kg == pytest.approx(expected_kg, rel=rel)
    (p,) = b.pieces
    assert p.weight_kg == pytest.approx(expected_kg * 100 / b.length_mm, rel=rel)


def test_handling_classes_of_bars_and_pieces(catalogue, saw):
    spec = {"material": "4140", "section": "round 60mm"}
    text = job_text(
        stock=[{**spec, "length": "3m"}], parts=[{"name": "shaft", **spec, "length": "450mm"}]
    )
    (b,) = plan_of(text, catalogue, saw).bars
    # 450 mm of Ø60 steel is π/4·0.06²·0.45·7850 ≈ 9.99 kg: under the 23 kg load constant,
    # one person (NIOSH LC, Waters et al. 1993); the 66.6 kg bar is beyond the ≈35 kg two-person
    # limit: lift aid (common practice).
    assert b.pieces[0].weight_kg == pytest.approx(math.pi / 4 * 0.06**2 * 0.45 * 7850)
    assert b.pieces[0].handling == "one-person"
    assert b.handling == "lift-aid"


# --- time, blades and cost ---------------------------------------------------------------------------


def costed_job(**extra_job):
    """1018 Ø50: new 3 m bars at 2.00/kg, one free 800 mm rack remnant; five 700 mm pins."""
    extra = "\n".join(f"{k} = {v}" for k, v in extra_job.items())
    return job_text(
        stock=[
            {**ROUND50, "length": "3m", "price_per_kg": 2.0, "heat": "A1"},
            {**ROUND50, "length": "800mm", "count": 1, "remnant": True, "heat": "R9"},
        ],
        parts=[{"name": "pin", **ROUND50, "length": "700mm", "count": 5}],
        extra=extra,
    )


def test_costs_of_a_small_job_by_hand(catalogue, saw):
    from sawplan.cutting import recommend

    plan = plan_of(
        costed_job(shop_rate=60.0, blade_price=80.0, handling_time='"0.5min"'), catalogue, saw
    )
    # A 3 m bar holds ⌊(3000 + 2)/702⌋ = 4 pins; the fifth goes on the 800 mm remnant
    # (cheaper than a second new bar).  New bar: tail 3000 − 2800 − 6 = 194 mm, last cut,
    # remnant 192 mm (scrap, < 300); remnant bar: tail 100, remnant 98 (scrap).
    assert plan.bars_used == 2
    assert sorted(len(b.pieces) for b in plan.bars) == [1, 4]
    assert plan.cuts == 5  # 4 + 1, no trim, both bars have a tail
    kg_bar = math.pi / 4 * 0.05**2 * 3 * 7870  # ρ(1018) = 7.87 g/cm³ (ASM data / producers' sheets)
    assert plan.material_cost == pytest.approx(2.0 * kg_bar)  # the remnant is free
    per_cut = recommend(catalogue.get("1018"), parse_section_of("round 50mm"), saw).cut_time_min
    assert plan.total_cut_time_min == pytest.approx(5 * per_cut)
    assert plan.total_handling_time_min == pytest.approx(5 * 0.5)
    assert plan.saw_cost == pytest.approx(60.0 * 5 * (per_cut + 0.5) / 60)
    # blade wear: 5 cuts × π/4·5² cm² over the default mild-steel life 10⁴ in²
    # (typical life, from memory) = 64,516 cm²
    area_cm2 = 5 * math.pi / 4 * 5**2
    assert plan.cut_area_cm2 == pytest.approx(area_cm2)
    assert plan.blades_consumed == pytest.approx(area_cm2 / 64_516)
    assert plan.blade_cost == pytest.approx(80.0 * area_cm2 / 64_516)
    assert plan.blades_needed == 1
    assert plan.total_cost == pytest.approx(
        2.0 * kg_bar + 60.0 * 5 * (per_cut + 0.5) / 60 + 80.0 * area_cm2 / 64_516
    )
    # waste: 3800 mm of stock, 3500 mm of pins, no remnant kept
    assert plan.waste_mm == pytest.approx(300.0)
    assert plan.waste_pct == pytest.approx(100 * 300 / 3800)


def parse_section_of(text: str):
    from sawplan.sections import parse_section

    return parse_section(text)


def test_unpriced_quote_says_what_is_missing(catalogue, saw):
    plan = plan_of(costed_job(), catalogue, saw)
    assert plan.saw_cost == 0 and plan.blade_cost == 0
    assert any("shop_rate" in n for n in plan.notes)
    assert any("blade_price" in n for n in plan.notes)


def test_calibration_from_the_log_scales_the_cut_time(catalogue, saw):
    calls = []

    def calibration_for(saw_name, group):
        calls.append((saw_name, group))
        return (1.5, 4)

    base = plan_of(costed_job(), catalogue, saw)
    calibrated = plan_of(costed_job(), catalogue, saw, calibration_for=calibration_for)
    assert calls == [("mid-production", "carbon-steel")]
    s = calibrated.sections[0]
    assert (s.calibration_factor, s.calibration_n) == (1.5, 4)
    assert s.cut_time_min == pytest.approx(1.5 * base.sections[0].cut_time_min)
    assert calibrated.total_cut_time_min == pytest.approx(1.5 * base.total_cut_time_min)
    assert any("× 1.50 from 4 timed log entries" in n for n in calibrated.notes)


def test_blade_life_fit_from_the_log_is_used(catalogue, saw):
    from sawplan.life.forecast import forecast_blades
    from sawplan.life.weibull import fit_weibull

    fit = fit_weibull([400.0, 650.0, 800.0, 1000.0, 1200.0], [True] * 5)
    plan = plan_of(costed_job(), catalogue, saw, life_for=lambda group: fit)
    area_cm2 = 5 * math.pi / 4 * 5**2
    assert plan.blades_consumed == pytest.approx(area_cm2 / fit.mean_life_cm2)
    assert plan.blade_forecast_method == "weibull-simulation"
    expected = forecast_blades(area_cm2, fit, confidence=0.9).blades_needed
    assert plan.blades_needed == expected
    assert "blade log Weibull fit" in plan.blade_life_source


def test_kerf_defaults_to_the_recommended_blade(catalogue, saw):
    from sawplan.cutting import recommend

    text = job_text(
        stock=[{**ROUND50, "length": "3m"}],
        parts=[{"name": "p", **ROUND50, "length": "100mm", "count": 3}],
        kerf=None,
    )
    plan = plan_of(text, catalogue, saw)
    expected = recommend(catalogue.get("1018"), parse_section_of("round 50mm"), saw).kerf_mm
    s = plan.sections[0]
    assert s.kerf_source == "recommended blade"
    assert s.kerf_mm == expected
    b = plan.bars[0]
    assert b.pieces[1].start_mm - b.pieces[0].end_mm == pytest.approx(expected)
