"""No file of the project names a path of the machine it was written on."""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SKIP = {".git", ".venv", "build", "dist", "__pycache__", ".pytest_cache", ".ruff_cache", "out"}
MACHINE_PATHS = ("/" + "work/", "/" + "root/")  # split so this file passes


def _text_files():
    for path in ROOT.rglob("*"):
        if any(part in SKIP or part.endswith(".egg-info") for part in path.relative_to(ROOT).parts):
            continue
        if path.is_file() and path.suffix in {
            ".py",
            ".md",
            ".csv",
            ".toml",
            ".txt",
            ".html",
            ".cfg",
        }:
            yield path


def test_no_file_names_a_machine_path() -> None:
    found = [
        f"{path.relative_to(ROOT)}: {marker}"
        for path in _text_files()
        for marker in MACHINE_PATHS
        if marker in path.read_text(encoding="utf-8", errors="replace")
    ]
    assert not found, found
