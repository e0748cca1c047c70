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

from collections import defaultdict
from dataclasses import dataclass
from typing import TYPE_CHECKING

from sawplan.store.stats import blade_type_of

if TYPE_CHECKING:  # pragma: no cover
    from sqlite_utils import Database


@dataclass(frozen=True)
class SpeedLifeRows:
    """Blades (one entry each) and their stretches at one speed (one entry per cut entry)."""

    tags: tuple[str, ...]
    blade_types: tuple[str, ...]
    material_groups: tuple[str | None, ...]
    failed: tuple[bool, ...]
    prices: tuple[float | None, ...]
    blade: tuple[int, ...]  # index into the blade tuples, per stretch, in cut order
    area_cm2: tuple[float, ...]
    time_min: tuple[float | None, ...]
    speed_m_min: tuple[float, ...]
    speed_logged: tuple[bool, ...]  # False: no speed logged, the blade's mean speed stands in
    left_out: tuple[str, ...]  # blades with cuts but no speed on any of them

    @property
    def area_cm2_total(self) -> float:
        return sum(self.area_cm2)

    @property
    def imputed_area_cm2(self) -> float:
        """Area of the cuts logged without a speed."""
        return sum(
            a for a, given in zip(self.area_cm2, self.speed_logged, strict=True) if not given
        )

    def only(self, *, material_group: str | None = None, blade_type: str | None = None):
        """The rows of the blades of one material group and/or one blade type, renumbered."""
        keep = [
            i
            for i in range(len(self.tags))
            if (material_group is None or self.material_groups[i] == material_group)
            and (blade_type is None or self.blade_types[i] == blade_type)
        ]
        new = {old: k for k, old in enumerate(keep)}
        stretches = [j for j, b in enumerate(self.blade) if b in new]
        return SpeedLifeRows(
            tags=tuple(self.tags[i] for i in keep),
            blade_types=tuple(self.blade_types[i] for i in keep),
            material_groups=tuple(self.material_groups[i] for i in keep),
            failed=tuple(self.failed[i] for i in keep),
            prices=tuple(self.prices[i] for i in keep),
            blade=tuple(new[self.blade[j]] for j in stretches),
            area_cm2=tuple(self.area_cm2[j] for j in stretches),
            time_min=tuple(self.time_min[j] for j in stretches),
            speed_m_min=tuple(self.speed_m_min[j] for j in stretches),
            speed_logged=tuple(self.speed_logged[j] for j in stretches),
            left_out=self.left_out if material_group is None and blade_type is None else (),
        )


def speed_life_rows(db: Database) -> SpeedLifeRows:
    """Every blade that has cut something at a logged band speed, with its cuts in order."""
    cuts: dict[int, list[tuple[float, float | None, float | None, str | None]]] = defaultdict(list)
    for blade_id, area, time, speed, group in db.execute(
        "SELECT blade_id, area_mm2, time_min, band_speed_m_min, material_group FROM cuts "
        "WHERE area_mm2 > 0 ORDER BY blade_id, cut_on, id"
    ):
        cuts[blade_id].append((area / 100.0, time, speed, group))
    tags, types, groups, failed, prices = [], [], [], [], []
    blade, area_cm2, time_min, speed_m_min, logged = [], [], [], [], []
    left_out = []
    for row in db.query(
        "SELECT id, tag, blade_material, grade, width_mm, thickness_mm, tpi_coarse, tpi_fine, "
        "price, status FROM blades ORDER BY id"
    ):
        mine = cuts.get(row["id"])
        if not mine:
            continue
        known = [(a, v) for a, _t, v, _g in mine if v is not None and v > 0]
        if not known:
            left_out.append(row["tag"])
            continue
        mean_v = sum(a * v for a, v in known) / sum(a for a, _ in known)
        by_group: dict[str | None, float] = defaultdict(float)
        index = len(tags)
        for a, t, v, g in mine:
            by_group[g] += a
            logged.append(v is not None and v > 0)
            blade.append(index)
            area_cm2.append(a)
            time_min.append(t)
            speed_m_min.append(float(v) if logged[-1] else mean_v)
        tags.append(row["tag"])
        types.append(blade_type_of(row))
        groups.append(max(by_group.items(), key=lambda kv: kv[1])[0])
        failed.append(row["status"] == "retired")
        prices.append(row["price"])
    return SpeedLifeRows(
        tags=tuple(tags),
        blade_types=tuple(types),
        material_groups=tuple(groups),
        failed=tuple(failed),
        prices=tuple(prices),
        blade=tuple(blade),
        area_cm2=tuple(area_cm2),
        time_min=tuple(time_min),
        speed_m_min=tuple(speed_m_min),
        speed_logged=tuple(logged),
        left_out=tuple(left_out),
    )
