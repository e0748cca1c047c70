"""A seeded, repeatable adversarial pass over every command (about 900 attempts).

    python bench/adversarial_pass.py [--seed 2] [--count 900] [--workers 3] [--only TEXT]

Each attempt (bench/adversarial_list.py) runs ``python -m sawplan ...`` in a
fresh copy of a small shop inside a temporary folder (never against real
device files or the user's log: ``SAWPLAN_HOME`` and ``SAWPLAN_DB`` point into
the copy), with a time limit, 3 GB of address space and, for a full disk, a
file-size limit.  Each answer is classified:

- held: a clean refusal (one ``error:`` line, an exit code of DEVELOPERS.md)
  or a correct answer;
- clumsy: the exit code is right, but the message is not one clear line
  (several lines, over 400 characters, a Python repr or errno in it);
- broke: a traceback, exit 1, an undocumented exit code, a hang past the time
  limit, a file written or changed on a refusal, a refusal of what must work,
  an acceptance of what must be refused, or a wrong value (the attempt's own
  check).

It prints the tally, by area (``store``: damaged logs; ``input``: values and
files typed; ``outputs``: files written; ``bounds``: bounded reads and work;
``escapes``: CSV, Markdown and terminal guards) and the list of broke and clumsy
attempts.  Exit code 0 always: this is a measurement, not a test.
"""

from __future__ import annotations

import argparse
import hashlib
import os
import resource
import shutil
import signal
import subprocess
import sys
import tempfile
import time
from collections import Counter
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path[:0] = [str(HERE), str(HERE.parent / "tests")]

from adversarial_cases import Attempt  # noqa: E402

DOCUMENTED = {0, 2, 3, 4, 5, 6, 7, 8, 9, 130}
MEMORY_LIMIT = 3 * 1024**3
CLUMSY_SIGNS = ("Errno", "object at 0x", "sqlite3.", "NoneType", "<class", "Traceback")


def build_template(root: Path) -> Path:
    """The shop every attempt starts from (tests/cli_walk.py's, plus the default log)."""
    import cli_walk

    template = root / "template"
    template.mkdir()
    cli_walk.build_shop(template)
    (template / "home").mkdir()
    other = root / "import-source.sqlite"  # csv-in: a blade with its saw and two cut entries
    for args in (("saw", "add", "bay 5", "--like", "mid-production"),
                 ("blade", "add", "B-901", "--pitch", "3/4", "--blade-width", "27mm",
                  "--blade-thickness", "0.9mm", "--price", "55"),
                 ("blade", "fit", "B-901", "--saw", "bay 5"),
                 ("log", "cut", "304", "round", "60mm", "--cuts", "3", "--time", "9min"),
                 ("log", "cut", "4140", "round", "80mm", "--note", "second")):  # fmt: skip
        code, _out, err = cli_walk.invoke([*args, "--db", str(other)])
        assert code == 0, (args, err)
    sys.path.insert(0, str(HERE.parent / "demo"))
    import damage_kit
    import make_history

    make_history.build(template / "demo.sqlite")  # the demo shop's log, for damage
    damage_kit.settle(template / "demo.sqlite")
    shutil.rmtree(template / "csv-in")
    code, _out, err = cli_walk.invoke(["export", str(template / "csv-in"), "--db", str(other)])
    assert code == 0, err
    return template


def snapshot(folder: Path) -> dict[str, str]:
    """Every file of the folder and its digest (SQLite's -shm and empty -wal left out)."""
    out = {}
    for path in folder.rglob("*"):
        rel = path.relative_to(folder).as_posix()
        if rel.startswith("home/") or rel == ".integrity" or rel.endswith((".damaged", "-shm")):
            continue
        try:
            if path.is_fifo() or not path.is_file():
                continue
            if rel.endswith("-wal") and path.stat().st_size == 0:
                continue
            out[rel] = hashlib.sha1(path.read_bytes()).hexdigest()
        except OSError:
            continue
    return out


def _limits(attempt: Attempt):
    def apply() -> None:
        resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT, MEMORY_LIMIT))
        if attempt.fsize is not None:
            signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
            resource.setrlimit(resource.RLIMIT_FSIZE, (attempt.fsize, attempt.fsize))
        if attempt.umask is not None:
            os.umask(attempt.umask)
        os.setsid()

    return apply


def run_one(attempt: Attempt, template: Path, work: Path, number: int) -> dict:
    folder = work / "w1" / "w2" / "w3" / f"a{number}"  # "../../../x" stays inside ``work``
    shutil.copytree(template, folder, symlinks=True)
    try:
        if attempt.prep:
            try:
                attempt.prep(folder)
            except Exception as exc:
                return {"name": attempt.name, "area": attempt.area, "args": attempt.args,
                        "code": None, "verdict": "broke", "why": f"prep failed: {exc!r}",
                        "err": "", "seconds": 0.0}  # fmt: skip
        before = snapshot(folder)
        env = {**os.environ, "SAWPLAN_HOME": str(folder / "home"),
               "SAWPLAN_DB": str(folder / "template.sqlite"), "SAWPLAN_NO_PROGRESS": "1",
               "COLUMNS": "100", **attempt.env}  # fmt: skip
        for var in ("SAWPLAN_CONFIG", "SAWPLAN_DEBUG", "SAWPLAN_SAW", "SAWPLAN_UNITS"):
            env.pop(var, None)
        started = time.monotonic()
        proc = subprocess.Popen([sys.executable, "-m", "sawplan", *attempt.args], cwd=folder,
                                env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                                stdin=subprocess.DEVNULL, preexec_fn=_limits(attempt))  # fmt: skip
        try:
            out, err = proc.communicate(timeout=attempt.timeout)
            code: int | None = proc.returncode
        except subprocess.TimeoutExpired:
            os.killpg(proc.pid, signal.SIGKILL)  # the attempt's own process group
            out, err = proc.communicate()
            code = None
        seconds = time.monotonic() - started
        text_out = out.decode("utf-8", "replace")
        text_err = err.decode("utf-8", "replace")
        verdict, why = classify(attempt, folder, before, code, text_out, text_err)
        return {"name": attempt.name, "area": attempt.area, "args": attempt.args, "code": code,
                "verdict": verdict, "why": why, "err": text_err[-300:], "seconds": seconds}  # fmt: skip
    finally:
        shutil.rmtree(folder, ignore_errors=True)


def classify(attempt, folder, before, code, out, err) -> tuple[str, str]:
    if code is None:
        return "broke", f"no answer within {attempt.timeout:.0f} s"
    if "Traceback" in err:
        return "broke", "a traceback"
    if code == 1:
        return "broke", "internal error (exit 1)"
    if code < 0:
        return "broke", f"killed by signal {-code}"
    if code not in DOCUMENTED:
        return "broke", f"exit {code}, not a documented code"
    if "out of memory" in err:
        return "broke", f"ran out of memory ({MEMORY_LIMIT // 1024**3} GB): an unbounded read?"
    if attempt.check and code in (0, 8):
        try:
            problem = attempt.check(folder, out, err)
        except Exception as exc:  # a check that cannot read what it checks
            problem = f"check failed: {type(exc).__name__}: {exc}"
        if problem:
            return "broke", problem
    if code in (0, 8):
        if attempt.expect == "refuse":
            return "broke", "accepted what must be refused"
        return "held", ""
    after = snapshot(folder)
    changed = sorted(k for k in set(before) | set(after) if before.get(k) != after.get(k))
    if changed:
        return "broke", f"refused but wrote {changed[0]}"
    if attempt.expect == "ok":
        return "broke", "refused what must work"
    lines = [ln for ln in err.splitlines() if not ln.startswith("note:")]
    if len(lines) != 1 or not lines[0].startswith("error: "):
        return "clumsy", f"{len(lines)} lines on stderr"
    if len(lines[0]) > 400:
        return "clumsy", f"a {len(lines[0])}-character message"
    if any(sign in lines[0] for sign in CLUMSY_SIGNS):
        return "clumsy", "Python's words in the message"
    return "held", ""


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--seed", type=int, default=2)
    parser.add_argument("--count", type=int, default=900)
    parser.add_argument("--workers", type=int, default=3)
    parser.add_argument("--only", default="", help="run only attempts whose name holds this")
    parser.add_argument("--verbose", action="store_true", help="print every attempt's answer")
    options = parser.parse_args()
    import cli_walk
    from adversarial_list import all_attempts

    shop = {"job": Path("job.toml"), "csv": Path("csv-in"), "backup": Path("backup.sqlite"),
            "log": Path("template.sqlite")}  # fmt: skip
    attempts = all_attempts(options.seed, options.count, cli_walk.LEAVES, cli_walk.baselines(shop))
    attempts = [a for a in attempts if options.only in a.name]
    started = time.monotonic()
    with tempfile.TemporaryDirectory(prefix="sawplan-adversarial-") as tmp:
        root = Path(tmp)
        template = build_template(root)
        with ThreadPoolExecutor(options.workers) as pool:
            results = list(pool.map(lambda ia: run_one(ia[1], template, root, ia[0]),
                                    enumerate(attempts)))  # fmt: skip
    report(results, time.monotonic() - started, options)


def report(results: list[dict], seconds: float, options) -> None:
    tally = Counter(r["verdict"] for r in results)
    print(f"adversarial pass: seed {options.seed}, {len(results)} attempts, {seconds:.0f} s")
    print(f"  held {tally['held']}, clumsy {tally['clumsy']}, broke {tally['broke']}")
    by_area = Counter((r["area"], r["verdict"]) for r in results)
    for area in sorted({r["area"] for r in results}):
        print(f"  {area:8} held {by_area[(area, 'held')]:4}  clumsy {by_area[(area, 'clumsy')]:3}"
              f"  broke {by_area[(area, 'broke')]:3}")  # fmt: skip
    for verdict in ("broke", "clumsy"):
        for r in results:
            if r["verdict"] == verdict:
                last = r["err"].strip().splitlines()[-1][:160] if r["err"].strip() else ""
                print(f"{verdict.upper():6} [{r['area']}] {r['name']}: {r['why']} (exit {r['code']})"
                      f"\n         {last}")  # fmt: skip
    if options.verbose:
        for r in results:
            last = r["err"].strip().splitlines()[-1][:110] if r["err"].strip() else ""
            print(f"  {r['verdict']:6} exit {r['code']}  {r['name'][:60]}  {last}")
    slow = sorted(results, key=lambda r: -r["seconds"])[:3]
    print("slowest: " + ", ".join(f"{r['name']} {r['seconds']:.1f} s" for r in slow))


if __name__ == "__main__":
    main()
