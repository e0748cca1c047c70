"""The log as plain arrays for the fit of blade life against band speed (``sawplan.life.speed_life``).

Every cut entry records the band speed it ran at (``cuts.band_speed_m_min``,
``sawplan log cut --speed``) when the operator gave one.  A blade's life is the
area of all its cuts, in the order cut; its material group and blade type are
those of ``stats.blade_lives`` (the group it cut most area of).  A cut logged
without a speed takes the area-weighted mean speed of the same blade's other
cuts, and the rows say how much area that covers; a blade with no speed on any
cut cannot say anything about speed and is left out (counted).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from sawplan.store.fields import pitch_label
from sawplan.store.stats import blade_type_of

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.db import Log as Database


# the two filters, and the two queries for each (no value is ever spliced in: bound parameters)
_ALL = "area_mm2 > 0"
_GROUP = "area_mm2 > 0 AND blade_id IN (SELECT blade_id FROM cuts WHERE material_group = :group)"
_CUTS_SQL = {
    w: "SELECT blade_id, area_mm2, time_min, band_speed_m_min FROM cuts WHERE "
    + w
    + " ORDER BY blade_id, cut_on, id"
    for w in (_ALL, _GROUP)
}
_GROUPS_SQL = {
    w: "SELECT blade_id, material_group, SUM(area_mm2) FROM cuts WHERE "
    + w
    + " GROUP BY blade_id, material_group"
    for w in (_ALL, _GROUP)
}


@dataclass(frozen=True)
class SpeedLifeRows:
    """Blades (one entry each) and their stretches at one speed (one entry per cut entry).

    Per-stretch columns are numpy arrays (a big log has 10⁵ cut entries).
    """

    tags: tuple[str, ...]
    blade_types: tuple[str, ...]
    pitches: tuple[str, ...]  # e.g. "3/4"
    blade_materials: tuple[str, ...]  # bi-metal, carbon, carbide
    material_groups: tuple[str | None, ...]
    failed: tuple[bool, ...]
    prices: tuple[float | None, ...]
    blade: Any  # int array: index into the blade tuples, per stretch, in cut order
    area_cm2: Any  # float array
    time_min: Any  # float array, NaN where no time was logged
    speed_m_min: Any  # float array
    speed_logged: Any  # bool array; False: no speed logged, the blade's mean speed stands in
    left_out: tuple[str, ...]  # blades with cuts but no speed on any of them

    @property
    def area_cm2_total(self) -> float:
        return float(self.area_cm2.sum())

    @property
    def imputed_area_cm2(self) -> float:
        """Area of the cuts logged without a speed."""
        return float(self.area_cm2[~self.speed_logged].sum())

    def only(self, *, material_group: str | None = None, blade_type: str | None = None):
        """The rows of the blades of one material group and/or one blade type, renumbered."""
        import numpy as np

        keep = [
            i
            for i in range(len(self.tags))
            if (material_group is None or self.material_groups[i] == material_group)
            and (blade_type is None or self.blade_types[i] == blade_type)
        ]
        new = np.full(len(self.tags), -1, dtype=np.int64)
        new[keep] = np.arange(len(keep))
        mine = new[self.blade] >= 0 if len(self.blade) else np.zeros(0, dtype=bool)
        return SpeedLifeRows(
            tags=tuple(self.tags[i] for i in keep),
            blade_types=tuple(self.blade_types[i] for i in keep),
            pitches=tuple(self.pitches[i] for i in keep),
            blade_materials=tuple(self.blade_materials[i] for i in keep),
            material_groups=tuple(self.material_groups[i] for i in keep),
            failed=tuple(self.failed[i] for i in keep),
            prices=tuple(self.prices[i] for i in keep),
            blade=new[self.blade[mine]],
            area_cm2=self.area_cm2[mine],
            time_min=self.time_min[mine],
            speed_m_min=self.speed_m_min[mine],
            speed_logged=self.speed_logged[mine],
            left_out=self.left_out if material_group is None and blade_type is None else (),
        )


def speed_life_rows(db: Database, material_group: str | None = None) -> SpeedLifeRows:
    """Every blade that has cut something at a logged band speed, with its cuts in order.

    With ``material_group``, only blades that cut that group at all are read
    (their other cuts too: a blade's life is all it cut); ``only`` then keeps
    those whose group it is.
    """
    import numpy as np

    where, params = (_ALL, {}) if material_group is None else (_GROUP, {"group": material_group})
    rows = db.execute(_CUTS_SQL[where], params).fetchall()
    cols = np.array(rows, dtype=float).reshape(-1, 4)  # None → NaN
    blade_id = cols[:, 0].astype(np.int64)
    area = cols[:, 1] / 100.0
    speed = cols[:, 3]
    logged = np.isfinite(speed) & (speed > 0)
    dominant: dict[int, tuple[str | None, float]] = {}
    # the group a blade cut most area of; on a tie the first by name, on every engine
    for bid, group, total in sorted(
        db.execute(_GROUPS_SQL[where], params), key=lambda r: str(r[1])
    ):
        if bid not in dominant or total > dominant[bid][1]:
            dominant[bid] = (group, total)
    top = int(blade_id.max()) + 1 if len(blade_id) else 1
    known_area = np.bincount(blade_id, weights=np.where(logged, area, 0.0), minlength=top)
    known_av = np.bincount(
        blade_id, weights=np.where(logged, area * np.nan_to_num(speed), 0.0), minlength=top
    )
    tags, types, groups, failed, prices, left_out = [], [], [], [], [], []
    pitches, materials = [], []
    index = np.full(top, -1, dtype=np.int64)
    for row in db.query(
        "SELECT id, tag, blade_material, grade, width_mm, thickness_mm, tpi_coarse, tpi_fine, "
        "price, status FROM blades ORDER BY id"
    ):
        bid = row["id"]
        if bid not in dominant:
            continue  # cut nothing
        if known_area[bid] <= 0.0:
            left_out.append(row["tag"])
            continue
        index[bid] = len(tags)
        tags.append(row["tag"])
        types.append(blade_type_of(row))
        pitches.append(pitch_label(row["tpi_coarse"], row["tpi_fine"]))
        materials.append(row["blade_material"])
        groups.append(dominant[bid][0])
        failed.append(row["status"] == "retired")
        prices.append(row["price"])
    keep = index[blade_id] >= 0 if len(blade_id) else np.zeros(0, dtype=bool)
    mean_v = np.divide(known_av, known_area, out=np.zeros(top), where=known_area > 0)
    filled = np.where(logged, speed, mean_v[blade_id])
    return SpeedLifeRows(
        tags=tuple(tags),
        blade_types=tuple(types),
        pitches=tuple(pitches),
        blade_materials=tuple(materials),
        material_groups=tuple(groups),
        failed=tuple(failed),
        prices=tuple(prices),
        blade=index[blade_id[keep]],
        area_cm2=area[keep],
        time_min=cols[keep, 2],
        speed_m_min=filled[keep],
        speed_logged=logged[keep],
        left_out=tuple(left_out),
    )
