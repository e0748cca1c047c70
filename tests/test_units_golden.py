"""Each command under ``--units us``: the expected text, worked out by hand.

Numbers of a fixed input (a weight, a packaged saw, a position on a bar) are
worked by hand beside each case and checked against pint.  Numbers the
cutting model estimates are taken from the same command's ``--json`` (always
SI) and converted with pint here, so the test checks the US text, not the
model.  Display rules (sawplan/display.py): estimates to 3 significant digits
with thousands separators, lengths to 0.001 in, feet and inches from 6 ft.
"""

from __future__ import annotations

import json
import math

import pint
import pytest

U = pint.UnitRegistry()


def sig3(value: float) -> str:
    """3 significant digits, thousands separated (written out here, not sawplan's code)."""
    digits = 3 - 1 - math.floor(math.log10(abs(value)))
    rounded = round(value, digits)
    return f"{rounded:,.{max(digits, 0)}f}"


def to(value: float, unit: str, target: str) -> float:
    return U.Quantity(value, unit).to(target).magnitude


def lines(text: str) -> list[str]:
    return [" ".join(line.split()) for line in text.splitlines()]


def test_sig3_rule_by_hand():
    assert [sig3(v) for v in (272.156, 13.6, 0.03543, 1634.4)] == ["272", "13.6", "0.0354", "1,630"]


def test_weigh(cli):
    # A36 flat 4 × 1 in × 20 ft, 7,850 kg/m³ (data/materials.csv) = 0.28360 lb/in³ (pint):
    # 4 in² × 12 in/ft = 48 in³/ft → 13.61 lb/ft; × 20 ft = 272.2 lb; 6 pieces 1,633 lb.
    rho = to(7850, "kg/m**3", "lb/inch**3")
    assert 48 * rho == pytest.approx(13.61, abs=0.01)
    out = cli("weigh", "A36", "flat", "4in", "1in", "--length", "20ft", "--count", "6",
              "--units", "us").out  # fmt: skip
    expected = [
        "section flat 4×1 in lying flat",
        "metal area 4.00 in²",
        f"mass per length {sig3(48 * rho)} lb/ft",  # 13.6
        "piece length 20 ft",
        f"one piece {sig3(48 * rho * 20)} lb",  # 272
        f"6 pieces {sig3(48 * rho * 20 * 6)} lb",  # 1,630
    ]
    got = lines(out)
    for line in expected:
        assert line in got, (line, out)
    # 20 ft is long and 272 lb far over a team's limit: crane, lifting beam (common practice)
    assert "a 20 ft bar on a crane: lift it with a lifting beam and two slings" in out
    assert "it rolls" not in out  # a flat bar does not roll


def test_cut(cli):
    us = cli("cut", "4140", "round", "7-1/4in", "--units", "us").out
    si = json.loads(cli("cut", "4140", "round", "7-1/4in", "--json").out)
    got = lines(us)
    assert got[0] == f"4140 · round Ø7.25 in · saw {si['saw']} ({si['feed_type']} feed)"
    speed = sig3(to(si["band_speed_m_min"], "m/min", "ft/min"))
    assert f"Band speed {speed} ft/min" in got
    mean = sig3(to(si["feed_mm_min"], "mm/min", "inch/min"))
    slow = sig3(to(si["feed_set_mm_min"], "mm/min", "inch/min"))
    assert f"Down-feed {mean} in/min average, {slow} in/min at the slowest depth" in got
    rate = sig3(to(si["cutting_rate_cm2_min"], "cm**2/min", "inch**2/min"))
    assert f"Rate {rate} in²/min" in " ".join(got)
    assert "in the 7.25 in widest chord" in us  # 184.15 mm = 7.25 in, as typed
    kerf = f"{to(si['kerf_mm'], 'mm', 'inch'):.3f}".rstrip("0")
    stress = sig3(to(si["bending_stress_mpa"], "MPa", "kip/inch**2"))
    assert f"kerf {kerf} in, bending {stress} ksi at the wheels" in us
    last = si["breakin"][-1]
    assert f"{sig3(to(last['area_to_mm2'], 'mm**2', 'inch**2'))} in² at" in us
    for metric in (" mm", " m/min", "cm²", "MPa", " µm"):
        assert metric not in us, metric


def blanks_job(folder):
    """1018 round 1 in × 12 ft, trim 0.2 in, kerf 0.05 in, five 10 in blanks."""
    job = folder / "job.toml"
    job.write_text(
        '[job]\nname = "us blanks"\nsaw = "mid-production"\ntrim = "0.2in"\nkerf = "0.05in"\n'
        'grip = "0in"\nmin_remnant = "12in"\n'
        '[[stock]]\nmaterial = "1018"\nsection = "round 1in"\nlength = "12ft"\ncount = 1\n'
        '[[part]]\nname = "blank"\nmaterial = "1018"\nsection = "round 1in"\nlength = "10in"\n'
        "count = 5\n",
        encoding="utf-8",
    )
    return job


def test_plan(cli, tmp_path):
    # 1018 round 1 in × 12 ft, trim 0.2 in, kerf 0.05 in, five 10 in blanks (by hand):
    # pieces at 0.200–10.200, 10.250–20.250, … 40.400–50.400 (each 10 in + one kerf);
    # the last cut takes one more kerf: remnant from 50.450 to 144 = 93.55 in.
    # 7,870 kg/m³ = 0.28432 lb/in³; π/4 in² × 10 in = 7.854 in³ → 2.233 lb a blank;
    # the bar 144 in → 32.16 lb; the remnant 93.55 in → 20.89 lb.
    rho = to(7870, "kg/m**3", "lb/inch**3")
    area = math.pi / 4
    job = blanks_job(tmp_path)
    out = cli("plan", str(job), "--units", "us").out
    got = lines(out)
    row = next(line for line in got if line.startswith("1 1018 round Ø1 in × 12 ft"))
    assert "trim 0.000–0.200 squaring cut" in row
    blank = f"{sig3(area * 10 * rho)} lb each"  # 2.23 lb each
    text = "\n".join(got)
    assert f"1–5 0.200–50.400 A blank (10 in) ×5, one every 10.05 in {blank} one-person" in text
    remnant = f"keep 93.55 in remnant, mark heat — {sig3(area * 93.55 * rho)} lb"  # 20.9 lb
    assert f"end 50.450–144.000 {remnant}" in text
    assert "| 12 ft, R 93.55 in" in text  # the drawing's tail: the bar in feet
    # a 12 ft bar of 32 lb: two people, one at each end (common practice, long bar)
    assert f"bar {sig3(area * 144 * rho)} lb, two-person; 6 cuts" in got
    assert "from head in" in out
    for metric in (" mm", "kg", "cm²", "m/min"):
        assert metric not in out, metric


def test_plan_in_fractions(cli, tmp_path):
    # the same job as test_plan, read off a tape to the nearest 1/32 in (by hand):
    # 0.2 × 32 = 6.4 → 6/32 = 3/16; 10.2 → 10-3/16; 50.4 → 1612.8/32 → 50-13/32;
    # 10.05 × 32 = 321.6 → 10-1/16; 50.45 × 32 = 1614.4 → 50-7/16; 93.55 × 32 = 2993.6 → 93-9/16
    job = blanks_job(tmp_path)
    text = "\n".join(lines(cli("plan", str(job), "--units", "us", "--fractions").out))
    assert "trim 0 – 3/16 squaring cut" in text
    assert "1–5 3/16 – 50-13/32 A blank (10 in) ×5, one every 10-1/16 in" in text
    assert "end 50-7/16 – 144 keep 93-9/16 in remnant" in text


def test_materials(cli):
    # 1018 in data/materials.csv: 7,870 kg/m³, 88.4 m/min, 5.2 J/mm³
    out = cli("materials", "1018", "--units", "us").out
    rho = to(7870, "kg/m**3", "lb/inch**3")  # 0.28432
    assert f"density {rho:.4f} lb/in³" in lines(out)[5]
    speed = sig3(to(88.4, "m/min", "ft/min"))  # 290
    assert f"band speed (bi-metal, coolant, 4 in cut) {speed} ft/min" in " ".join(lines(out))
    energy = sig3(to(5.2, "J/mm**3", "hp*min/inch**3"))  # 1.90
    assert f"unit cutting energy {energy} hp·min/in³" in " ".join(lines(out))


def test_saw_list(cli):
    # packaged mid-production saw (data/saws.toml): wheel 400 mm, 20–100 m/min, 1.5 kW,
    # round capacity 260 mm → 15.748 in, 65.6–328 ft/min, 2.01 hp, 10.236 in
    out = cli("saw", "list", "--units", "us").out
    row = next(line for line in lines(out) if line.startswith("mid-production"))
    lo, hi = (sig3(to(v, "m/min", "ft/min")) for v in (20, 100))
    hp = sig3(to(1.5, "kW", "hp"))
    wheel, cap = (f"{to(v, 'mm', 'inch'):.3f}" for v in (400, 260))
    assert row.startswith(f"mid-production horizontal {wheel} {lo}-{hi} {hp} {cap} hydraulic")


def test_blade_log_commands(cli, tmp_path):
    db = str(tmp_path / "log.sqlite")
    assert cli("blade", "add", "B-1", "--pitch", "4/6", "--blade-width", "27mm", "--blade-thickness",
               "0.9mm", "--blade-length", "3660mm", "--db", db).code == 0  # fmt: skip
    assert cli("blade", "fit", "B-1", "--saw", "mid-production", "--db", db).code == 0
    logged = cli("log", "cut", "4140", "round", "2in", "--blade", "B-1", "--cuts", "10",
                 "--time", "12min", "--db", db, "--units", "us").out  # fmt: skip
    # ten cuts of a 2 in round: 10 × π/4 × 2² = 31.42 in²
    assert "logged 10 cuts of 4140 round Ø2 in on blade B-1" in logged
    assert f"area {sig3(10 * math.pi)} in²" in logged
    shown = cli("blade", "show", "B-1", "--db", db, "--units", "us").out
    # 27 mm = 1.063 in, 0.9 mm = 0.035 in, 3,660 mm = 144.094 in = 12 ft 0.094 in
    assert "bi-metal, 1.063 × 0.035 in, 4/6 TPI, 12 ft 0.094 in long" in shown
    listed = lines(cli("log", "list", "--db", db, "--units", "us").out)
    assert any("round Ø2 in 10 31.4 12.0" in line for line in listed), listed
    blades = lines(cli("blade", "list", "--db", db, "--units", "us").out)
    assert any(line.startswith("B-1 bi-metal 1.063×0.035 4/6 fitted") for line in blades)


def test_forecast_without_history(cli, tmp_path):
    # 2 m² = 3,100 in² (2 × 10⁶ mm² ÷ 645.16 mm²/in²)
    out = cli("forecast", "--area", "2m2", "--material", "304", "--units", "us",
              "--db", str(tmp_path / "none.sqlite")).out  # fmt: skip
    assert f"blades needed to cut {sig3(to(2, 'm**2', 'inch**2'))} in² of 304" in out
    assert "cm²" not in out
