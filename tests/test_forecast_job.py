"""`sawplan forecast --job`: one blade cuts every material group, as `sawplan plan` counts it."""

from __future__ import annotations

import json
import math

import pint

REF = pint.UnitRegistry()
# typical blade lives (from memory): mild steel ≈ 10⁴ in², austenitic stainless 2–5 × 10³ in²
# (sawplan uses the middle, 3.5 × 10³ in²)
MILD_CM2 = REF("1e4 in**2").to("cm**2").magnitude
AUSTENITIC_CM2 = REF("3.5e3 in**2").to("cm**2").magnitude

JOB = """
[job]
name = "two groups"

[[stock]]
material = "1018"
section = "round 100mm"
length = "6m"

[[stock]]
material = "304"
section = "round 200mm"
length = "6m"

[[part]]
name = "mild disc"
material = "1018"
section = "round 100mm"
length = "20mm"
count = 100

[[part]]
name = "stainless disc"
material = "304"
section = "round 200mm"
length = "20mm"
count = 50
"""


def test_groups_share_blades_in_the_total(cli, tmp_path):
    job = tmp_path / "job.toml"
    job.write_text(JOB, encoding="utf-8")
    result = cli(
        "forecast", "--job-file", str(job), "--db", str(tmp_path / "none.sqlite"), "--json"
    )
    assert result.code == 0, result.err
    data = json.loads(result.out)
    # one cut per part: 100 × π/4·(100 mm)² and 50 × π/4·(200 mm)², in cm² (closed form)
    mild = 100 * math.pi / 4 * 100**2 / 100
    stainless = 50 * math.pi / 4 * 200**2 / 100
    wear = mild / MILD_CM2 + stainless / AUSTENITIC_CM2  # ≈ 0.12 + 0.70 of a blade (derived)
    assert data["blades_needed"] == math.ceil(wear) == 1
    per_group = sorted(g["blades_needed"] for g in data["groups"])
    assert per_group == [1, 1]  # each group alone would ask for a blade of its own
    assert data["combined_on"] == "austenitic-stainless"
