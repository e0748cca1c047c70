"""The Markdown guard: text from a job file or the log stays text in ``--sheet x.md``.

External reference: markdown-it-py (PyPI), a CommonMark renderer, with GFM tables
switched on as the sheet uses them.  The rendered HTML is read with the standard
``html.parser``: the only tags are the ones the sheet's own markup makes, with no
attribute but the tables' alignment, whatever text the job holds.  CommonMark 0.31
§4.5: a fenced block ends at a fence at least as long as its opening one.
"""

from __future__ import annotations

import html
import re
from html.parser import HTMLParser
from pathlib import Path

import pytest
from hypothesis import example, given
from hypothesis import strategies as st

from sawplan.cutlist.sheets.markdown import _fenced, _md

# the tags the sheet's own Markdown makes (headings, lists, bold, tables, code blocks)
OWN_TAGS = {"h1", "h2", "h3", "p", "ul", "li", "strong", "pre", "code", "table", "thead",
            "tbody", "tr", "th", "td"}  # fmt: skip
ALIGN = re.compile(r"text-align:(left|right|center)")
HOSTILE = [
    "<img src=x onerror=alert(1)>",
    "```\n<script>alert(1)</script>",
    "[click](javascript:alert(1))",
    "<a href='javascript:alert(1)'>x</a>",
    "**bold** _it_ `code` ~~gone~~",
    "&lt;b&gt; &#60;i&#62;",
    "| cell | break |",
    "<!-- open comment",
]


def render(markdown: str) -> str:
    from markdown_it import MarkdownIt

    return MarkdownIt("commonmark").enable("table").render(markdown)


class Tags(HTMLParser):
    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[tuple[str, list[tuple[str, str | None]]]] = []
        self.comments: list[str] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, attrs))

    def handle_comment(self, data):
        self.comments.append(data)

    def handle_data(self, data):
        self.text.append(data)


def parse(markup: str) -> Tags:
    tags = Tags()
    tags.feed(markup)
    tags.close()
    return tags


def foreign_markup(markup: str) -> list[str]:
    """Tags, attributes and comments the sheet's own Markdown does not make."""
    tags = parse(markup)
    found = [f"<{t}>" for t, _ in tags.tags if t not in OWN_TAGS]
    found += [f"{t} {a}={v!r}" for t, attrs in tags.tags for a, v in attrs
              if not (a == "style" and ALIGN.fullmatch(v or ""))]  # fmt: skip
    return found + [f"<!--{c}-->" for c in tags.comments]


# --- the two escapes, on any text -----------------------------------------------------------

PIECES = list("`*_[]()<>#|~&!\\-+=.:;'\" ") + ["<img src=x>", "&amp;", "```", "\n"]
TEXT = st.lists(
    st.one_of(st.sampled_from(PIECES), st.characters(exclude_categories=("Cc", "Cs"))),
    max_size=30,
).map("".join)


@given(TEXT)
def test_escaped_text_renders_as_the_same_text(text):
    expected = " ".join(text.split())
    markup = render(f"x {_md(text)}\n\n| a |\n|---|\n| {_md(text)} |\n")
    assert foreign_markup(markup) == []
    paragraph = re.search(r"<p>x ?(.*?)</p>", markup, re.S).group(1)
    cell = re.search(r"<td>(.*?)</td>", markup, re.S)
    assert html.unescape(paragraph) == expected
    assert html.unescape(cell.group(1) if cell else "") == expected


@given(TEXT)
@example("```")
@example("total\n```\n<img src=x onerror=alert(1)>\n````")
def test_a_fenced_block_holds_any_text_to_its_end(text):
    markup = render("\n".join(["before", "", *_fenced(text), "", "after"]))
    blocks = re.findall(r"<pre><code>(.*?)</code></pre>", markup, re.S)
    assert len(blocks) == 1
    assert html.unescape(blocks[0]) == text + "\n"
    assert markup.endswith("<p>after</p>\n")


def test_a_fence_is_longer_than_any_backtick_run():
    assert _fenced("total 12.00 ````") == ["`````", "total 12.00 ````", "`````"]
    assert _fenced("no ticks")[0] == "```"


# --- the sheet of a job holding hostile text ------------------------------------------------

SMALL_JOB = Path(__file__).parent / "data" / "plan_small.toml"


def toml_text(value: str) -> str:
    import json

    return json.dumps(value)  # a JSON string is a TOML basic string


def hostile_job(tmp_path: Path, value: str, currency: str) -> Path:
    text = SMALL_JOB.read_text(encoding="utf-8")
    for old in ('"pump shafts"', '"Harbour Street Pumps (fictional)"', '"shaft"', '"PS-101"',
                '"+0.5/-0"', '"H-2231"', '"B2"', '"H-1980"'):  # fmt: skip
        text = text.replace(old, toml_text(value))
    text = text.replace('"collar"', toml_text(value + " 2"))  # part names differ
    text = text.replace('currency = "EUR"', f"currency = {toml_text(currency)}")
    text = text.replace("count = 8\n", "count = 30\n")  # short: the order list too
    job = tmp_path / "job.toml"
    job.write_text(text, encoding="utf-8")
    return job


@pytest.mark.parametrize("value", HOSTILE)
@pytest.mark.parametrize("currency", ["```", "````<b>", "<img src=x>", "`$`"])
def test_hostile_job_text_stays_text_in_the_markdown_sheet(cli, tmp_path, value, currency):
    job = hostile_job(tmp_path, value, currency)
    sheet = tmp_path / "job.md"
    log = str(tmp_path / "log.sqlite")
    added = cli("blade", "add", "B-1", "--pitch", "4/6", "--blade-width", "27mm",
                "--blade-thickness", "0.9mm", "--supplier", value, "--db", log)  # fmt: skip
    assert added.code == 0, added.err
    result = cli("plan", str(job), "--sheet", str(sheet), "--supplier", value, "--db", log)
    assert result.code in (0, 8), result.err
    markdown = sheet.read_text(encoding="utf-8")
    markup = render(markdown)
    assert foreign_markup(markup) == []
    headings = [m for m in re.findall(r"<h2>(.*?)</h2>", markup)]
    assert headings == ["Sections", "Bars", "Order list", "Blades and quote", "Notes and cautions"]
    blocks = [html.unescape(b) for b in re.findall(r"<pre><code>(.*?)</code></pre>", markup, re.S)]
    quote = next(b for b in blocks if "QUOTE" in b)
    assert quote.count(currency) >= 3  # the currency stayed inside its block
    shown = " ".join(parse(markup).text)  # character references already read
    assert " ".join(value.split()) in shown  # the text is shown, as text
