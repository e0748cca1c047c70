"""What the cost of a cut needs from the blade log, kept in the user's cache folder.

``cut --economics`` and ``plan --run`` price a cut with the life of the
group's blades: the fit of life against band speed (``sawplan.life.speed_life``),
the Weibull mean life when there is no such fit, the mean logged band speed and
the blade prices — for the group and for each blade type it knows.  Working
them out means reading every cut of the group (10⁵ rows in a big log), scipy's
optimiser (half a second to import) and three fits; the answer changes only
when the log does.  So the summaries are kept in a small JSON file in the
user's cache folder, one per log, and used again while the log's identity
(where it is; for a SQLite file, which file) and its row counts (saws, blades,
cut entries, cuts, events: every write that changes a life adds a row — a
cut, a blade, the ``failure`` event of a retirement) are what they were when
the file was written, and the code that made them is the same.  Anything else
— no cache folder, a file that cannot be read or written, another format —
recomputes, and nothing is lost: the cache is never the only copy of anything.

The log is read only through the store (``BladeLog.speed_rows``,
``sawplan.store.stats.log_counts``); the cache file holds fitted numbers, the
median blade price and counts, never rows, and is private to the user (0600).
"""

from __future__ import annotations

import hashlib
import json
import os
import weakref
from dataclasses import asdict, dataclass, fields
from pathlib import Path
from typing import Any

FORMAT = 1  # bump when what is kept changes
_CODE = ("life/speed_life.py", "life/weibull.py", "store/speed_rows.py", "cli/log_life.py")


@dataclass(frozen=True)
class LogLife:
    """The log's blades of one material group (or of one blade type in it), summed up."""

    fit: Any  # SpeedLifeFit | SpeedLifeNotFitted
    blades: int
    price_median: float | None  # of the blades with a price
    priced_blades: int
    weibull_life_cm2: float | None  # mean life by Weibull, worked out only without a fit
    weibull_blades: int
    mean_speed_m_min: float | None  # area-weighted over the blades' cuts (None: no cuts)
    pitch: str | None  # the first blade's pitch (what a blade type is cut with)


@dataclass(frozen=True)
class GroupLife:
    """One material group: all its blades, and each blade type it knows."""

    group: LogLife
    types: dict[str, LogLife]


def summarise(part: Any) -> LogLife:
    """The summary of ``part`` (``SpeedLifeRows`` of some blades): fits and figures."""
    import statistics

    import numpy as np

    from sawplan.life.speed_life import fit_speed_life
    from sawplan.life.weibull import fit_weibull

    fit = fit_speed_life(part.blade, part.area_cm2, part.speed_m_min, part.failed)
    prices = [p for p in part.prices if p is not None and p > 0]
    life, life_n = None, 0
    if part.tags and not fit.fitted:
        lives = np.bincount(part.blade, weights=part.area_cm2, minlength=len(part.tags))
        w = fit_weibull([float(x) for x in lives], part.failed)
        if w.fitted:
            life, life_n = w.mean_life_cm2, w.n
    mean_speed = None
    if len(part.area_cm2):
        mean_speed = float((part.area_cm2 * part.speed_m_min).sum() / part.area_cm2.sum())
    return LogLife(
        fit=fit,
        blades=len(part.tags),
        price_median=statistics.median(prices) if prices else None,
        priced_blades=len(prices),
        weibull_life_cm2=life,
        weibull_blades=life_n,
        mean_speed_m_min=mean_speed,
        pitch=part.pitches[0] if part.pitches else None,
    )


def _from_rows(log: Any, material_group: str) -> GroupLife | None:
    rows = log.speed_rows(material_group)
    if rows is None:
        return None
    group = rows.only(material_group=material_group)
    types = {t: summarise(group.only(blade_type=t)) for t in sorted(set(group.blade_types))}
    return GroupLife(summarise(group), types)


_SEEN: weakref.WeakKeyDictionary[Any, dict[str, GroupLife | None]] = weakref.WeakKeyDictionary()


def group_life(log: Any, material_group: str) -> GroupLife | None:
    """The group's summary (None without a log): from the cache while the log is unchanged.

    Worked out (or read back) once per command and log: ``cut`` asks twice, ``plan``
    once per section.
    """
    if not log.exists:
        return None
    seen = _SEEN.setdefault(log, {})
    if material_group not in seen:
        seen[material_group] = _kept_or_worked_out(log, material_group)
    return seen[material_group]


def _kept_or_worked_out(log: Any, material_group: str) -> GroupLife | None:
    try:
        key, path = _key(log), _file(log)
    except (OSError, ValueError):
        return _from_rows(log, material_group)
    kept = _read(path, key)
    if material_group in kept:
        return kept[material_group]
    life = _from_rows(log, material_group)
    if life is not None:
        _write(path, key, {**kept, material_group: life})
    return life


# --- the cache file ----------------------------------------------------------------------


def cache_folder() -> Path:
    """``$SAWPLAN_HOME/cache`` (tests, portable installs), else the user's cache folder."""
    home = os.environ.get("SAWPLAN_HOME")
    if home:
        return Path(home) / "cache"
    from platformdirs import user_cache_path

    return user_cache_path("sawplan", appauthor=False)


def _identity(log: Any) -> dict[str, Any]:
    where = log.path
    out: dict[str, Any] = {"log": str(where.label)}
    if where.kind == "sqlite" and where.path is not None:
        st = os.stat(where.path)
        out.update(log=str(where.path.resolve()), device=st.st_dev, inode=st.st_ino)
    return out


def _file(log: Any) -> Path:
    name = hashlib.sha256(_identity(log)["log"].encode("utf-8")).hexdigest()[:32]
    return cache_folder() / "log-life" / f"{name}.json"


def _code_stamp() -> list[Any]:
    import sawplan

    root = Path(sawplan.__file__).resolve().parent
    stamp: list[Any] = [sawplan.__version__, FORMAT]
    for name in _CODE:
        st = os.stat(root / name)
        stamp += [name, st.st_size, st.st_mtime_ns]
    return stamp


def _key(log: Any) -> dict[str, Any]:
    """What must be unchanged for the kept summaries to stand: log, its rows, the code."""
    from sawplan.store.db import connect
    from sawplan.store.stats import log_counts

    with connect(log.path, create=False, light=True) as db:
        counts = asdict(log_counts(db))
    return {**_identity(log), "counts": counts, "code": _code_stamp()}


def _read(path: Path, key: dict[str, Any]) -> dict[str, GroupLife]:
    try:
        kept = json.loads(path.read_text(encoding="utf-8"))
        if kept.get("key") != json.loads(json.dumps(key)):
            return {}
        return {g: _group(v) for g, v in kept["groups"].items()}
    except (OSError, ValueError, KeyError, TypeError, AttributeError):
        return {}  # no file, another format, or damaged: work it out again


def _write(path: Path, key: dict[str, Any], groups: dict[str, GroupLife]) -> None:
    text = json.dumps({"key": key, "groups": {g: _plain(v) for g, v in groups.items()}})
    try:
        path.parent.mkdir(mode=0o700, parents=True, exist_ok=True)
        tmp = path.with_name(f".{path.name}.{os.getpid()}")
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
        with os.fdopen(fd, "w", encoding="utf-8") as handle:
            handle.write(text)
        os.replace(tmp, path)
    except OSError:
        pass  # a cache that cannot be written only costs the next run the work again


def _plain(life: GroupLife) -> dict[str, Any]:
    def one(x: LogLife) -> dict[str, Any]:
        fit = {"fitted": bool(x.fit.fitted), **asdict(x.fit)}
        return {**asdict(x), "fit": fit}

    return {"group": one(life.group), "types": {t: one(x) for t, x in life.types.items()}}


def _group(data: dict[str, Any]) -> GroupLife:
    return GroupLife(_life(data["group"]), {t: _life(x) for t, x in data["types"].items()})


def _life(data: dict[str, Any]) -> LogLife:
    from sawplan.life.speed_life import SpeedLifeFit, SpeedLifeNotFitted

    fit = dict(data["fit"])
    cls = SpeedLifeFit if fit.pop("fitted") else SpeedLifeNotFitted
    names = {f.name for f in fields(cls)}
    values = {k: tuple(v) if isinstance(v, list) else v for k, v in fit.items() if k in names}
    return LogLife(**{**data, "fit": cls(**values)})
