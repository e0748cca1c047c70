"""What the office changes in a job sent to a saw: withdraw it, or move it to another saw.

A job's queue (``station_rows``) stays as it was sent: the cuts already
logged keep their entries, and a withdrawn job simply leaves the saw's queue.
Each change is one write step (``run_write``), its checks inside it, so a
station logging a cut of that job at the same moment either comes first (and
the check sees it) or waits.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from sawplan.errors import ConflictError, NotFoundError
from sawplan.store.db import run_write

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.saws import Saw
    from sawplan.store.db import Log as Database


def withdraw_job(db: Database, job_id: int, *, on: str) -> str:
    """Take a job off its saw's queue (what was cut stays logged). Returns its name."""

    def step() -> str:
        job = _job(db, job_id)
        db.update("jobs", job["id"], {"withdrawn_on": on})
        return str(job["name"])

    return run_write(db, step)


def move_job(
    db: Database, job_id: int, saw_name: str, profile: Saw | None, *, on: str
) -> tuple[str, str]:
    """Send a job's cuts still to do to another saw. Returns (job, the saw it is on now).

    Refused while one of its cuts is under way (started, not yet logged), and
    when the other saw has an open job of the same name.
    """
    from sawplan.store.saw_rows import saw_row_id
    from sawplan.store.station_rows import has_open_job

    def step() -> tuple[str, str]:
        job = _job(db, job_id)
        saw_id, saw_label = saw_row_id(db, saw_name, profile, on=on)
        if saw_id == job["saw_id"]:
            raise ConflictError(f"job {job['name']} is already on {saw_label}", field="saw")
        busy = db.scalar(
            "SELECT COUNT(*) FROM queue WHERE job_id = :id AND started_at IS NOT NULL "
            "AND cut_id IS NULL",
            {"id": job["id"]},
        )
        if busy:
            raise ConflictError(
                f"a cut of job {job['name']} is under way on {job['saw']}",
                field="job",
                hint="move it once that cut is logged",
            )
        if has_open_job(db, saw_id, job["name"]):
            raise ConflictError(f"{saw_label} already has an open job {job['name']!r}", field="saw")
        db.update("jobs", job["id"], {"saw_id": saw_id})
        return str(job["name"]), saw_label

    return run_write(db, step)


def _job(db: Database, job_id: int) -> dict[str, Any]:
    """An open job (not withdrawn) by id, with its saw's name."""
    rows = db.query(
        "SELECT j.*, s.name AS saw FROM jobs j JOIN saws s ON s.id = j.saw_id WHERE j.id = :id",
        {"id": int(job_id)},
    )
    if not rows:
        raise NotFoundError(f"no job number {job_id} in the log", field="job")
    job = rows[0]
    if job["withdrawn_on"]:
        raise ConflictError(
            f"job {job['name']} was withdrawn on {job['withdrawn_on']}", field="job"
        )
    return job
