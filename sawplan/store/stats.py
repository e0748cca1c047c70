"""Queries that turn the log into the plain lists ``sawplan.life`` works on.

A blade's life is the area it cut (cm²).  A retired blade is a failure at that
area; a blade still fitted, or removed unworn, is right-censored: its life is
at least that area (as in any life-data analysis).  A blade that has cut nothing and is not
retired tells nothing about life and is left out.
"""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass
from functools import lru_cache
from typing import TYPE_CHECKING, NamedTuple

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life.end_of_life import EndOfLife
    from sawplan.store.db import Log as Database

from sawplan.display import Q, join, say
from sawplan.store.records import pitch_label


@dataclass(frozen=True)
class BladeLife:
    """One blade as a life observation."""

    tag: str
    blade_type: str
    material_group: str | None  # the group it cut most area of
    area_cm2: float
    failed: bool
    mode: str | None
    price: float | None
    status: str
    lot: str | None = None
    supplier: str | None = None
    bought_on: str | None = None
    saw: str | None = None  # the saw it cut most area on
    end: EndOfLife | None = None  # how a retired blade's life ended (``life_ends``)

    @property
    def is_failure(self) -> bool:
        """Retired by a failure, not worn out at the end of a normal life.

        Before ``life_ends.with_ends`` judged it, the recorded word decides.
        """
        if not self.failed:
            return False
        if self.end is not None:
            return self.end.kind == "failure"
        return self.mode != "worn-out"

    @property
    def failure_mode(self) -> str | None:
        """The failure mode it counts under (a worn-out retired early counts as dull)."""
        return self.end.counted_as if self.end is not None else self.mode


def blade_type_of(row: dict) -> str:
    """Material, grade, width × thickness and pitch: what makes blades comparable."""
    return _blade_type(
        row["blade_material"],
        row.get("grade") or "",
        row["width_mm"],
        row["thickness_mm"],
        row["tpi_coarse"],
        row["tpi_fine"],
    )


@lru_cache(maxsize=512, typed=True)  # a log of 10³ blades holds a handful of types
def _blade_type(
    material: str, grade: str, width_mm: float, thickness_mm: float, coarse: float, fine: float
) -> str:
    size = say("{}×{}", Q("size", width_mm), Q("size", thickness_mm))
    parts = [material, grade, size, pitch_label(coarse, fine)]
    return join(" ", [p for p in parts if p])


# One row per blade, material group, saw and distinct area, with the number of cuts of
# that area: far fewer rows than cuts, as a blade cuts the same sections over and over.
_AREAS_SQL = (
    "SELECT blade_id, material_group, saw_id, area_mm2, COUNT(*) FROM cuts "
    "GROUP BY blade_id, material_group, saw_id, area_mm2"
)

Terms = list[tuple[float, int]]  # (area, how many cuts had it)


def exact_sum(terms: Terms) -> float:
    """Σ count × value, rounded once: what ``math.fsum`` of every single cut gives.

    Each float is a whole number over a power of two, so the sum is worked in
    whole numbers over the largest denominator, and Python's int ÷ int rounds
    it correctly (half to even), as ``math.fsum`` rounds its exact sum.
    """
    ratios = [(float(value).as_integer_ratio(), count) for value, count in terms]
    if not ratios:
        return 0.0
    denominator = max(den for (_, den), _ in ratios)
    numerator = sum(num * count * (denominator // den) for (num, den), count in ratios)
    return numerator / denominator


def blade_lives(db: Database, *, include_unused_failures: bool = False) -> list[BladeLife]:
    """Every blade that is a life observation, in the order blades were added.

    Retired blades that never cut anything are left out unless
    ``include_unused_failures`` (a zero life cannot enter a Weibull fit).
    """
    # Summed here, exactly (``exact_sum``), not by the database: SUM adds in whatever order
    # the engine scans, so SQLite and PostgreSQL could differ in the last digit.
    areas: dict[int, dict[str | None, Terms]] = defaultdict(lambda: defaultdict(list))
    on_saw: dict[int, dict[int | None, Terms]] = defaultdict(lambda: defaultdict(list))
    for blade_id, group, saw_id, area, count in db.bulk_rows(_AREAS_SQL):
        areas[blade_id][group].append((area, count))
        on_saw[blade_id][saw_id].append((area, count))
    saw_names = {sid: name for sid, name in db.execute("SELECT id, name FROM saws")}
    lives = []
    for row in db.query(
        "SELECT id, tag, blade_material, grade, width_mm, thickness_mm, tpi_coarse, tpi_fine, "
        "price, status, retire_cause, lot, supplier, bought_on FROM blades ORDER BY id"
    ):
        area_cm2 = exact_sum([t for g in areas.get(row["id"], {}).values() for t in g]) / 100.0
        failed = row["status"] == "retired"
        if area_cm2 <= 0.0 and not (failed and include_unused_failures):
            continue
        saw_id = _most(on_saw.get(row["id"], {}))
        lives.append(
            BladeLife(
                tag=row["tag"],
                blade_type=blade_type_of(row),
                material_group=_most(areas.get(row["id"], {})),
                area_cm2=area_cm2,
                failed=failed,
                mode=row["retire_cause"] if failed else None,
                price=row["price"],
                status=row["status"],
                lot=row["lot"],
                supplier=row["supplier"],
                bought_on=row["bought_on"],
                saw=saw_names.get(saw_id) if saw_id is not None else None,
            )
        )
    return lives


def _most(by_key: dict) -> object:
    """The key with the most area (exact sums; ties to the first key in text order)."""
    if not by_key:
        return None
    sums = {k: exact_sum(by_key[k]) for k in sorted(by_key, key=str)}
    return max(sums.items(), key=lambda kv: kv[1])[0]


def unused_retired(db: Database) -> list[str]:
    """Tags of blades retired before they cut anything (left out of the fit)."""
    return [
        r[0]
        for r in db.execute(
            "SELECT tag FROM blades b WHERE status = 'retired' "
            "AND NOT EXISTS (SELECT 1 FROM cuts c WHERE c.blade_id = b.id) ORDER BY id"
        )
    ]


class TimedCut(NamedTuple):
    """A cut entry with both its measured and its predicted time (batch totals).

    A named tuple, not a frozen dataclass: a big log has 10⁵ of them.
    """

    saw: str | None
    material_group: str | None
    time_min: float
    predicted_time_min: float
    count: int = 1  # the cuts the entry holds
    cut_on: str | None = None  # the entry's date (ISO), for the calibration's trend


CALIBRATION_WINDOW = 200
# "= :x" never matches NULL, so a cut without a saw or a group has its own query
_TIMED = (
    "SELECT time_min, predicted_time_min, count, cut_on FROM cuts WHERE {} AND time_min > 0 "
    "AND predicted_time_min > 0 ORDER BY id DESC LIMIT :latest"
)
_TIMED_SQL = {
    (saw_null, group_null): _TIMED.format(
        ("saw_id IS NULL" if saw_null else "saw_id = :saw_id")
        + (" AND material_group IS NULL" if group_null else " AND material_group = :material_group")
    )
    for saw_null in (False, True)
    for group_null in (False, True)
}


def timed_cuts(
    db: Database,
    *,
    saw: str | None = None,
    material_group: str | None = None,
    latest: int = CALIBRATION_WINDOW,
) -> list[TimedCut]:
    """The latest ``latest`` entries carrying both times, per saw and material group.

    Only recent entries count: a saw's calibration drifts as it is serviced and
    re-set, and 200 entries give a steady median.  Each (saw, group) is read
    newest first through the (saw_id, material_group) index, so a big log
    costs no more than a small one.
    """
    names = {sid: name for sid, name in db.execute("SELECT id, name FROM saws")}
    pair_sql = "SELECT DISTINCT saw_id, material_group FROM cuts"
    pairs = list(db.execute(pair_sql))
    if saw is not None:
        wanted = saw.strip().lower()
        pairs = [p for p in pairs if (names.get(p[0]) or "").lower() == wanted]
    if material_group is not None:
        pairs = [p for p in pairs if p[1] == material_group]
    out: list[TimedCut] = []
    for saw_id, group in sorted(pairs, key=lambda p: (str(names.get(p[0])), str(p[1]))):
        rows = db.execute(
            _TIMED_SQL[saw_id is None, group is None],
            {"saw_id": saw_id, "material_group": group, "latest": latest},
        ).fetchall()
        name = names.get(saw_id)
        out += [TimedCut(name, group, t, p, n, on) for t, p, n, on in reversed(rows)]
    return out


@dataclass(frozen=True)
class LogCounts:
    saws: int
    blades: int
    cuts: int  # entries
    cut_count: int  # cuts, batches counted in full
    events: int
    corrections: int  # corrected or taken-back cuts (station taps): they change lives in place


def log_counts(db: Database) -> LogCounts:
    one = db.execute(
        "SELECT (SELECT COUNT(*) FROM saws), (SELECT COUNT(*) FROM blades), "
        "(SELECT COUNT(*) FROM cuts), (SELECT COALESCE(SUM(count), 0) FROM cuts), "
        "(SELECT COUNT(*) FROM events), (SELECT COUNT(*) FROM taps WHERE corrects IS NOT NULL)"
    ).fetchone()
    return LogCounts(*(int(v) for v in one))
