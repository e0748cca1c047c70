"""Where packaged data and the user's files live.

Packaged tables sit in the top-level ``data/`` folder of a source checkout and
are copied to ``sawplan/data`` inside a built wheel; ``data_file`` finds either.
"""

from __future__ import annotations

import os
from pathlib import Path

_HERE = Path(__file__).resolve().parent
_CANDIDATES = (_HERE / "data", _HERE.parent / "data")


def data_dir() -> Path:
    """The folder holding sawplan's packaged CSV/TOML tables."""
    for folder in _CANDIDATES:
        if folder.is_dir():
            return folder
    return _CANDIDATES[-1]


def data_file(name: str) -> Path:
    """Path of one packaged table, e.g. ``data_file("materials.csv")``."""
    return data_dir() / name


def user_data_dir() -> Path:
    """Per-user data folder (the blade log lives here unless told otherwise)."""
    override = os.environ.get("SAWPLAN_HOME")
    if override:
        return Path(override)
    from platformdirs import user_data_path

    return user_data_path("sawplan", appauthor=False)
