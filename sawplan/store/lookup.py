"""Read-only questions to the blade log from commands that only consult it.

``sawplan cut`` and ``sawplan plan`` ask the log for its saws, the shop's
time calibration and blade lives; a missing log is never created, and they
fall back to the model's times and the default lives.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # pragma: no cover
    from sawplan.store.blade_groups import BladeChoice


class BladeLog:
    """Read-only access to the blade log: calibration factors, life fits, saws.

    A missing file is not created: the plan then uses the model's times and the
    default lives, and says so.
    """

    def __init__(self, db: str | Path | None, choice: BladeChoice | None = None):
        from sawplan.errors import UsageError
        from sawplan.store.location import resolve_db

        self.choice = choice  # the blades blade life comes from (lots, suppliers)

        self.path = resolve_db(db)  # a file, or a server (which is asked, never created)
        if self.path.kind == "sqlite" and self.path.path is not None:
            if self.path.path.is_dir():
                raise UsageError(f"{self.path} is a folder; give a file name", field="db")
            self.exists = self.path.path.is_file()
        else:
            self.exists = self.path.kind != "memory"
        self.label = f"blade log {self.path.label}" if self.exists else "no blade log"

    def calibration(self, saw_name: str, material_group: str):
        if not self.exists:
            return None
        from sawplan.store import calibration_factor

        return calibration_factor(self.path, saw_name, material_group)

    def life(self, material_group: str):
        if not self.exists:
            if self.choice is not None and self.choice.chosen:
                from sawplan.errors import UsageError

                raise UsageError(
                    "--lot, --without-lot and --supplier choose blades of the blade log, "
                    "and there is none",
                    field="blade log",
                    hint="give --db LOG",
                )
            return None
        from sawplan.store import life_for

        return life_for(self.path, material_group, choice=self.choice)

    def saws(self) -> list:
        if not self.exists:
            return []
        from sawplan.store import saws_from_db

        return saws_from_db(self.path)

    def speed_rows(self, material_group: str | None = None):
        """The log as arrays for the life-against-speed fit (None without a log); read once."""
        if not self.exists:
            return None
        cache = self.__dict__.setdefault("_speed_rows", {})
        if material_group not in cache:
            from sawplan.store.db import connect
            from sawplan.store.speed_rows import speed_life_rows

            with connect(self.path, create=False, light=True) as db:
                cache[material_group] = speed_life_rows(db, material_group)
        return cache[material_group]
