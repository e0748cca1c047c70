"""A small invented blade log for the office pages' tests, written through the store's API.

Eight blades of one type on two saws: six retired (two stripped, one weld
break, three worn out), one still fitted and one removed unworn.  The fitted
blade carries nine timed cut entries on "bay 1" whose actual ÷ model ratios
are chosen so the calibration trend's blocks of three have known medians.
"""

from __future__ import annotations

import dataclasses

# tag -> (lot, life cm², how it ended, retired on); None: still running (censored)
BLADES = {
    "B-01": ("L-1", 1_200.0, "stripped", "2024-03-05"),
    "B-02": ("L-1", 2_500.0, "weld", "2024-03-12"),
    "B-03": ("L-2", 9_000.0, "worn-out", "2024-04-02"),
    "B-04": ("L-2", 11_000.0, "worn-out", "2024-04-20"),
    "B-05": ("L-2", 14_000.0, "worn-out", "2024-05-10"),
    "B-06": ("L-2", 6_000.0, "stripped", "2024-05-22"),
    "B-07": ("L-2", 7_000.0, None, None),  # fitted on bay 1
    "B-08": ("L-2", 3_000.0, None, None),  # removed unworn
}
PRICE = 60.0
# actual ÷ model time of B-07's nine timed entries, oldest first (invented)
RATIOS = (1.10, 1.20, 1.30, 0.90, 1.00, 1.05, 1.40, 1.50, 1.60)
MODEL_MIN = 4.0  # the model's time of each entry


def build(db_path: str) -> None:
    """Write the log described above into a new, empty log at ``db_path``."""
    from sawplan.saws import load_saws
    from sawplan.store import connect, write_transaction
    from sawplan.store.records import (
        BladeSpec,
        CutEntry,
        add_blade,
        add_saw,
        fit_blade,
        get_blade,
        log_cut,
        remove_blade,
        retire_blade,
    )

    profile = load_saws()["mid-production"]
    with connect(db_path) as db, write_transaction(db):
        for name in ("bay 1", "bay 2"):
            add_saw(db, dataclasses.replace(profile, name=name), added_on="2024-01-01")
        for n, (tag, (lot, life, end, on)) in enumerate(BLADES.items()):
            add_blade(db, BladeSpec(tag=tag, width_mm=27.0, thickness_mm=0.9, tpi_coarse=4.0,
                                    tpi_fine=6.0, grade="M42", supplier="east depot", lot=lot,
                                    bought_on="2024-01-02", price=PRICE),
                      added_on="2024-01-03")  # fmt: skip
            blade_id = get_blade(db, tag).id
            if tag == "B-07":
                fit_blade(db, tag, "bay 1", on="2024-01-15")
                for day, ratio in enumerate(RATIOS, start=1):
                    log_cut(db, CutEntry(blade_id=blade_id, cut_on=f"2024-02-{day:02d}",
                                         material="1018", material_group="carbon-steel",
                                         section="round 50mm", area_mm2=life * 100.0 / len(RATIOS),
                                         saw_id=1, time_min=ratio * MODEL_MIN,
                                         predicted_time_min=MODEL_MIN))  # fmt: skip
                continue
            log_cut(db, CutEntry(blade_id=blade_id, cut_on="2024-02-01", material="1018",
                                 material_group="carbon-steel", section="round 50mm",
                                 area_mm2=life * 100.0, saw_id=1 + n % 2))  # fmt: skip
            if tag == "B-08":
                fit_blade(db, tag, "bay 2", on="2024-01-20")
                remove_blade(db, tag, on="2024-02-20")
            elif end is not None:
                retire_blade(db, tag, end, on=on)


ROUND_50_MM2 = 1963.4954084936207  # π × 25², the area of one cut through a 50 mm round


def send(db_path: str, saw: str, name: str, cuts: int = 4, pitch: str = "4/6") -> int:
    """Queue ``cuts`` cuts of a 50 mm round on ``saw`` as job ``name``; returns the job's id."""
    from sawplan.saws import load_saws
    from sawplan.store import connect
    from sawplan.store.station_rows import send_job

    rows = [
        {"seq": i, "bar": 1, "step": "trim" if i == 1 else "part", "position_mm": 5.0 + 300 * (i - 1),
         "mark": None if i == 1 else "A", "part": None if i == 1 else "shaft", "heat": "H-1",
         "stock": "1018 round 50 mm", "location": "R1", "material": "1018",
         "material_group": "carbon-steel", "section": "round 50mm", "area_mm2": ROUND_50_MM2,
         "predicted_time_min": 2.0, "band_speed_m_min": 60.0, "feed_mm_min": 40.0, "pitch": pitch}
        for i in range(1, cuts + 1)
    ]  # fmt: skip
    with connect(db_path) as db:
        profile = dataclasses.replace(load_saws()["mid-production"], name=saw)
        sent = send_job(db, name=name, saw_name=saw, profile=profile, cuts=rows, on="2024-06-01")
    return sent.id
