"""What the office pages show, built from the log's own reports: frozen dataclasses, no SQL.

Each builder takes an open log and calls the store's report functions
(``life_report``, ``calibration_table``, ``timed_cuts``, ``list_blades``) and
the pure ``sawplan.life`` core; nothing here reads a table or fits anything
itself.  The templates and the charts (``charts.py``) only turn these into
HTML, SVG and CSV.
"""

from __future__ import annotations

import math
from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from sawplan.store.reports import DEFAULT_CONFIDENCE

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.life import WeibullPlot
    from sawplan.store.blade_rows import Blade
    from sawplan.store.calibration import CalibrationRow
    from sawplan.store.db import Log
    from sawplan.store.life_report import LifeReport
    from sawplan.store.reports import JobForecast
    from sawplan.store.stats import TimedCut

# failed fractions at which the plot's interval band is worked out (those inside the fit's line)
BAND_LEVELS = (
    0.001,
    0.002,
    0.005,
    0.01,
    0.02,
    0.05,
    0.1,
    0.2,
    0.3,
    0.5,
    0.632,
    0.8,
    0.9,
    0.95,
    0.99,
)
RECENT_ENDS = 12  # retirements listed on the life page, newest first
TREND_POINTS = 12  # at most this many points per saw and material group on the trend
TREND_ENTRIES = 2_400  # the newest timed entries per saw and group the trend reads (bounded)


# --- blade life ------------------------------------------------------------------------------


@dataclass(frozen=True)
class BandPoint:
    """The likelihood-ratio interval of the life by which ``failed_fraction`` has failed."""

    failed_fraction: float
    life_cm2: float  # the fit's own life at that fraction
    low_cm2: float
    high_cm2: float  # inf when the data do not bound it on that side


@dataclass(frozen=True)
class WeibullView:
    """The Weibull probability plot: failures at their ranks, the fit, its interval band."""

    plot: WeibullPlot
    bands: tuple[BandPoint, ...]  # empty without a fit
    confidence: float
    shape: float | None
    scale_cm2: float | None


@dataclass(frozen=True)
class RecentEnd:
    """A retired blade, for the list of the latest retirements."""

    tag: str
    blade_type: str
    retired_on: str | None
    recorded: str | None  # the word logged when it came off (a failure-mode code)
    counted_as: str  # the plain name of how its life counts (``sawplan.life.end_of_life``)
    kind: str  # "failure", "wear", or "left out" (retired before cutting anything)
    area_cm2: float
    saw: str | None  # the saw it cut most on


@dataclass(frozen=True)
class LifeView:
    """``/office/life``: the whole life report, its Weibull plot and the latest retirements."""

    report: LifeReport
    weibull: WeibullView | None  # None while no blade has been retired
    recent: tuple[RecentEnd, ...]


def life_view(db: Log, *, confidence: float = DEFAULT_CONFIDENCE) -> LifeView:
    """Everything ``sawplan life`` reports, plus the plot and the newest retirements."""
    from sawplan.store.life_report import life_report

    report = life_report(db, confidence=confidence)
    return LifeView(report, weibull_view(report), recent_ends(db, report))


def weibull_view(report: LifeReport) -> WeibullView | None:
    """Plot points (Johnson's adjusted median ranks) and the fit's likelihood-ratio band."""
    from sawplan.life import weibull_plot
    from sawplan.life.weibull import quantile_interval

    lives = [b.area_cm2 for b in report.lives]
    failed = [b.failed for b in report.lives]
    if not any(failed):
        return None
    fit = report.overall.fit if report.overall.fitted else None
    plot = weibull_plot(lives, failed, fit)
    bands: list[BandPoint] = []
    if fit is not None and plot.line:
        low_y, high_y = plot.line[0][1], plot.line[-1][1]
        for p in BAND_LEVELS:
            if low_y <= math.log(-math.log1p(-p)) <= high_y:
                lo, hi = quantile_interval(lives, failed, fit, p)
                bands.append(BandPoint(p, fit.quantile_cm2(p), lo, hi))
    return WeibullView(
        plot=plot,
        bands=tuple(bands),
        confidence=report.confidence,
        shape=fit.shape if fit else None,
        scale_cm2=fit.scale_cm2 if fit else None,
    )


def recent_ends(db: Log, report: LifeReport, limit: int = RECENT_ENDS) -> tuple[RecentEnd, ...]:
    """The latest retirements, newest first, each with how its life counts."""
    from sawplan.life import failure_modes
    from sawplan.store.records import list_blades

    ends = {b.tag: b for b in report.lives}
    names = failure_modes()
    retired = sorted(
        list_blades(db, status="retired"), key=lambda b: (b.retired_on or "", b.id), reverse=True
    )
    out = []
    for blade in retired[:limit]:
        life = ends.get(blade.tag)
        if life is None:
            kind, counted = "left out", "retired before cutting anything"
        elif life.end is not None:
            kind, counted = life.end.kind, life.end.name
        else:
            code = life.failure_mode or ""
            kind = "failure" if life.is_failure else "wear"
            counted = names[code].name if code in names else code
        out.append(
            RecentEnd(
                tag=blade.tag,
                blade_type=blade.blade_type,
                retired_on=blade.retired_on,
                recorded=blade.retire_cause,
                counted_as=counted,
                kind=kind,
                area_cm2=blade.area_cm2,
                saw=life.saw if life is not None else None,
            )
        )
    return tuple(out)


# --- calibration -----------------------------------------------------------------------------


@dataclass(frozen=True)
class TrendPoint:
    """actual ÷ model cut time over one block of consecutive timed entries of a saw and group."""

    saw: str | None
    material_group: str | None
    first_on: str | None  # the block's first and last entry dates
    last_on: str | None
    entries: int
    cuts: int
    factor: float  # median of the block's ratios, as the calibration itself
    low: float  # quartiles of the ratios
    high: float


@dataclass(frozen=True)
class CalibrationView:
    """``/office/calibration``: the factors in use and how each has moved over time."""

    rows: tuple[CalibrationRow, ...]
    trend: tuple[TrendPoint, ...]  # by saw and group, oldest block first


def calibration_view(db: Log) -> CalibrationView:
    """The calibration table (latest 200 entries per saw and group) and its trend."""
    from sawplan.store.calibration import calibration_table
    from sawplan.store.stats import timed_cuts

    return CalibrationView(
        calibration_table(db), calibration_trend(timed_cuts(db, latest=TREND_ENTRIES))
    )


def calibration_trend(entries: Sequence[TimedCut]) -> tuple[TrendPoint, ...]:
    """Each saw and group's timed entries cut into blocks, newest block full, oldest first.

    A block holds ⌈n / TREND_POINTS⌉ entries (at least the 3 a factor needs) and
    its factor is the calibration's own median of ratios
    (``sawplan.life.calibration_factors``); an oldest block of fewer than 3
    entries is left out, as the table leaves out such a group.
    """
    from sawplan.life import calibration_factors
    from sawplan.life.economics import MIN_CALIBRATION_CUTS

    series: dict[tuple[str | None, str | None], list[TimedCut]] = defaultdict(list)
    for e in entries:  # oldest first within each saw and group
        series[(e.saw, e.material_group)].append(e)
    points: list[TrendPoint] = []
    for key in sorted(series, key=lambda k: (str(k[0]), str(k[1]))):
        rows = series[key]
        size = max(MIN_CALIBRATION_CUTS, math.ceil(len(rows) / TREND_POINTS))
        block = [(len(rows) - 1 - i) // size for i in range(len(rows))]  # 0 = the newest
        summary = calibration_factors(
            [e.time_min for e in rows], [e.predicted_time_min for e in rows], block
        )
        for f in sorted(summary.factors, key=lambda f: -f.key):
            members = [e for e, b in zip(rows, block, strict=True) if b == f.key]
            points.append(
                TrendPoint(
                    saw=key[0],
                    material_group=key[1],
                    first_on=members[0].cut_on,
                    last_on=members[-1].cut_on,
                    entries=f.n,
                    cuts=sum(e.count for e in members),
                    factor=f.factor,
                    low=f.low,
                    high=f.high,
                )
            )
    return tuple(points)


# --- jobs sent to the saws, and the blades they need ------------------------------------------

CLOSED_JOBS_SHOWN = 20  # finished or withdrawn jobs listed under the open ones, newest first
SIZE_TOLERANCE_MM = 0.05  # a blade fits a saw when its width and thickness match to this


@dataclass(frozen=True)
class JobLine:
    """One job sent to a saw, with its progress through the queue."""

    id: int
    name: str
    saw: str
    sent_on: str
    customer: str | None
    due: str | None
    withdrawn_on: str | None
    cuts: int
    done: int
    area_done_cm2: float
    area_left_cm2: float
    time_left_min: float | None  # the plan's times of the cuts still to do (None: not timed)

    @property
    def state(self) -> str:
        if self.withdrawn_on:
            return "withdrawn"
        return "finished" if self.done >= self.cuts else "open"


@dataclass(frozen=True)
class SawNeed:
    """What the open queue of one saw needs of one pitch: area to cut and blades to cut it."""

    saw: str
    pitch: str
    width_mm: float | None  # the saw's blade size (None: the saw's profile does not say)
    thickness_mm: float | None
    cuts_left: int
    forecast: JobForecast  # blades needed at the forecast's confidence, per group and in all


@dataclass(frozen=True)
class JobsView:
    """``/office/jobs``: every job sent, its progress, and the blades the open queue needs."""

    jobs: tuple[JobLine, ...]  # open first (oldest first), then the latest closed ones
    needs: tuple[SawNeed, ...]


@dataclass(frozen=True)
class JobSheet:
    """One job's cut sheet as queued: every pass of the blade in order, done or to do."""

    job: JobLine
    cuts: tuple[dict, ...]  # the queue rows (``station_rows.job_cuts``)


def jobs_view(db: Log, *, confidence: float = DEFAULT_CONFIDENCE) -> JobsView:
    """Every job with its progress; the blades each saw's open queue needs, per pitch."""
    from sawplan.store.station_rows import job_progress

    progress = job_progress(db)
    open_jobs = [j for j in progress if not j["withdrawn_on"] and j["done"] < j["cuts"]]
    opened = {j["id"] for j in open_jobs}
    closed = [j for j in progress if j["id"] not in opened][::-1][:CLOSED_JOBS_SHOWN]
    lines = tuple(_job_line(db, j) for j in (*open_jobs, *closed))
    return JobsView(lines, queue_needs(db, confidence=confidence))


def job_sheet(db: Log, job_id: int) -> JobSheet | None:
    from sawplan.store.station_rows import job_cuts, job_progress

    found = [j for j in job_progress(db) if j["id"] == job_id]
    if not found:
        return None
    return JobSheet(_job_line(db, found[0]), tuple(job_cuts(db, job_id)))


def _job_line(db: Log, job: dict) -> JobLine:
    from sawplan.store.station_rows import job_cuts

    rows = job_cuts(db, job["id"])
    left = [r for r in rows if r["cut_id"] is None]
    times = [r["predicted_time_min"] for r in left]
    return JobLine(
        id=job["id"],
        name=job["name"],
        saw=job["saw"],
        sent_on=job["sent_on"],
        customer=job["customer"],
        due=job["due"],
        withdrawn_on=job["withdrawn_on"],
        cuts=int(job["cuts"]),
        done=int(job["done"]),
        area_done_cm2=math.fsum(r["area_mm2"] for r in rows if r["cut_id"] is not None) / 100.0,
        area_left_cm2=math.fsum(r["area_mm2"] for r in left) / 100.0,
        time_left_min=math.fsum(times) if all(t is not None for t in times) else None,
    )


def queue_needs(db: Log, *, confidence: float = DEFAULT_CONFIDENCE) -> tuple[SawNeed, ...]:
    """Per saw and pitch of its open queue: the area left by material group, forecast."""
    from sawplan.store.records import find_saw, logged_saws
    from sawplan.store.reports import forecast_areas
    from sawplan.store.station_rows import saw_queue

    needs = []
    for saw in logged_saws(db):
        by_pitch: dict[str, dict[str, float]] = defaultdict(lambda: defaultdict(float))
        cuts: dict[str, int] = defaultdict(int)
        for row in saw_queue(db, saw.name):
            pitch = row["pitch"] or "(no pitch)"
            by_pitch[pitch][row["material_group"] or row["material"]] += row["area_mm2"] / 100.0
            cuts[pitch] += 1
        profile = find_saw(db, saw.name)
        for pitch in sorted(by_pitch):
            needs.append(
                SawNeed(
                    saw=saw.name,
                    pitch=pitch,
                    width_mm=getattr(profile, "blade_width_mm", None),
                    thickness_mm=getattr(profile, "blade_thickness_mm", None),
                    cuts_left=cuts[pitch],
                    forecast=forecast_areas(db, by_pitch[pitch], confidence=confidence),
                )
            )
    return tuple(needs)


@dataclass(frozen=True)
class BladeBalance:
    """Blades of one size and pitch: what the open queues need against what is to hand."""

    width_mm: float | None
    thickness_mm: float | None
    pitch: str
    needed: int  # summed over the saws that need it
    fitted: tuple[str, ...]  # tags fitted now on those saws, of this size and pitch
    on_shelf: tuple[str, ...]  # tags not fitted and not retired, of this size and pitch
    saws: tuple[str, ...]

    @property
    def short(self) -> int:
        """Blades to get before the queues are cut (0 when the shelf covers them)."""
        return max(0, self.needed - len(self.fitted) - len(self.on_shelf))


@dataclass(frozen=True)
class ShelfView:
    """``/office/shelf``: the blades on the shelf against what the queues need."""

    shelf: tuple[Blade, ...]  # new or taken off unworn: ready to fit
    balance: tuple[BladeBalance, ...]
    confidence: float


def shelf_view(db: Log, *, confidence: float = DEFAULT_CONFIDENCE) -> ShelfView:
    from sawplan.store.records import list_blades

    shelf = tuple(b for b in list_blades(db) if b.status in ("new", "removed"))
    fitted = tuple(list_blades(db, status="fitted"))
    needs = queue_needs(db, confidence=confidence)
    groups: dict[tuple, list[SawNeed]] = defaultdict(list)
    for n in needs:
        groups[(n.width_mm, n.thickness_mm, n.pitch)].append(n)
    balance = []
    for (width, thickness, pitch), group in groups.items():
        saws = tuple(n.saw for n in group)
        balance.append(
            BladeBalance(
                width_mm=width,
                thickness_mm=thickness,
                pitch=pitch,
                needed=sum(n.forecast.blades_needed for n in group),
                fitted=tuple(
                    b.tag for b in fitted if b.saw in saws and _fits(b, width, thickness, pitch)
                ),
                on_shelf=tuple(b.tag for b in shelf if _fits(b, width, thickness, pitch)),
                saws=saws,
            )
        )
    return ShelfView(shelf, tuple(balance), confidence)


def _fits(blade: Blade, width: float | None, thickness: float | None, pitch: str) -> bool:
    """Same size (when the saw says) and the same teeth per inch as the queue's pitch."""
    from sawplan.cutting.pitch import parse_pitch
    from sawplan.errors import SawplanError

    try:
        wanted = parse_pitch(pitch)
    except SawplanError:
        return False
    same_pitch = math.isclose(blade.tpi_coarse, wanted.tpi_coarse, abs_tol=1e-6) and math.isclose(
        blade.tpi_fine, wanted.tpi_fine, abs_tol=1e-6
    )
    sizes = ((blade.width_mm, width), (blade.thickness_mm, thickness))
    return same_pitch and all(
        want is None or abs(have - want) <= SIZE_TOLERANCE_MM for have, want in sizes
    )
