"""The cut card states one down-feed, the setting; the explanation says why without a second one."""

from __future__ import annotations

import re

import pytest

FEED = re.compile(r"\d[\d.,]* (?:mm/min|in/min)")


@pytest.mark.parametrize("units", ["metric", "us"])
def test_one_down_feed_on_a_constant_feed_card(cli, units):
    out = cli("cut", "304", "round", "250mm", "--saw", "large-column", "--units", units).out
    down = [line for line in out.splitlines() if line.startswith("Down-feed")]
    assert len(down) == 1 and len(FEED.findall(down[0])) == 1  # "set 7.14 mm/min"
    rest = [line for line in out.splitlines() if not line.startswith("Down-feed")]
    assert not any(FEED.search(line) for line in rest), "a second down-feed on the card"
    assert "safe at the widest chord" in out


def test_a_calibrated_card_names_the_models_feed_only_as_the_model():
    # With a shop calibration the model's own feed appears once, inside the calibration line.
    from sawplan.cli.cut_view import render_cut
    from sawplan.cutting import recommend
    from sawplan.materials import load_catalogue
    from sawplan.saws import get_saw
    from sawplan.sections import parse_section

    result = recommend(
        load_catalogue().get("304"), parse_section("round 250mm"), get_saw("large-column"),
        calibration=0.97,
    )  # fmt: skip
    card = render_cut(result, "metric")
    feeds = FEED.findall(card)
    assert len(feeds) == 2, feeds  # the setting, and the model's value in its own line
    calibration = next(line for line in card.splitlines() if "shop calibration" in line)
    assert "model" in calibration and FEED.search(calibration)
    # the setting is the model's feed slowed by the factor: 1 / 0.97 of it
    setting = float(FEED.findall(card)[0].split()[0])
    model = float(FEED.search(calibration).group(0).split()[0])
    assert setting == pytest.approx(model / 0.97, rel=0.01)


@pytest.mark.parametrize(
    ("args", "units", "setting"),
    [
        # 10 mm/min as typed; 10 / 25.4 = 0.3937 in/min (1 in = 25.4 mm exactly), 3 digits
        pytest.param(("304", "round", "250mm", "--saw", "large-column", "--feed", "10mm/min"),
                     "metric", "10.0 mm/min", id="constant-metric"),
        pytest.param(("304", "round", "250mm", "--saw", "large-column", "--feed", "10mm/min"),
                     "us", "0.394 in/min", id="constant-us"),
        # a gravity head: the setting first, then what its force lets it average
        pytest.param(("1018", "flat", "4in", "0.5in", "--saw", "small-horizontal", "--feed",
                      "1.5in/min"), "us", "1.50 in/min", id="gravity-us"),
    ],
)  # fmt: skip
def test_a_set_down_feed_is_stated_once_as_typed(cli, args, units, setting):
    out = cli("cut", *args, "--units", units).out
    card = out.split("\n\n", 1)[1]  # after the comparison with the recommendation
    down = [line for line in card.splitlines() if line.startswith("Down-feed")]
    assert len(down) == 1 and down[0].startswith(f"Down-feed   set {setting}")
    why = card.split("Why", 1)[1].split("\nBreak-in", 1)[0].split("\nWarnings", 1)[0]
    assert not FEED.search(why), "the explanation repeats a down-feed"
