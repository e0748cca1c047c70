"""Build the demo shop's blade log: an INVENTED year of blades, cuts and failures.

Everything this script writes is made up.  Tinplate Yard Sawing Co. is a
fictional shop with three fictional saws (``demo/saws.toml``); no real person,
firm, product or measurement is behind any row.  The history exists so that
``make demo`` and the README tour have a log to plan from and to analyse.

How the numbers are made (all with one fixed seed, so every run gives the
same log):

- Working days Monday to Friday from 2025-12-01 to 2026-11-27, less a winter
  and a summer shutdown.  Each saw cuts its own mix of work every day.
- Blade lives (area cut, cm²) are drawn from Weibull distributions chosen for
  the demo: wear-out (shape 2.0-2.5) for blades fitted with a break-in, and
  shape 0.6 for one trial lot of M51 blades that the night shift fitted on the
  column saw without breaking them in (2026-04-13 to 2026-06-19; a trial blade
  still running when the trial ends would come off unworn).  Most of them strip
  teeth early on 304 billets; the few that survive the first cuts wear out.
  The statistics (``sawplan life --group-by blade-type``) should find it: a
  shape below 1 for that blade type, and ``stripped``, whose usual causes
  include a new blade not broken in.  Lives are at least 5 cm² (a blade that
  strips in its first cut still cut something).
- Cut times come from sawplan's own cutting model (``sawplan.cutting.evaluate``
  with the blade's pitch on that saw), times an invented per-saw factor
  (pivot-bay 1.20, auto-bay 1.08, column-bay 0.93), a lognormal scatter of
  7 % per entry, a break-in surcharge (up to +35 % over the first 500 cm² of a
  blade broken in at reduced feed) and a wear rise towards the end of a
  worn-out blade's life (up to +45 %; common practice: 30-50 % slower near
  the end).  The model's own time is logged beside it as the prediction, as
  ``sawplan log cut`` does.

Run it alone to (re)build ``demo/out/demo-log.sqlite``::

    .venv/bin/python demo/make_history.py [DB_PATH]

It writes through sawplan's store API (``sawplan.store``): saws, blades,
fittings, cut entries, events and retirements, as the CLI would.
"""

from __future__ import annotations

import datetime as dt
import math
import random
import sys
from dataclasses import dataclass, field
from pathlib import Path

DEMO_DIR = Path(__file__).resolve().parent
SAWS_FILE = DEMO_DIR / "saws.toml"
DEFAULT_DB = DEMO_DIR / "out" / "demo-log.sqlite"

SEED = 20251202
START = dt.date(2025, 12, 1)
END = dt.date(2026, 11, 27)
SHUTDOWNS = (
    (dt.date(2025, 12, 22), dt.date(2026, 1, 2)),  # winter
    (dt.date(2026, 8, 3), dt.date(2026, 8, 14)),  # summer
)
TRIAL = (dt.date(2026, 4, 13), dt.date(2026, 6, 19))  # the M51 lot on the column saw
TRIAL_LOT = "T-3309"
TRIAL_BLADES = 10

# Invented truths of the demo shop (not measurements of anything).
SAW_FACTOR = {"pivot-bay": 1.20, "auto-bay": 1.08, "column-bay": 0.93}
SCATTER_SIGMA = 0.07
BREAKIN_CM2 = 500.0
BREAKIN_SURCHARGE = 0.35
WEAR_RISE = 0.45

# Blade types: (tag prefix, width mm, thickness mm, pitch, grade, form, length mm, price,
#               Weibull shape, Weibull scale cm², supplier)
BLADE_TYPES = {
    "pivot": ("P", 20, 0.9, (4, 6), "M42", "regular", 2362, 38.0, 2.0, 26000.0, "east depot"),
    "auto": ("A", 27, 0.9, (4, 6), "M42", "regular", 3660, 62.0, 2.5, 46000.0, "east depot"),
    "column": ("C", 41, 1.3, (1.4, 2), "M42", "hook", 6700, 185.0, 2.3, 22000.0, "east depot"),
    "trial": ("T", 41, 1.3, (1.4, 2), "M51", "hook", 6700, 168.0, 0.6, 4000.0, "west depot"),
}
SAW_BLADE = {"pivot-bay": "pivot", "auto-bay": "auto", "column-bay": "column"}

# Daily work of each saw: (material, section, share of the day's area, heats).
WORK = {
    "pivot-bay": [
        ("1018", "round 25mm", 0.25, ("H25-1187", "H26-0204")),
        ("4140", "round 40mm", 0.25, ("H25-0931", "H26-0316")),
        ("1018", "flat 50mm 12mm", 0.15, ("H25-1240",)),
        ("6061-T6", "tube 48.3mm 3.2mm", 0.15, ("L25-0655", "L26-0712")),
        ("6061-T6", "flat 50mm 6mm", 0.10, ("L26-0736",)),
        ("304", "tube 42.4mm 2mm", 0.10, ("H26-7851",)),
    ],
    "auto-bay": [
        ("4140", "round 40mm", 0.20, ("H25-0931", "H26-0316", "H26-0588")),
        ("4140", "round 60mm", 0.15, ("H25-0977", "H26-0402")),
        ("1045", "round 80mm", 0.15, ("H25-1102", "H26-0441")),
        ("1018", "round 25mm", 0.15, ("H25-1187", "H26-0204")),
        ("A36", "ibeam 200mm 100mm 5.6mm 8.5mm", 0.10, ("H25-2210", "H26-2291")),
        ("A36", "channel 150mm 75mm 5.5mm 9mm", 0.10, ("H25-2232", "H26-2307")),
        ("A36", "angle 75mm 75mm 8mm", 0.05, ("H26-2315",)),
        ("1020", "rtube 100mm 50mm 4mm", 0.10, ("H26-1904",)),
    ],
    "column-bay": [
        ("304", "round 250mm", 0.45, ("H25-7731", "H26-7790")),
        ("304", "round 200mm", 0.30, ("H25-7702", "H26-7815")),
        ("17-4PH", "round 200mm", 0.10, ("H25-4410", "H26-4452")),
        ("4140", "round 150mm", 0.15, ("H25-0990",)),
    ],
}
# Months when the column saw runs a 17-4 PH campaign (mostly 17-4 PH, some 304).
PH_MONTHS = ((2026, 2), (2026, 3), (2026, 9), (2026, 10))
PH_CAMPAIGN = [
    ("17-4PH", "round 200mm", 0.75, ("H26-4452", "H26-4470")),
    ("304", "round 250mm", 0.25, ("H26-7790",)),
]
DAILY_AREA_CM2 = {"pivot-bay": 700.0, "auto-bay": 2600.0, "column-bay": 1500.0}

# How blades end after a life of wear (invented shares; common-practice causes in data/):
# mostly retired worn out, some retired "dull" at a normal life (sawplan counts those as
# worn out too), and some break at the end of their life.
WEAR_MODES = (
    ("worn-out", 0.45),
    ("dull", 0.10),
    ("crooked", 0.14),
    ("body-crack", 0.12),
    ("weld", 0.07),
    ("stripped", 0.06),
    ("chips-welded", 0.06),
)


@dataclass(frozen=True)
class HistorySummary:
    """What was written, for the demo's report."""

    db_path: Path
    saws: int
    blades: int
    retired: int
    cut_entries: int
    cuts: int
    first_day: str
    last_day: str
    trial_blades_fitted: int
    trial_stripped: tuple[str, ...]  # trial-lot blades retired stripped, most area cut first


@dataclass
class _OnSaw:
    tag: str
    kind: str
    life_cm2: float
    area_cm2: float = 0.0
    broken_in: bool = True


@dataclass
class _State:
    rng: random.Random
    counters: dict[str, int] = field(default_factory=dict)
    trial_left: int = TRIAL_BLADES
    trial_tags: list[str] = field(default_factory=list)
    trial_stripped: list[tuple[float, str]] = field(default_factory=list)
    entries: int = 0
    cuts: int = 0
    job_no: int = 0


def working_days(start: dt.date = START, end: dt.date = END) -> list[dt.date]:
    """Monday to Friday from ``start`` to ``end``, less the shutdowns."""
    days, day = [], start
    while day <= end:
        shut = any(a <= day <= b for a, b in SHUTDOWNS)
        if day.weekday() < 5 and not shut:
            days.append(day)
        day += dt.timedelta(days=1)
    return days


def build(db_path: str | Path = DEFAULT_DB, *, seed: int = SEED) -> HistorySummary:
    """Write the invented history into a NEW log at ``db_path`` (an old file is replaced)."""
    from sawplan.materials import load_catalogue
    from sawplan.saws import load_saws
    from sawplan.sections import parse_section
    from sawplan.store import connect, write_transaction
    from sawplan.store.records import add_saw

    db_path = Path(db_path)
    db_path.parent.mkdir(parents=True, exist_ok=True)
    for suffix in ("", "-wal", "-shm", "-journal"):
        Path(f"{db_path}{suffix}").unlink(missing_ok=True)

    catalogue = load_catalogue(None)
    all_saws = load_saws(SAWS_FILE)
    saws = {name: all_saws[name] for name in SAW_BLADE}
    sections = {
        text: parse_section(text)
        for work in (*WORK.values(), PH_CAMPAIGN)
        for _m, text, _s, _h in work
    }
    state = _State(random.Random(seed))
    days = working_days()
    with connect(db_path) as db, write_transaction(db):
        for saw in saws.values():
            add_saw(db, saw, added_on="2025-11-24")
        saw_ids = {
            name: int(db.scalar("SELECT id FROM saws WHERE name = :name", {"name": name}))
            for name in saws
        }
        _buy_trial_lot(db, state)
        model = _ModelTimes(catalogue, sections, saws)
        on_saw: dict[str, _OnSaw] = {}
        for saw_name in saws:
            on_saw[saw_name] = _fit_new(db, state, saw_name, days[0])
        for day in days:
            for saw_name in saws:
                _stop_trial_if_over(db, state, on_saw, saw_name, day)
                _work_day(db, state, model, on_saw, saw_name, saw_ids[saw_name], day, catalogue)
        blades = int(db.scalar("SELECT COUNT(*) FROM blades"))
        retired = int(db.scalar("SELECT COUNT(*) FROM blades WHERE status = 'retired'"))
        fitted_trial = int(
            db.scalar(
                "SELECT COUNT(*) FROM blades WHERE lot = :lot AND status <> 'new'",
                {"lot": TRIAL_LOT},
            )
        )
    return HistorySummary(
        db_path=db_path,
        saws=len(saws),
        blades=blades,
        retired=retired,
        cut_entries=state.entries,
        cuts=state.cuts,
        first_day=days[0].isoformat(),
        last_day=days[-1].isoformat(),
        trial_blades_fitted=fitted_trial,
        trial_stripped=tuple(tag for _a, tag in sorted(state.trial_stripped, reverse=True)),
    )


# --- blades ----------------------------------------------------------------------------


def _spec(kind: str, tag: str, bought: dt.date, *, lot: str, notes: str | None = None):
    from sawplan.store.records import BladeSpec

    _p, width, thick, (coarse, fine), grade, form, length, price, _b, _e, supplier = BLADE_TYPES[
        kind
    ]
    return BladeSpec(
        tag=tag,
        width_mm=float(width),
        thickness_mm=thick,
        tpi_coarse=float(coarse),
        tpi_fine=float(fine),
        length_mm=float(length),
        blade_material="bi-metal",
        grade=grade,
        tooth_form=form,
        tooth_set="raker",
        supplier=supplier,
        lot=lot,
        price=price,
        bought_on=bought.isoformat(),
        welded="bought",
        notes=notes,
    )


def _next_tag(state: _State, kind: str) -> str:
    prefix = BLADE_TYPES[kind][0]
    state.counters[prefix] = state.counters.get(prefix, 0) + 1
    return f"{prefix}-{state.counters[prefix]:03d}"


def _buy_trial_lot(db, state: _State) -> None:
    from sawplan.store.records import add_blade

    bought = TRIAL[0] - dt.timedelta(days=7)
    for _ in range(TRIAL_BLADES):
        tag = _next_tag(state, "trial")
        spec = _spec("trial", tag, bought, lot=TRIAL_LOT, notes="trial lot, west depot")
        add_blade(db, spec, added_on=bought.isoformat())
        state.trial_tags.append(tag)


def _life(state: _State, kind: str) -> float:
    shape, scale = BLADE_TYPES[kind][8], BLADE_TYPES[kind][9]
    return max(state.rng.weibullvariate(scale, shape), 5.0)


def _fit_new(db, state: _State, saw_name: str, day: dt.date) -> _OnSaw:
    """Fit the next blade: a trial-lot blade on the column saw during the trial, else a new one."""
    from sawplan.store.records import add_blade, fit_blade

    kind = SAW_BLADE[saw_name]
    in_trial = saw_name == "column-bay" and TRIAL[0] <= day <= TRIAL[1] and state.trial_left > 0
    if in_trial:
        tag = state.trial_tags[TRIAL_BLADES - state.trial_left]
        state.trial_left -= 1
        fit_blade(
            db, tag, saw_name, on=day.isoformat(), tension_mpa=190.0, break_in=False,
            break_in_how=None,
        )  # fmt: skip
        return _OnSaw(tag, "trial", _life(state, "trial"), broken_in=False)
    tag = _next_tag(state, kind)
    lot = f"E{day:%y%m}"
    add_blade(db, _spec(kind, tag, day - dt.timedelta(days=10), lot=lot), added_on=day.isoformat())
    fit_blade(
        db, tag, saw_name, on=day.isoformat(), tension_mpa=200.0, break_in=True,
        break_in_how="half feed, raised over the first few cuts",
    )  # fmt: skip
    return _OnSaw(tag, kind, _life(state, kind), broken_in=True)


def _stop_trial_if_over(db, state: _State, on_saw: dict, saw_name: str, day: dt.date) -> None:
    """When the trial ends, a trial blade still running comes off (unworn: censored)."""
    from sawplan.store.records import remove_blade

    blade = on_saw[saw_name]
    if blade.kind == "trial" and day > TRIAL[1]:
        remove_blade(db, blade.tag, on=day.isoformat())
        on_saw[saw_name] = _fit_new(db, state, saw_name, day)


def _failure_mode(state: _State, blade: _OnSaw) -> str:
    if blade.kind == "trial":
        return "stripped" if blade.life_cm2 < 4000.0 else "dull"
    r, acc = state.rng.random(), 0.0
    for mode, share in WEAR_MODES:
        acc += share
        if r < acc:
            return mode
    return WEAR_MODES[0][0]


# --- cutting -------------------------------------------------------------------------------


class _ModelTimes:
    """sawplan's model time of one cut, cached per (material, section, saw, pitch)."""

    def __init__(self, catalogue, sections, saws):
        self.catalogue, self.sections, self.saws = catalogue, sections, saws
        self.cache: dict[tuple, float] = {}

    def minutes(self, material: str, section: str, saw_name: str, kind: str) -> float:
        from sawplan.cutting import evaluate
        from sawplan.cutting.pitch import Pitch

        coarse, fine = BLADE_TYPES[kind][3]
        key = (material, section, saw_name, coarse, fine)
        if key not in self.cache:
            result = evaluate(
                self.catalogue.get(material),
                self.sections[section],
                self.saws[saw_name],
                Pitch.of(float(coarse), float(fine)),
            )
            self.cache[key] = result.cut_time_model_min
        return self.cache[key]


def _time_factor(state: _State, blade: _OnSaw, saw_name: str, a0: float, a1: float) -> float:
    """Actual ÷ model time for cuts from a0 to a1 cm² of this blade's life (invented truths)."""
    factor = SAW_FACTOR[saw_name] * math.exp(state.rng.gauss(0.0, SCATTER_SIGMA))
    if blade.broken_in and a0 < BREAKIN_CM2 and a1 > a0:
        under = (min(a1, BREAKIN_CM2) - a0) / (a1 - a0)
        factor *= 1.0 + BREAKIN_SURCHARGE * under
    if blade.kind != "trial":
        worn = min(((a0 + a1) / 2.0) / blade.life_cm2, 1.0)
        factor *= 1.0 + WEAR_RISE * worn**4
    return factor


def _work_day(db, state, model, on_saw, saw_name, saw_id, day, catalogue) -> None:
    rng = state.rng
    budget = DAILY_AREA_CM2[saw_name] * rng.uniform(0.6, 1.4)
    work = WORK[saw_name]
    if saw_name == "column-bay" and (day.year, day.month) in PH_MONTHS:
        work = PH_CAMPAIGN
    picks = rng.sample(work, k=min(len(work), rng.choice((1, 2, 2, 3))))
    total_share = sum(w[2] for w in picks)
    for material, section_text, share, heats in picks:
        section = model.sections[section_text]
        area_cm2 = section.area_mm2 / 100.0
        count = max(1, round(budget * share / total_share / area_cm2))
        state.job_no += 1
        job = f"J-{day:%y}-{state.job_no:04d}"
        heat = rng.choice(heats)
        _cut_batch(db, state, model, on_saw, saw_name, saw_id, day, catalogue,
                   material, section_text, count, job, heat)  # fmt: skip


def _cut_batch(db, state, model, on_saw, saw_name, saw_id, day, catalogue,
               material, section_text, count, job, heat) -> None:  # fmt: skip
    """Cut ``count`` pieces, changing blades as they fail."""
    section = model.sections[section_text]
    area_cm2 = section.area_mm2 / 100.0
    while count > 0:
        blade = on_saw[saw_name]
        left = blade.life_cm2 - blade.area_cm2
        whole = min(count, int(left // area_cm2))
        if whole > 0:
            _log(db, state, model, blade, saw_name, saw_id, day, catalogue, material,
                 section_text, whole, whole * area_cm2, job, heat)  # fmt: skip
            count -= whole
        if count == 0:
            return
        # the blade gives out during the next cut: log the part it cut, retire, refit
        partial = blade.life_cm2 - blade.area_cm2
        if partial > 1.0:
            _log(db, state, model, blade, saw_name, saw_id, day, catalogue, material,
                 section_text, 1, partial, job, heat, partial_cut=True)  # fmt: skip
        _retire(db, state, blade, day)
        on_saw[saw_name] = _fit_new(db, state, saw_name, day)


def _log(db, state, model, blade, saw_name, saw_id, day, catalogue, material, section_text,
         count, area_cm2, job, heat, *, partial_cut=False) -> None:  # fmt: skip
    from sawplan.store.records import CutEntry, get_blade, log_cut

    section = model.sections[section_text]
    one = model.minutes(material, section_text, saw_name, blade.kind)
    share = area_cm2 / (section.area_mm2 / 100.0)  # cuts' worth of area
    factor = _time_factor(state, blade, saw_name, blade.area_cm2, blade.area_cm2 + area_cm2)
    mat = catalogue.get(material)
    entry = CutEntry(
        blade_id=get_blade(db, blade.tag).id,
        saw_id=saw_id,
        cut_on=day.isoformat(),
        material=mat.key,
        material_group=mat.group,
        section=section.spec(),
        area_mm2=area_cm2 * 100.0,
        pieces=1,
        count=count,
        time_min=round(one * share * factor, 3),
        predicted_time_min=None if partial_cut else one * count,
        coolant=True,
        job=job,
        heat=heat,
        note="blade gave out in this cut" if partial_cut else None,
    )
    log_cut(db, entry)
    blade.area_cm2 += area_cm2
    state.entries += 1
    state.cuts += count


def _retire(db, state: _State, blade: _OnSaw, day: dt.date) -> None:
    from sawplan.store.records import EventEntry, log_event, retire_blade

    mode = _failure_mode(state, blade)
    on = day.isoformat()
    if mode == "stripped":
        log_event(db, EventEntry(blade.tag, "teeth-lost", on, teeth=state.rng.randint(2, 6),
                                 note="teeth gone on entry"))  # fmt: skip
    location = {"body-crack": "gullet", "weld": "weld", "back-crack": "back edge"}.get(mode)
    retire_blade(db, blade.tag, mode, on=on, location=location)
    if blade.kind == "trial" and mode == "stripped":
        state.trial_stripped.append((blade.area_cm2, blade.tag))


def main(argv: list[str] | None = None) -> int:
    args = sys.argv[1:] if argv is None else argv
    path = Path(args[0]) if args else DEFAULT_DB
    s = build(path)
    print(
        f"{s.db_path}: {s.saws} saws, {s.blades} blades ({s.retired} retired), "
        f"{s.cut_entries} cut entries ({s.cuts:,} cuts), {s.first_day} to {s.last_day}; "
        f"trial lot {TRIAL_LOT}: {s.trial_blades_fitted} fitted, {len(s.trial_stripped)} stripped"
    )
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
