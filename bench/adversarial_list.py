"""The attempts of the adversarial pass: the issue's list, hostile files and damaged logs,
and a seeded draw of hostile values into every command (see adversarial_cases.py)."""

from __future__ import annotations

import random
import sqlite3
from pathlib import Path

from adversarial_cases import (
    BLADE,
    HOSTILE,
    NUMBERS,
    QUANTITIES,
    TEXTS,
    Attempt,
    both,
    csv_cell,
    csv_formula_guarded,
    damage_at,
    fifo,
    job_with,
    mode_at_most,
    no_partials,
    no_raw_controls,
    sql,
    unchanged,
)
from cli_walk import argv  # tests/ (on the pass's path)

WRITES = [("log", "cut", "304", "round", "60mm", "--cuts", "2"), ("blade", "add", "Z-1", *BLADE),
          ("saw", "add", "bay 7", "--like", "mid-production"), ("log", "event", "B-017", "teeth-lost"),
          ("blade", "fit", "B-018", "--saw", "bay 2"), ("blade", "retire", "B-017", "--failure", "dull"),
          ("import", "csv-in")]  # fmt: skip
READS = [("blade", "list"), ("blade", "show", "B-017"), ("log", "list"), ("life",), ("export", "out"),
         ("chart", "wear", "B-017"), ("forecast", "--area", "5m2"), ("backup", "copy.sqlite"),
         ("check",)]  # fmt: skip


def issue_list() -> list[Attempt]:
    """Every attempt the issue lists (what broke before), with what holding means."""
    a: list[Attempt] = []
    for shape in (("round", "1e-12mm"), ("square", "1e-12mm"), ("flat", "1e-12mm", "10mm"),
                  ("tube", "1e-12mm", "1e-13mm"), ("angle", "1e-12mm", "1e-12mm", "1e-13mm")):  # fmt: skip
        a.append(Attempt(f"cut 304 {shape[0]} tiny", ("cut", "304", *shape), "refuse"))
    a += [
        Attempt(
            "weigh --count 400 digits",
            ("weigh", "304", "round", "60mm", "--length", "1m", "--count", "9" * 400),
            "refuse",
        ),  # fmt: skip
        Attempt("log list --limit 20 digits", ("log", "list", "--limit", "9" * 20), "refuse"),
        Attempt(
            "import count=1e23", ("import", "csv-in"), "refuse", csv_cell("cuts", "count", "1e23")
        ),
        Attempt(
            "import price=-5", ("import", "csv-in"), "refuse", csv_cell("blades", "price", "-5")
        ),
        Attempt(
            "stock price = 1e308",
            ("plan", "job.toml"),
            "refuse",
            job_with("stock", "price", "1e308", raw=True),
        ),  # fmt: skip
        Attempt(
            "blade add --price inf", ("blade", "add", "Z-2", *BLADE, "--price", "inf"), "refuse"
        ),
        Attempt(
            "weigh --length 1e-300mm",
            ("weigh", "304", "round", "60mm", "--length", "1e-300mm"),
            "refuse",
        ),  # fmt: skip
        Attempt(
            "cut --band-speed 1e9 m/min",
            ("cut", "304", "round", "60mm", "--band-speed", "1e9 m/min"),
            "refuse",
        ),  # fmt: skip
        Attempt("cut --feed 1e308", ("cut", "304", "round", "60mm", "--feed", "1e308"), "refuse"),
        Attempt(
            "cut --feed 1e308mm/min",
            ("cut", "304", "round", "60mm", "--feed", "1e308mm/min"),
            "refuse",
        ),  # fmt: skip
        Attempt(
            "blade width 1e9 mm",
            (
                "blade",
                "add",
                "Z-3",
                "--pitch",
                "3/4",
                "--blade-width",
                "1e9mm",
                "--blade-thickness",
                "0.9mm",
            ),
            "refuse",
        ),  # fmt: skip
        Attempt(
            "saw add --wheel 1e-300mm",
            ("saw", "add", "bay 8", "--like", "mid-production", "--wheel", "1e-300mm"),
            "refuse",
        ),  # fmt: skip
        Attempt(
            "shop_rate = 1e308",
            ("plan", "job.toml"),
            "refuse",
            job_with("job", "shop_rate", "1e308", raw=True),
        ),  # fmt: skip
        Attempt(
            "a cut dated 1950 on a blade fitted now",
            ("log", "cut", "304", "round", "60mm", "--date", "1950-01-01"),
            "refuse",
        ),  # fmt: skip
        Attempt(
            "import a cut dated 1950",
            ("import", "csv-in"),
            "refuse",
            csv_cell("cuts", "cut_on", "1950-01-01"),
        ),  # fmt: skip
        Attempt(
            "a NUL byte in an imported tag",
            ("import", "csv-in"),
            "refuse",
            csv_cell("blades", "tag", "B-9\x00X"),
        ),  # fmt: skip
        Attempt(
            "a NUL byte in a part name",
            ("plan", "job.toml"),
            "refuse",
            job_with("part", "name", "sha\x00ft"),
        ),  # fmt: skip
        Attempt(
            "cut refuses a tube wall past its middle",
            ("cut", "304", "tube", "60mm", "40mm"),
            "refuse",
        ),  # fmt: skip
        Attempt(
            "import takes a tube cut refuses",
            ("import", "csv-in"),
            "refuse",
            csv_cell("cuts", "section", "tube 60mm 40mm"),
        ),  # fmt: skip
        Attempt(
            "near-zero-area parts plan quickly",
            ("plan", "job.toml"),
            "any",
            job_with("part", "section", "flat 0.1mm 0.1mm"),
            timeout=30,
        ),  # fmt: skip
        Attempt(
            "tiny section parts refused",
            ("plan", "job.toml"),
            "refuse",
            job_with("part", "section", "round 1e-12mm"),
        ),  # fmt: skip
        Attempt("saw add nothing but a name", ("saw", "add", "bay 6"), "any"),
    ]
    for i, (frac, length) in enumerate(((0.3, 20), (0.55, 20), (0.8, 64), (0.95, 64))):
        for cmd in (WRITES[0], WRITES[1]):
            a.append(Attempt(f"damaged log ({length} bytes at {frac:.0%}): {cmd[0]} {cmd[1]}", cmd,
                             "any", damage_at(frac, length, i), check=refused_if_detectable,
                             area="store"))  # fmt: skip
    for name, prep in (
        ("an index row moved", index_row_moved),
        ("a schema byte not UTF-8", garbled),
    ):
        for cmd in (DEMO_WRITES[0], DEMO_WRITES[1], DEMO_READS[0]):
            a.append(Attempt(f"demo log, {name}: {cmd[0]} {cmd[1]}", (*cmd, "--db", "demo.sqlite"),
                             "refuse", prep, area="store"))  # fmt: skip
    # the other guards of the pass: outputs, bounded work and reads, escapes
    a += [
        Attempt(
            "CR past the CSV formula guard",
            ("plan", "job.toml", "--csv-dir", "csvout"),
            "any",
            job_with("part", "drawing", "\r=HYPERLINK(1)"),
            csv_formula_guarded("csvout/cuts.csv"),
            area="escapes",
        ),  # fmt: skip
        Attempt(
            "plan --sheet job.toml overwrites the job",
            ("plan", "job.toml", "--sheet", "job.toml"),
            "refuse",
            check=unchanged("job.toml"),
            area="outputs",
        ),  # fmt: skip
        Attempt(
            "plan --csv-dir onto the CSV folder",
            ("plan", "job.toml", "--csv-dir", "csv-in"),
            "any",
            check=unchanged("csv-in/cuts.csv"),
            area="outputs",
        ),  # fmt: skip
        Attempt(
            "export onto the log's folder",
            ("export", "."),
            "any",
            check=unchanged("job.toml"),
            area="outputs",
        ),  # fmt: skip
        Attempt(
            "forecast with a tiny life",
            ("forecast", "--area", "1000m2", "--life", "1mm2"),
            "any",
            area="bounds",
            timeout=30,
        ),  # fmt: skip
        Attempt(
            "plan --time-limit 2 on a hard job",
            ("plan", "big.toml", "--time-limit", "2"),
            "any",
            big_job,
            area="bounds",
            timeout=25,
        ),  # fmt: skip
        Attempt(
            "a FIFO as stock_file",
            ("plan", "job.toml"),
            "refuse",
            both(job_with("job", "stock_file", "rack.csv"), fifo("rack.csv")),
            area="bounds",
            timeout=20,
        ),  # fmt: skip
        Attempt(
            "/dev/zero as stock_file with --allow",
            ("plan", "job.toml", "--allow"),
            "refuse",
            job_with("job", "stock_file", "/dev/zero"),
            area="bounds",
            timeout=20,
        ),  # fmt: skip
        Attempt(
            "a FIFO as the job file",
            ("plan", "fifo.toml"),
            "refuse",
            fifo("fifo.toml"),
            area="bounds",
            timeout=20,
        ),  # fmt: skip
        Attempt(
            "a FIFO as a materials file",
            ("cut", "304", "round", "60mm", "--materials-file", "m.csv"),
            "refuse",
            fifo("m.csv"),
            area="bounds",
            timeout=20,
        ),  # fmt: skip
        Attempt(
            "Markdown sheet fence injection",
            ("plan", "job.toml", "--sheet", "s.md"),
            "any",
            job_with("part", "name", "a```b|c"),
            markdown_fences("s.md"),
            area="escapes",
        ),  # fmt: skip
        Attempt(
            "terminal escapes in blade show",
            ("blade", "show", "B-017"),
            "any",
            sql("UPDATE blades SET notes = char(27) || '[2J' WHERE tag = 'B-017'"),
            no_raw_controls,
            area="escapes",
        ),  # fmt: skip
        Attempt(
            "terminal escapes in blade list",
            ("blade", "list"),
            "any",
            sql("UPDATE blades SET supplier = char(27) || ']0;x' || char(7) WHERE tag = 'B-017'"),
            no_raw_controls,
            area="escapes",
        ),  # fmt: skip
        Attempt(
            "a killed backup's partial",
            ("backup", "copy.sqlite"),
            "ok",
            lambda f: (f / "copy.sqlite.partial").write_bytes(b"half"),
            no_partials,
            area="store",
        ),  # fmt: skip
        Attempt(
            "a new log under umask 000",
            ("blade", "add", "Z-4", *BLADE, "--db", "new/log.sqlite"),
            "ok",
            check=mode_at_most("new/log.sqlite", 0o600),
            area="store",
            umask=0,
        ),  # fmt: skip
        Attempt(
            "a full disk refuses a logged cut", WRITES[0], "any", check=None, area="store", fsize=1
        ),  # fmt: skip
    ]
    return a


def index_row_moved(folder: Path) -> None:
    import damage_kit

    damage_kit.move_index_row(folder / "demo.sqlite")


def garbled(folder: Path) -> None:
    import damage_kit

    damage_kit.garble_schema(folder / "demo.sqlite")


def refused_if_detectable(folder: Path, _out: str, _err: str) -> str | None:
    """Accepted on a damaged log: broke when SQLite's full check sees the damage."""
    said = (
        (folder / ".integrity").read_text(encoding="utf-8")
        if (folder / ".integrity").exists()
        else "ok"
    )
    return None if said == "ok" else f"written or read on detectable damage ({said[:60]})"


def markdown_fences(name: str):
    def check(folder: Path, _out: str, _err: str) -> str | None:
        path = folder / name
        if not path.exists():
            return None
        fences = sum(line.lstrip().startswith("```") for line in path.read_text().splitlines())
        return None if fences % 2 == 0 else "a part name opened a code fence"

    return check


def big_job(folder: Path) -> None:
    """A job of 400 parts of scattered lengths on 40 stock lengths: a hard cutting-stock order."""
    rng = random.Random(11)
    lines = ["[job]", 'name = "hard"', 'saw = "mid-production"', ""]
    for _ in range(40):
        lines += ["[[stock]]", 'material = "4140"', 'section = "round 60mm"',
                  f'length = "{rng.randrange(2000, 6000)}mm"', "count = 40", ""]  # fmt: skip
    for i in range(400):
        lines += ["[[part]]", f'name = "p{i}"', 'material = "4140"', 'section = "round 60mm"',
                  f'length = "{rng.randrange(80, 1900)}mm"', f"count = {rng.randrange(1, 4)}", ""]  # fmt: skip
    (folder / "big.toml").write_text("\n".join(lines), encoding="utf-8")


# --- hostile files and damaged logs -------------------------------------------------------


def hostile_files(rng: random.Random, count: int) -> list[Attempt]:
    job_keys = {"job": ["kerf", "trim", "grip", "min_remnant", "shop_rate", "handling_time",
                        "blade_price", "currency", "name", "customer", "due", "saw"],
                "stock": ["material", "section", "length", "count", "price", "heat", "location"],
                "part": ["name", "material", "section", "length", "count", "drawing", "tolerance"]}  # fmt: skip
    csv_cols = {"blades": ["tag", "width_mm", "thickness_mm", "price", "tpi_coarse", "tpi_fine",
                           "status", "bought_on", "supplier", "lot", "notes"],
                "cuts": ["cut_on", "section", "area_mm2", "pieces", "count", "band_speed_m_min",
                         "feed_mm_min", "time_min", "material", "note", "heat", "job"]}  # fmt: skip
    out = []
    for i in range(count):
        if i % 2 == 0:
            section = rng.choice(list(job_keys))
            key = rng.choice(job_keys[section])
            value = rng.choice(HOSTILE)
            raw = rng.random() < 0.4 and value.replace(".", "", 1).lstrip("-").isdigit()
            out.append(Attempt(f"job [{section}] {key} = {value[:30]!r}", ("plan", "job.toml"),
                               "any", job_with(section, key, value, raw=raw)))  # fmt: skip
        else:
            table = rng.choice(list(csv_cols))
            column = rng.choice(csv_cols[table])
            value = rng.choice(HOSTILE).replace("\x00", "")
            out.append(Attempt(f"import {table}.{column} = {value[:30]!r}", ("import", "csv-in"),
                               "any", csv_cell(table, column, value), check=imported_as_is))  # fmt: skip
    return out


def imported_as_is(folder: Path, _out: str, _err: str) -> str | None:
    """An import accepted: the log still passes SQLite's check and holds the rows."""
    conn = sqlite3.connect(folder / "template.sqlite")
    try:
        said = conn.execute("PRAGMA integrity_check").fetchone()[0]
    finally:
        conn.close()
    return None if said == "ok" else f"the log is damaged after the import: {said}"


DEMO_WRITES = [("log", "cut", "304", "round", "60mm", "--saw", "pivot-bay"),
               ("blade", "add", "Z-1", *BLADE), ("blade", "remove", "P-008"),
               ("log", "event", "A-015", "teeth-lost"), ("saw", "add", "bay 7", "--like", "mid-production"),
               ("blade", "retire", "C-019", "--failure", "dull"), ("import", "csv-in")]  # fmt: skip
DEMO_READS = [("blade", "list"), ("blade", "show", "A-015"), ("log", "list", "--json"), ("life",),
              ("export", "out"), ("forecast", "--area", "5m2"), ("backup", "copy.sqlite"),
              ("chart", "weibull", "--csv"), ("cut", "304", "round", "60mm", "--saw", "pivot-bay")]  # fmt: skip


def damaged_logs(rng: random.Random, count: int) -> list[Attempt]:
    """The demo shop's log (350 kB) with 1 to 512 bytes overwritten somewhere, then a
    command: accepted on damage SQLite's full check sees is a break."""
    out = []
    for i in range(count):
        frac = rng.random()
        length = rng.choice((1, 4, 20, 64, 512))
        cmd = rng.choice(DEMO_WRITES + DEMO_READS)
        args = (*cmd, "--db", "demo.sqlite")
        out.append(Attempt(f"demo log, {length} B at {frac:.3f}: {' '.join(cmd[:2])}", args, "any",
                           damage_at(frac, length, 1000 + i, "demo.sqlite"),
                           check=refused_if_detectable, area="store"))  # fmt: skip
    return out


# --- hostile values into every command ----------------------------------------------------


def generated(rng: random.Random, count: int, leaves, baselines) -> list[Attempt]:
    """``count`` draws: a command's valid invocation with one parameter made hostile."""
    pool = []
    for path, command in leaves:
        if path == ("serve",):
            continue
        base = baselines.get(path)
        if base is None:
            continue
        for param in command.params:
            if param.name in ("help",) or getattr(param, "is_flag", False):
                continue
            pool.append((path, command, base, param))
    out = []
    for _ in range(count):
        path, command, base, param = rng.choice(pool)
        kind = str(getattr(getattr(param, "type", None), "name", "")).lower()
        values = (
            NUMBERS if kind in ("integer", "float") else rng.choice((QUANTITIES, TEXTS, HOSTILE))
        )
        value = rng.choice(values).replace("\x00", "")
        values_map = dict(base)
        if param.nargs == -1 or isinstance(values_map.get(param.name), list):
            current = list(values_map.get(param.name) or ["x"])
            current[rng.randrange(len(current))] = value
            values_map[param.name] = current
        else:
            values_map[param.name] = value
        args = argv(path, command, values_map)
        out.append(Attempt(f"{' '.join(path)} {param.name}={value[:30]!r}", tuple(args)))
    return out


def all_attempts(seed: int, total: int, leaves, baselines) -> list[Attempt]:
    rng = random.Random(seed)
    fixed = issue_list()
    files = hostile_files(rng, total // 6)
    damaged = damaged_logs(rng, total // 9)
    rest = max(0, total - len(fixed) - len(files) - len(damaged))
    return fixed + files + damaged + generated(rng, rest, leaves, baselines)
