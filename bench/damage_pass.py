"""Many damaged copies of the demo log: what sawplan writes to, reads wrongly, or fails on.

    python bench/damage_pass.py [--copies 200] [--seed 7]

Each copy of the demo shop's log has ``length`` bytes (1 to 4,096) at a seeded
offset overwritten with seeded garbage, the way a failing disk or a bad copy
damages a file.  SQLite's own full ``integrity_check``, run from outside
sawplan, is the judge of whether the damage can be detected.  On its own fresh
copy each command runs in-process through the real error boundary:

- writes (``log cut``, ``blade add``): accepted on detectable damage is a
  failure (goal: none);
- reads (``blade list --json``, ``log list --json``): an answer different from
  the sound log's is a wrong read; on detectable damage a failure (goal:
  none), on damage SQLite cannot detect the limit documented in DEVELOPERS.md
  (no checksums: a changed byte inside a stored value reads as that value);
- an internal error (exit 1) or a traceback is a failure anywhere.
"""

from __future__ import annotations

import argparse
import random
import shutil
import sys
import tempfile
from collections import Counter
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path[:0] = [str(ROOT / "demo"), str(ROOT / "tests")]

WRITES = {"log cut": ["log", "cut", "304", "round", "60mm", "--saw", "pivot-bay"],
          "blade add": ["blade", "add", "Z-9", "--pitch", "3/4", "--blade-width", "27mm",
                        "--blade-thickness", "0.9mm"]}  # fmt: skip
READS = {"blade list": ["blade", "list", "--json"],
         "log list": ["log", "list", "--json", "--limit", "100000"]}  # fmt: skip
LENGTHS = (1, 4, 20, 64, 512, 4096)


def damaged_copy(sound: Path, target: Path, offset: int, garbage: bytes) -> Path:
    shutil.copy(sound, target)
    from damage_kit import overwrite

    overwrite(target, offset, garbage)
    return target


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--copies", type=int, default=200)
    parser.add_argument("--seed", type=int, default=7)
    options = parser.parse_args()

    import damage_kit
    import make_history
    from cli_walk import invoke

    rng = random.Random(options.seed)
    tally: Counter[str] = Counter()
    failures: list[str] = []
    with tempfile.TemporaryDirectory(prefix="sawplan-damage-") as tmp:
        folder = Path(tmp)
        sound = folder / "sound.sqlite"
        make_history.build(sound)
        damage_kit.settle(sound)
        expected = {name: invoke([*args, "--db", str(sound)]) for name, args in READS.items()}
        size = sound.stat().st_size
        for n in range(options.copies):
            length = rng.choice(LENGTHS)
            offset = rng.randrange(0, size - length)
            garbage = bytes(rng.randrange(256) for _ in range(length))
            probe = damaged_copy(sound, folder / f"probe{n}.sqlite", offset, garbage)
            said = damage_kit.outside_check(probe)
            detectable = said != "ok"
            tally["detectable" if detectable else "not detectable"] += 1
            for kind, commands in (("write", WRITES), ("read", READS)):
                for name, args in commands.items():
                    log = damaged_copy(sound, folder / f"c{n}-{name}.sqlite".replace(" ", "-"),
                                       offset, garbage)  # fmt: skip
                    code, out, err = invoke([*args, "--db", str(log)])
                    what = f"copy {n} ({length} B at {offset}, {said[:50]}): {name}"
                    if code == 1 or "Traceback" in err:
                        tally["internal error"] += 1
                        failures.append(f"{what}: exit {code}: {err.strip()[-120:]}")
                    elif code == 0 and kind == "write":
                        tally[
                            f"write accepted, {'detectable' if detectable else 'undetectable'}"
                        ] += 1
                        if detectable:
                            failures.append(f"{what}: written on detectable damage")
                    elif code == 0 and (out, err) != expected[name][1:]:
                        tally[f"wrong read, {'detectable' if detectable else 'undetectable'}"] += 1
                        if detectable:
                            failures.append(f"{what}: a wrong read on detectable damage")
                    elif code != 0:
                        tally[f"{kind} refused (exit {code})"] += 1
                    else:
                        tally[f"{kind} right"] += 1
    print(f"damage pass: {options.copies} damaged copies of the demo log ({size:,} bytes), "
          f"seed {options.seed}")  # fmt: skip
    for key in sorted(tally):
        print(f"  {key:32} {tally[key]:5}")
    print(f"failures: {len(failures)}")
    for line in failures[:30]:
        print("  " + line)
    print("Not detectable by SQLite (no checksums): a changed byte inside a stored value that")
    print("leaves the record well formed reads back as the changed value; a backup shows it.")


if __name__ == "__main__":
    main()
