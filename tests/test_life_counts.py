"""Tables count cuts and say entries where entries are meant; the group-by words are one list.

External checks: the counts are the sums of the entries written here (a batch of
N identical cuts is one entry of N cuts, DEVELOPERS.md), and the median of the
per-entry ratios is Python's ``statistics.median``.
"""

from __future__ import annotations

import json
import statistics

from sawplan import fields
from sawplan.store.blade_groups import GROUP_KEYS


def test_the_group_by_words_are_the_field_tables_choices():
    assert tuple(GROUP_KEYS) == fields.field("group_by").choices


def test_calibration_counts_entries_and_the_cuts_they_hold(cli, log_db):
    def ok(*args):
        result = cli(*args, "--db", str(log_db))
        assert result.code == 0, result.err
        return result

    ok("saw", "add", "bay 2", "--like", "mid-production")
    ok("blade", "add", "B-1", "--pitch", "4/6", "--blade-width", "27mm",
       "--blade-thickness", "0.9mm")  # fmt: skip
    ok("blade", "fit", "B-1", "--saw", "bay 2", "--date", "10 days ago")
    batches = [(10, "12min"), (15, "20min"), (20, "25min")]
    for n, time in batches:
        ok("log", "cut", "4140", "round", "40mm", "--cuts", str(n), "--time", time,
           "--date", "5 days ago")  # fmt: skip
    report = json.loads(ok("life", "--json").out)
    (row,) = report["calibration"]
    assert (row["entries"], row["cuts"]) == (3, sum(n for n, _ in batches))
    entries = json.loads(ok("log", "list", "--json").out)["items"]
    ratios = [e["time_min"] / e["predicted_time_min"] for e in entries]
    assert row["factor"] == statistics.median(ratios)
    text = ok("life").out
    table = text.split("cut-time calibration", 1)[1]
    assert "entries" in table.splitlines()[1] and "cuts" in table.splitlines()[1]
    card = ok("cut", "4140", "round", "40mm", "--saw", "bay 2").out
    assert "calibration from 3 timed log entries holding 45 cuts" in card
    cut_json = json.loads(ok("cut", "4140", "round", "40mm", "--saw", "bay 2", "--json").out)
    assert (cut_json["calibration_entries"], cut_json["calibration_cuts"]) == (3, 45)
