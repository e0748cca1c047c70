"""Defaults a shop sets once: a small TOML file and environment variables.

The command line beats the environment, the environment beats the file, and
the file beats sawplan's own default.  The file is ``$SAWPLAN_CONFIG``, else
``config.toml`` in ``$SAWPLAN_HOME`` (tests and portable installs), else
``config.toml`` in the user's config folder (platformdirs)::

    units = "us"            # SAWPLAN_UNITS
    saw = "bay 2"           # SAWPLAN_SAW
    db = "/srv/shop/blade-log.sqlite"   # SAWPLAN_DB
    currency = "USD"        # SAWPLAN_CURRENCY
    log_mode = "group"      # SAWPLAN_LOG_MODE: private, group or an octal mode

Every value is checked by the same rules as the option it stands for, and a
bad value names the file or the variable it came from.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from sawplan.errors import BadDataError, UsageError

ENV_FILE = "SAWPLAN_CONFIG"
FILE_NAME = "config.toml"
MAX_FILE_BYTES = 64_000  # a config file is a few lines

# log_mode words -> the mode of the log's files (its folder also gets x where r is set)
LOG_MODES = {"private": 0o600, "group": 0o660, "everyone": 0o666}


@dataclass(frozen=True)
class Setting:
    """One default a shop may set: its environment variable, its rule and its meaning."""

    key: str
    env: str
    help: str
    default: str | None
    normalise: Callable[[str, str], str]  # (value, where) -> the value to use, or an error


def _units(value: str, where: str) -> str:
    from sawplan.fields import check_choice

    return check_choice("units", value, words=where)


def _text(field_key: str) -> Callable[[str, str], str]:
    def normalise(value: str, where: str) -> str:
        from sawplan.fields import check_text

        text = check_text(field_key, value, words=where)
        if not text:
            raise BadDataError("must not be empty", field=where)
        return text

    return normalise


def _path(value: str, where: str) -> str:
    text = value.strip()
    if not text or "\x00" in text:
        raise BadDataError(f"expected a file name, got {value!r}", field=where)
    return text


def _log_mode(value: str, where: str) -> str:
    word = value.strip().lower()
    if word in LOG_MODES:
        return word
    if len(word) in (3, 4) and all(c in "01234567" for c in word) and int(word, 8) & 0o600 == 0o600:
        return f"{int(word, 8):03o}"
    raise BadDataError(
        f"expected private, group, everyone or an octal file mode such as 640 "
        f"(the owner must read and write), got {value!r}",
        field=where,
    )


# fmt: off
SETTINGS: dict[str, Setting] = {s.key: s for s in (
    Setting("units", "SAWPLAN_UNITS", "units to show: us or metric", "metric", _units),
    Setting("saw", "SAWPLAN_SAW", "the saw commands use when none is named", None, _text("saw")),
    Setting("db", "SAWPLAN_DB", "the blade log: a file (or a database URL)", None, _path),
    Setting("currency", "SAWPLAN_CURRENCY", "currency of prices and quotes", "",
            _text("currency")),
    Setting("log_mode", "SAWPLAN_LOG_MODE",
            "who may read the blade log: private, group, everyone or an octal mode", "private",
            _log_mode),
    Setting("materials_file", "SAWPLAN_MATERIALS", "your own materials CSV", None, _path),
    Setting("saws_file", "SAWPLAN_SAWS", "your own saws TOML file", None, _path),
)}
# fmt: on


@dataclass(frozen=True)
class Value:
    """A setting's value and where it came from: ``env SAWPLAN_UNITS``, the file, ``default``."""

    key: str
    value: str | None
    source: str


def config_path() -> Path:
    """The config file: ``$SAWPLAN_CONFIG``, ``$SAWPLAN_HOME/config.toml`` or the user's."""
    explicit = os.environ.get(ENV_FILE)
    if explicit:
        return Path(explicit).expanduser()
    home = os.environ.get("SAWPLAN_HOME")
    if home:
        return Path(home) / FILE_NAME
    from platformdirs import user_config_path

    return user_config_path("sawplan", appauthor=False) / FILE_NAME


def value(key: str) -> Value:
    """The setting ``key`` from the environment, else the file, else the default."""
    setting = _setting(key)
    raw = os.environ.get(setting.env)
    if raw is not None and raw.strip():
        return Value(key, setting.normalise(raw, f"env {setting.env}"), f"env {setting.env}")
    path = config_path()
    stored = read_file(path).get(setting.key)
    if stored is not None:
        if setting.normalise is _path and "://" not in stored:
            stored = str(path.parent / Path(stored).expanduser())  # relative to the file
        return Value(key, stored, str(path))
    return Value(key, setting.default, "default")


def get(key: str) -> str | None:
    """The value of setting ``key`` (environment, file or default)."""
    return value(key).value


def show() -> list[Value]:
    """Every setting with its value and source, in the table's order."""
    return [value(key) for key in SETTINGS]


def read_file(path: Path) -> dict[str, str]:
    """The file's settings, each checked; an absent file holds none."""
    try:
        stat = path.stat()
    except FileNotFoundError:
        return {}
    except OSError as err:
        raise UsageError(f"cannot read the config file {path}: {err.strerror}") from None
    return dict(_read_cached(str(path), stat.st_mtime_ns, stat.st_size))


_CACHE: dict[tuple[str, int, int], tuple[tuple[str, str], ...]] = {}


def _read_cached(path: str, mtime_ns: int, size: int) -> tuple[tuple[str, str], ...]:
    key = (path, mtime_ns, size)
    if key not in _CACHE:
        _CACHE.clear()
        _CACHE[key] = tuple(_parse(Path(path), size).items())
    return _CACHE[key]


def _parse(path: Path, size: int) -> dict[str, str]:
    import tomllib

    from sawplan.user_files import read_text_limited

    where = f"config file {path}"
    text = read_text_limited(path, MAX_FILE_BYTES, where, why="a config file is a few lines")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        raise BadDataError(f"is not readable TOML ({err})", field=where) from None
    out: dict[str, str] = {}
    for key, raw in data.items():
        setting = SETTINGS.get(key)
        if setting is None:
            raise BadDataError(f"unknown setting {key!r}", field=where, hint=_known())
        if not isinstance(raw, str):
            raise BadDataError(f"{key} must be text in quotes, got {raw!r}", field=where)
        out[key] = setting.normalise(raw, f"{where}, {key}")
    return out


def set_value(key: str, text: str) -> Path:
    """Check ``text`` by the setting's rule and write it into the config file."""
    setting = _setting(key)
    clean = setting.normalise(text, setting.key)
    return _write(lambda doc: doc.__setitem__(setting.key, clean))


def unset(key: str) -> Path:
    """Remove ``key`` from the config file (its default applies again)."""
    setting = _setting(key)
    return _write(lambda doc: doc.pop(setting.key, None))


def _write(change: Callable) -> Path:
    """Apply ``change`` to the file's document (comments kept) and replace the file whole."""
    import tempfile

    import tomlkit

    path = config_path()
    read_file(path)  # a damaged file is reported, not overwritten
    text = path.read_text(encoding="utf-8") if path.exists() else _HEADER
    doc = tomlkit.parse(text)
    change(doc)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as handle:
            handle.write(tomlkit.dumps(doc))
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return path


_HEADER = """\
# sawplan's defaults for this shop (`sawplan config set KEY VALUE` writes here).
# The command line beats the environment (SAWPLAN_UNITS, ...), which beats this file.
"""


def money_suffix() -> str:
    """`` EUR`` after a price when the shop set its currency, else nothing."""
    currency = get("currency")
    return f" {currency}" if currency else ""


def log_file_mode() -> int:
    """Permission bits for the blade log's files (``log_mode``; private: 0600)."""
    mode = get("log_mode") or "private"
    return LOG_MODES[mode] if mode in LOG_MODES else int(mode, 8)


def log_folder_mode() -> int:
    """Permission bits for the blade log's folder: the file mode with x wherever r is set."""
    mode = log_file_mode()
    return mode | ((mode & 0o444) >> 2)


def _setting(key: str) -> Setting:
    setting = SETTINGS.get(key.strip().lower().replace("-", "_"))
    if setting is None:
        raise UsageError(f"unknown setting {key!r}", field="config", hint=_known())
    return setting


def _known() -> str:
    return "settings: " + ", ".join(SETTINGS)
