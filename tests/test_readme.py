"""The README tour shows what sawplan really prints on the demo shop.

Each ```console block between ``<!-- tour:begin -->`` and ``<!-- tour:end -->``
is ``$ sawplan ...`` followed by its output.  This test rebuilds the demo blade
log (``demo/make_history.py``) in a temporary copy of the ``demo/`` layout,
runs every command in-process through the real error boundary, and compares
the output with the README (trailing white space ignored).  When it fails,
the program and the README disagree: run ``.venv/bin/python demo/make_readme.py``
after checking that the new output is right.
"""

from __future__ import annotations

import importlib.util
import re
import shlex
import shutil
import sys
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parent.parent
README = REPO / "README.md"
DEMO_DB = "demo/out/demo-log.sqlite"
COMMAND_BLOCK = re.compile(r"```console\n\$ (sawplan[^\n]*)\n(.*?)```", re.S)


def load_demo_module(name: str):
    """A script from demo/ as a module (demo/ is not a package)."""
    spec = importlib.util.spec_from_file_location(f"demo_{name}", REPO / "demo" / f"{name}.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # dataclasses look their module up here
    spec.loader.exec_module(module)
    return module


def tour_section() -> str:
    text = README.read_text(encoding="utf-8")
    begin, end = text.find("<!-- tour:begin -->"), text.find("<!-- tour:end -->")
    return text[begin:end] if 0 <= begin < end else ""  # no markers: the test below fails


def tour_commands() -> list[tuple[str, str]]:
    return COMMAND_BLOCK.findall(tour_section())


def normalise(text: str) -> str:
    return "\n".join(line.rstrip() for line in text.splitlines()).strip("\n")


def build_demo_tree(root: Path) -> Path:
    """demo/jobs, demo/saws.toml and a freshly built demo/out/demo-log.sqlite under root."""
    demo = root / "demo"
    shutil.copytree(REPO / "demo" / "jobs", demo / "jobs")
    shutil.copy2(REPO / "demo" / "saws.toml", demo / "saws.toml")
    load_demo_module("make_history").build(root / DEMO_DB)
    return root


@pytest.fixture(scope="module")
def demo_root(tmp_path_factory) -> Path:
    return build_demo_tree(tmp_path_factory.mktemp("readme-demo"))


TOUR = tour_commands()


def test_the_tour_exists_and_covers_the_main_commands():
    commands = [shlex.split(c)[1] for c, _ in TOUR]
    assert len(TOUR) >= 5, "the README tour (between its markers) lost its command blocks"
    for name in ("cut", "plan", "life"):
        assert name in commands, f"the tour has no `sawplan {name}`"
    for command, output in TOUR:
        assert output.strip(), f"`{command}` shows no output in the README"


def test_tour_commands_use_only_the_demo_log():
    """Commands that read a blade log name the demo's, never the user's."""
    for command, _ in TOUR:
        words = shlex.split(command)
        if words[1] in ("plan", "life", "blade", "chart", "forecast", "log", "saw"):
            assert "--db" in words and words[words.index("--db") + 1] == DEMO_DB, command


@pytest.mark.parametrize(("command", "expected"), TOUR, ids=[c for c, _ in TOUR])
def test_readme_output_matches_the_program(command, expected, demo_root, cli, monkeypatch):
    monkeypatch.chdir(demo_root)
    result = cli(*shlex.split(command)[1:])
    assert result.code == 0, result.err
    assert result.err == ""
    assert normalise(result.out) == normalise(expected), (
        f"README output of `{command}` is out of date: run demo/make_readme.py"
    )


def test_readme_keeps_its_sections_and_cautions():
    text = README.read_text(encoding="utf-8")
    headings = re.findall(r"^## (.+)$", text, re.M)
    for needed in ("Quick start", "A tour", "Job files", "How the estimates are made"):
        assert needed in headings
    assert headings[-2:] == ["Your data", "Cautions"]
    cautions = " ".join(text[text.index("## Cautions") :].lower().split())
    for phrase in (
        "guard",
        "never hold it by hand",
        "gloves only to handle blades",
        "eye and hearing protection",
        "chock round stock",
        "break in every new blade",
        "saw maker's manual",
        "blade maker's data",
        "local regulations",
    ):
        assert phrase in cautions, phrase


def test_job_file_section_names_every_key():
    """The job-file example lists every key the loader accepts (sawplan.cutlist.jobfile.load)."""
    from sawplan.cutlist.jobfile.load import JOB_KEYS, PART_KEYS, STOCK_KEYS

    text = README.read_text(encoding="utf-8")
    section = text[text.index("## Job files") : text.index("## How the estimates are made")]
    example = section[section.index("```toml") : section.index("```", section.index("```toml") + 7)]
    for key in (*JOB_KEYS, *STOCK_KEYS, *PART_KEYS):
        assert re.search(rf"^{key} = ", example, re.M), f"README job-file example lacks {key}"
