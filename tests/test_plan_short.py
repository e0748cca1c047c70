"""Short stock, bounds that mean something, and a quote that says what it charges.

Check values are worked by hand from the bar arithmetic (derived: a bar
of length L holds pieces with Σ(ℓ + k) ≤ L − trim − grip + k); the bound with
rack remnants is checked against the LP of the same problem solved by HiGHS
through scipy over every cutting pattern (the outside reference).
"""

from __future__ import annotations

import itertools

import pytest

from sawplan.cutlist.jobfile.load import parse_job
from sawplan.cutlist.plan.job import plan_job
from sawplan.materials import load_catalogue
from sawplan.saws import get_saw


@pytest.fixture(scope="module")
def catalogue():
    return load_catalogue()


@pytest.fixture(scope="module")
def saw():
    return get_saw("mid-production")


def plan_of(text: str, catalogue, saw):
    return plan_job(parse_job(text, catalogue, file="job.toml"), saw, time_limit_s=10.0)


TWO_SHORT = """
[job]
name = "two short"
kerf = "2mm"
min_remnant = "300mm"

[[stock]]
material = "1018"
section = "round 30mm"
length = "1000mm"
count = 2
price = 10

[[stock]]
material = "1018"
section = "round 30mm"
length = "3000mm"
count = 0
price = 28

[[stock]]
material = "4140"
section = "round 50mm"
length = "2m"
count = 1
price = 40

[[part]]
name = "pin"
material = "1018"
section = "round 30mm"
length = "300mm"
count = 10

[[part]]
name = "shaft"
material = "4140"
section = "round 50mm"
length = "900mm"
count = 3
"""


def test_two_short_sections_give_both_shortfalls_and_a_valid_partial_plan(catalogue, saw):
    # By hand: a 1000 mm bar holds n pins with 302·n ≤ 1002, n = 3; two bars: 6 of 10
    # pins, 4 short.  A 2 m bar holds 902·n ≤ 2002, n = 2 shafts of 3: 1 short.
    plan = plan_of(TWO_SHORT, catalogue, saw)
    assert not plan.complete
    short = {f.group: dict(f.pieces) for f in plan.shortfalls}
    assert short == {"1018 round Ø30 mm": {"pin": 4}, "4140 round Ø50 mm": {"shaft": 1}}
    cut = {}
    for b in plan.bars:
        for p in b.pieces:
            cut[p.part] = cut.get(p.part, 0) + 1
    assert cut == {"pin": 6, "shaft": 2}
    # cheapest order (by hand): 4 pins fit two 1000 mm bars (20) or one 3000 mm bar (28)
    order = {(o.group, o.length_mm): o.count for f in plan.shortfalls for o in f.order}
    assert order == {("1018 round Ø30 mm", 1000.0): 2, ("4140 round Ø50 mm", 2000.0): 1}
    assert plan.order_cost == pytest.approx(2 * 10 + 40)


def test_the_order_list_added_as_stock_completes_the_job(catalogue, saw):
    plan = plan_of(TWO_SHORT, catalogue, saw)
    job = parse_job(TWO_SHORT, catalogue, file="job.toml")
    line_of = {s.index: s for s in job.stock}
    extra = []
    for f in plan.shortfalls:
        for o in f.order:
            ordered = line_of[o.stock_entry]  # the stock line whose length is ordered
            material, section = ordered.material, ordered.section_text
            extra.append(
                f'\n[[stock]]\nmaterial = "{material}"\nsection = "{section}"\n'
                f'length = "{o.length_mm:g}mm"\ncount = {o.count}\nprice = {o.price_each}\n'
            )
    again = plan_of(TWO_SHORT + "".join(extra), catalogue, saw)
    assert again.complete and again.shortfalls == ()
    assert again.pieces == 13


def test_a_job_that_is_not_short_has_nothing_to_order(catalogue, saw):
    text = TWO_SHORT.replace("count = 10", "count = 6").replace("count = 3\n", "count = 2\n")
    plan = plan_of(text, catalogue, saw)
    assert plan.complete and plan.shortfalls == () and plan.order_cost == 0


def test_order_command_says_nothing_to_order(cli, tmp_path):
    text = TWO_SHORT.replace("count = 10", "count = 6").replace("count = 3\n", "count = 2\n")
    job = tmp_path / "job.toml"
    job.write_text(text, encoding="utf-8")
    r = cli("plan", str(job), "--saw", "mid-production", "--order")
    assert r.code == 0
    assert r.out.strip() == "nothing to order: the stock on hand finishes the job"


def test_order_command_prints_the_list_alone_and_exits_8(cli, tmp_path):
    job = tmp_path / "job.toml"
    job.write_text(TWO_SHORT, encoding="utf-8")
    out = tmp_path / "csv"
    r = cli("plan", str(job), "--saw", "mid-production", "--order", "--csv-dir", str(out))
    assert r.code == 8
    assert r.out.startswith("ORDER LIST")
    assert "CUT SHEET" not in r.out
    rows = (out / "order.csv").read_text(encoding="utf-8").splitlines()
    assert rows[0] == "group,stock_entry,bars,length_mm,price_each,cost,pieces_not_planned"
    assert len(rows) == 3


# --- the quote ------------------------------------------------------------------------------

QUOTE_JOB = """
[job]
name = "quote"
kerf = "2mm"
min_remnant = "300mm"
shop_rate = 60
blade_price = 80
{policy}

[[stock]]
material = "1018"
section = "round 30mm"
length = "1000mm"
count = 1
price = 50

[[part]]
name = "pin"
material = "1018"
section = "round 30mm"
length = "300mm"
count = 2
"""


@pytest.mark.parametrize(
    ("policy", "credit"),
    [
        # By hand: two 300 mm pins and their kerfs take 604 mm of the 1000 mm bar; the
        # remnant is 1000 − 2·300 − 2·2 = 396 mm (kept: ≥ 300).  At 50 per 1000 mm the
        # rack credit is 50 × 396 / 1000 = 19.80, so the material charged is 30.20.
        pytest.param("", 19.80, id="credit-at-bar-price-hand"),
        pytest.param('remnant_credit = "none"', 0.0, id="whole-bar-charged-hand"),
    ],
)
def test_quote_material_line_by_hand(catalogue, saw, policy: str, credit: float):
    plan = plan_of(QUOTE_JOB.format(policy=policy), catalogue, saw)
    lines = {q.item: q for q in plan.quote}
    assert lines["material: bars"].amount == pytest.approx(50.0)
    assert lines["material: rack credit"].amount == pytest.approx(-credit)
    assert plan.material_cost == pytest.approx(50.0 - credit)
    # saw time: cuts × (time per cut + handling) at 60 per hour, by the plan's own minutes
    assert lines["saw time"].amount == pytest.approx(60.0 * plan.total_time_min / 60.0)
    assert lines["blade wear"].amount == pytest.approx(80.0 * plan.blades_consumed)
    assert lines["total"].amount == pytest.approx(50.0 - credit + plan.saw_cost + plan.blade_cost)
    assert all(q.basis for q in plan.quote)  # every line names its basis
    assert "396" not in lines["material: bars"].basis  # bars line is about bars


def test_weights_name_what_they_weigh(catalogue, saw):
    # 1018: 7870 kg/m³ (the catalogue's density); round 30 mm: π/4·0.03² m² → 5.563 kg/m.
    plan = plan_of(QUOTE_JOB.format(policy=""), catalogue, saw)
    kg_per_m = 7870 * 3.141592653589793 / 4 * 0.03**2
    density = plan.sections[0].mass_per_length_kg_m
    assert density == pytest.approx(kg_per_m, rel=0.01)
    assert plan.bars_weight_kg == pytest.approx(density * 1.0)
    assert plan.pieces_weight_kg == pytest.approx(density * 0.6)
    assert plan.remnants_weight_kg == pytest.approx(density * 0.396)


# --- the bound with rack remnants equals the LP of the same problem ---------------------------


def _patterns(lengths: list[int], capacity: int) -> list[tuple[int, ...]]:
    best = []
    ranges = [range(capacity // w + 1) for w in lengths]
    for combo in itertools.product(*ranges):
        if any(combo) and sum(n * w for n, w in zip(combo, lengths, strict=True)) <= capacity:
            best.append(combo)
    return best


def test_bound_with_remnants_equals_the_lp_of_the_same_problem():
    from scipy.optimize import linprog

    from sawplan.cutlist.optimise.solve import Allowances, Demand, StockType, optimise

    # new 6 m bars at 60, new 4 m bars at 42, two rack remnants (free) of 2.5 m and 1.7 m
    stock = [
        StockType("6m", 6000, None, 60.0),
        StockType("4m", 4000, None, 42.0),
        StockType("R1", 2500, 1, 0.0, is_remnant=True),
        StockType("R2", 1700, 1, 0.0, is_remnant=True),
    ]
    demand = [Demand("A", 1450, 7), Demand("B", 1100, 5), Demand("C", 830, 9)]
    plan = optimise(stock, demand, Allowances(kerf=0), time_limit_s=30)
    widths = [d.length for d in demand]
    columns, costs, rows_of_stock = [], [], []
    for s, st_ in enumerate(stock):
        for p in _patterns(widths, st_.length):
            columns.append(p)
            costs.append(st_.cost)
            rows_of_stock.append(s)
    a_ub = [[-p[j] for p in columns] for j in range(len(widths))]
    b_ub = [-d.count for d in demand]
    for s, st_ in enumerate(stock):
        if st_.count is not None:
            a_ub.append([1.0 if t == s else 0.0 for t in rows_of_stock])
            b_ub.append(st_.count)
    reference = linprog(costs, A_ub=a_ub, b_ub=b_ub, method="highs")  # HiGHS via scipy
    assert reference.status == 0
    assert plan.objective == "cost"
    assert plan.objective_bound == pytest.approx(reference.fun, rel=1e-6)
    assert plan.material_cost >= reference.fun - 1e-6


def test_short_plan_json_says_complete_and_lists_shortfalls(cli, tmp_path):
    import json

    job = tmp_path / "job.toml"
    job.write_text(TWO_SHORT, encoding="utf-8")
    r = cli("plan", str(job), "--saw", "mid-production", "--json")
    assert r.code == 8
    data = json.loads(r.out)
    assert data["complete"] is False
    assert {f["group"] for f in data["shortfalls"]} == {"1018 round Ø30 mm", "4140 round Ø50 mm"}


# --- bounded work: regressions ------------------------------------------------------------------


def test_stock_price_1e308_in_a_job_file_is_a_one_line_error(cli, tmp_path):
    job = tmp_path / "job.toml"
    job.write_text(TWO_SHORT.replace("price = 40", "price = 1e308"), encoding="utf-8")
    r = cli("plan", str(job), "--saw", "mid-production")
    assert r.code == 3
    assert r.err.count("\n") == 1 and "price (stock price): must be from 0 to 10,000,000" in r.err


def test_job_of_three_million_pieces_is_refused_before_planning(cli, tmp_path):
    text = TWO_SHORT.replace("count = 10", "count = 1000000").replace(
        "count = 3\n", "count = 1000000\n"
    )
    job = tmp_path / "job.toml"
    job.write_text(text, encoding="utf-8")
    r = cli("plan", str(job), "--saw", "mid-production")
    assert r.code == 3
    assert "asks for 2,000,000 pieces, at most 100,000 in one job" in r.err


@pytest.mark.parametrize(
    "limit", [pytest.param("0.1", id="too-short"), pytest.param("601", id="too-long")]
)
def test_time_limit_outside_its_range_is_refused(cli, tmp_path, limit: str):
    job = tmp_path / "job.toml"
    job.write_text(TWO_SHORT, encoding="utf-8")
    r = cli("plan", str(job), "--time-limit", limit)
    assert r.code == 3  # a value out of its range (the field table's rule)
    assert r.err.startswith("error: time limit: must be from 0.5 to 600")


def test_plan_json_stdout_is_pure_json_in_a_fresh_process(tmp_path):
    # The solver library prints a banner the first time it starts in a process; stdout
    # must still carry nothing but the JSON (json.loads is the outside check).
    import json
    import subprocess
    import sys

    job = tmp_path / "job.toml"
    job.write_text(QUOTE_JOB.format(policy=""), encoding="utf-8")
    argv = [sys.executable, "-m", "sawplan", "plan", str(job), "--saw", "mid-production"]
    done = subprocess.run([*argv, "--json"], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout)["kind"] == "plan"
