"""The cutting model's constants, read once from ``data/cutting_constants.toml``.

Every constant in the file carries its source; the code asks for values by
section and name so a shop can see (and later calibrate) what the model assumes.
"""

from __future__ import annotations

import tomllib
from functools import lru_cache
from typing import Any

from sawplan.errors import DamagedFileError
from sawplan.paths import data_file

_FILE = "cutting_constants.toml"


@lru_cache(maxsize=1)
def _table() -> dict[str, dict[str, Any]]:
    path = data_file(_FILE)
    try:
        with path.open("rb") as handle:
            raw = tomllib.load(handle)
    except (OSError, tomllib.TOMLDecodeError) as exc:
        raise DamagedFileError(
            f"cannot read the cutting constants ({exc})", field=str(path)
        ) from None
    table: dict[str, dict[str, Any]] = {}
    for section, entries in raw.items():
        table[section] = {}
        for name, entry in entries.items():
            if not isinstance(entry, dict) or "value" not in entry or "source" not in entry:
                raise DamagedFileError(
                    f"{section}.{name} needs a value and a source", field=str(path)
                )
            table[section][name] = entry
    return table


def value(section: str, name: str) -> Any:
    """One constant, e.g. ``value("gullet", "fill_fraction")``."""
    try:
        return _table()[section][name]["value"]
    except KeyError:
        raise DamagedFileError(f"missing constant {section}.{name}", field=_FILE) from None


def source(section: str, name: str) -> str:
    """Where a constant comes from (shown by explanations and checked by tests)."""
    return str(_table()[section][name]["source"])


def number(section: str, name: str) -> float:
    return float(value(section, name))
