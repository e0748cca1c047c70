"""The printable cut sheet in a real browser: every bar drawn, nothing past the paper's edge.

``sawplan plan JOB --sheet out.html`` is rendered by headless Chromium
(Debian's ``chromium`` package, ``/usr/bin/chromium``).  Two checks:

- Layout at the printable width.  A4 is 210 mm wide and US Letter 8.5 in
  (215.9 mm); less the sheet's two 12 mm page margins the content box is 186 mm
  and 191.9 mm, i.e. 703 and 725 CSS px (CSS Values 4: 1 in = 96 px = 25.4 mm).
  Each sheet, with its print rules switched on for the screen and scroll bars
  hidden, is laid out in a frame exactly that wide; a script measures the page
  (document width, every element's right edge, every bar's drawing) and writes
  the result into the DOM, which ``--dump-dom`` prints.  A control page with a
  deliberately wide element is measured alongside and must be reported as
  overflowing, so a probe that sees nothing cannot pass.
- Printing.  ``--print-to-pdf`` with ``@page { size: A4 }`` or ``letter`` must
  give pages of 595 × 842 pt or 612 × 792 pt (ISO 216: 210 × 297 mm; US Letter
  8.5 × 11 in; 1 pt = 1/72 in).

Skipped when Chromium is not installed.
"""

from __future__ import annotations

import html
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parent.parent
CHROMIUM = shutil.which("chromium") or (
    "/usr/bin/chromium" if Path("/usr/bin/chromium").exists() else None
)
pytestmark = pytest.mark.skipif(
    CHROMIUM is None,
    reason="headless Chromium not found (/usr/bin/chromium): install Debian's chromium package "
    "(apt-get install chromium) to check the printable sheet in a browser",
)

MM_PER_IN = 25.4
CSS_PX_PER_IN = 96.0
PAGE_MARGIN_MM = 12.0  # the sheet's @page margin
PAPER_WIDTH_MM = {"A4": 210.0, "letter": 8.5 * MM_PER_IN}  # ISO 216; US Letter 8.5 in
PAPER_PT = {"A4": (595.28, 841.89), "letter": (612.0, 792.0)}  # 1 pt = 1/72 in
SHEETS = (("pump-blanks", "metric"), ("billet-slices", "us"))

# Runs in the outer page once every frame has loaded; measures each frame's document.
PROBE = """<script>
window.addEventListener('load', function () {
  var results = {};
  document.querySelectorAll('iframe').forEach(function (frame) {
    var doc = frame.contentDocument, win = frame.contentWindow;
    var width = doc.documentElement.clientWidth, past = [];
    doc.querySelectorAll('body *').forEach(function (el) {
      var r = el.getBoundingClientRect();
      if (r.width > 0 && r.right > width + 0.5) {
        past.push(el.tagName.toLowerCase() + ' ' + Math.round(r.right));
      }
    });
    var bars = Array.prototype.map.call(doc.querySelectorAll('section.bar'), function (s) {
      var svg = s.querySelector('svg'), r = svg ? svg.getBoundingClientRect() : null;
      return {id: s.id, svg_width: r ? r.width : 0, svg_right: r ? r.right : 0,
              pieces: svg ? svg.querySelectorAll('rect.piece').length : 0};
    });
    results[frame.id] = {layout_width: width, window_width: win.innerWidth,
      scroll_width: doc.documentElement.scrollWidth, past_edge: past.slice(0, 10),
      past_count: past.length, bars: bars};
  });
  var out = document.createElement('pre');
  out.id = 'sheet-probe';
  out.textContent = JSON.stringify(results);
  document.body.appendChild(out);
});
</script>"""

CONTROL = (
    "<!DOCTYPE html><html><head><style>@media screen{} @media print{}</style></head><body>"
    '<section class="bar" id="bar-1"><svg viewBox="0 0 10 10" width="600">'
    '<rect class="piece" width="5" height="5"/></svg></section>'
    '<div style="width:2000px">far too wide</div></body></html>'
)


def printable_px(paper: str) -> int:
    return round((PAPER_WIDTH_MM[paper] - 2 * PAGE_MARGIN_MM) / MM_PER_IN * CSS_PX_PER_IN)


def chromium(*args: str) -> subprocess.CompletedProcess:
    with tempfile.TemporaryDirectory(prefix="sawplan-chromium-") as profile:
        return subprocess.run(
            [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
             "--no-first-run", "--disable-background-networking", "--disable-component-update",
             "--disable-sync", f"--user-data-dir={profile}", *args],
            capture_output=True, text=True, timeout=120, check=False,
        )  # fmt: skip


def as_print_on_screen(page: str) -> str:
    """The sheet as it lays out on paper: print rules on, screen rules off, no scroll bars."""
    assert "@media print" in page and "@media screen" in page, "the sheet's print CSS changed"
    page = page.replace("@media screen", "@media not all").replace("@media print", "@media all")
    return page.replace("</head>", "<style>html { scrollbar-width: none }</style></head>", 1)


@pytest.fixture(scope="module")
def sheets(tmp_path_factory) -> dict[str, tuple[Path, int]]:
    """Sheets of both demo jobs (metric and US units), with the number of bars in each plan."""
    out = tmp_path_factory.mktemp("sheets")
    env = {k: v for k, v in os.environ.items() if not k.startswith("SAWPLAN_")}
    env["SAWPLAN_HOME"] = str(out)  # never the user's blade log
    made = {}
    for job, units in SHEETS:
        sheet = out / f"{job}-{units}.html"
        done = subprocess.run(
            [sys.executable, "-m", "sawplan", "plan", str(REPO / "demo" / "jobs" / f"{job}.toml"),
             "--saws", str(REPO / "demo" / "saws.toml"), "--units", units, "--json",
             "--sheet", str(sheet), "--db", str(out / "no-log.sqlite")],
            capture_output=True, text=True, timeout=60, check=False, env=env,
        )  # fmt: skip
        assert done.returncode == 0, done.stderr
        made[f"{job}-{units}"] = (sheet, len(json.loads(done.stdout)["bars"]))
    return made


@pytest.fixture(scope="module")
def layout(sheets, tmp_path_factory) -> dict[str, dict]:
    """One Chromium run: every sheet at A4 and Letter width, and the control page."""
    frames = []
    for key, (sheet, _bars) in sheets.items():
        page = as_print_on_screen(sheet.read_text(encoding="utf-8"))
        for paper in PAPER_WIDTH_MM:
            frames.append((f"{key}-{paper}", printable_px(paper), page))
    frames.append(("control", printable_px("A4"), as_print_on_screen(CONTROL)))
    body = "".join(
        f'<iframe id="{name}" style="display:block;border:0;width:{width}px;height:900px" '
        f'srcdoc="{html.escape(page, quote=True)}"></iframe>'
        for name, width, page in frames
    )
    outer = tmp_path_factory.mktemp("probe") / "probe.html"
    outer.write_text(
        f"<!DOCTYPE html><html><head><meta charset='utf-8'></head><body>{body}{PROBE}</body></html>",
        encoding="utf-8",
    )
    done = chromium("--window-size=1200,900", "--virtual-time-budget=10000", "--dump-dom",
                    outer.as_uri())  # fmt: skip
    found = re.search(r'<pre id="sheet-probe">(.*?)</pre>', done.stdout, re.S)
    assert found, f"no probe result from chromium (exit {done.returncode}): {done.stderr[-800:]}"
    return json.loads(html.unescape(found.group(1)))


@pytest.mark.parametrize("paper", list(PAPER_WIDTH_MM))
@pytest.mark.parametrize("sheet_key", [f"{job}-{units}" for job, units in SHEETS])
def test_every_bar_fits_the_printable_width(sheets, layout, sheet_key, paper):
    _sheet, bars = sheets[sheet_key]
    result = layout[f"{sheet_key}-{paper}"]
    width = printable_px(paper)
    assert result["layout_width"] == width, result  # no scroll bar stealing width
    assert len(result["bars"]) == bars, "a bar of the plan is missing from the sheet"
    assert [b["id"] for b in result["bars"]] == [f"bar-{i}" for i in range(1, bars + 1)]
    for bar in result["bars"]:
        assert bar["svg_width"] > 0.5 * width, bar  # drawn across the page, not collapsed
        assert bar["svg_right"] <= width + 0.5, bar
        assert bar["pieces"] >= 1, bar
    assert result["scroll_width"] <= width, result
    assert result["past_count"] == 0, result["past_edge"]


def test_the_probe_sees_overflow(layout):
    """Control: a page with a 2000 px wide box must be reported as overflowing."""
    result = layout["control"]
    assert result["layout_width"] == printable_px("A4")
    assert result["scroll_width"] > result["layout_width"]
    assert result["past_count"] >= 1


@pytest.mark.parametrize("paper", list(PAPER_PT))
def test_sheet_prints_on_the_paper_size(sheets, paper, tmp_path):
    sheet, _bars = sheets["pump-blanks-metric"]
    page_text = sheet.read_text(encoding="utf-8")
    page, pdf = tmp_path / "page.html", tmp_path / "sheet.pdf"
    page.write_text(page_text.replace("</style>", f"@page {{ size: {paper} }}</style>", 1))
    done = chromium("--no-pdf-header-footer", f"--print-to-pdf={pdf}", page.as_uri())
    assert pdf.is_file() and pdf.stat().st_size > 1000, done.stderr[-800:]
    boxes = re.findall(rb"/MediaBox\s*\[\s*0\s+0\s+([\d.]+)\s+([\d.]+)\s*\]", pdf.read_bytes())
    assert boxes, "no page sizes found in the PDF"
    want_w, want_h = PAPER_PT[paper]
    for w, h in boxes:
        assert float(w) == pytest.approx(want_w, abs=1.0)
        assert float(h) == pytest.approx(want_h, abs=1.0)
