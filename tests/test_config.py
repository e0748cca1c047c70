"""Defaults a shop sets once: command line beats environment beats file beats default."""

from __future__ import annotations

import json
import os
import stat

import pytest

from sawplan import config
from sawplan.errors import ExitCode


def weight_unit(cli, *extra: str) -> str:
    """The mass unit `weigh` answers in (lb for us, kg for metric)."""
    out = cli("weigh", "4140", "round", "60mm", "--length", "1m", *extra).out
    line = next(line for line in out.splitlines() if line.startswith("one piece"))
    return line.split()[-1]


def test_command_line_beats_environment_beats_file_beats_default(cli, monkeypatch):
    assert weight_unit(cli) == "kg"  # sawplan's default: metric
    assert cli("config", "set", "units", "us").code == 0
    assert weight_unit(cli) == "lb"  # the file
    monkeypatch.setenv("SAWPLAN_UNITS", "metric")
    assert weight_unit(cli) == "kg"  # the environment beats the file
    assert weight_unit(cli, "--units", "us") == "lb"  # the command line beats both


def test_show_says_where_each_value_comes_from(cli, monkeypatch):
    cli("config", "set", "currency", "EUR")
    monkeypatch.setenv("SAWPLAN_SAW", "large-column")
    shown = json.loads(cli("config", "show", "--json").out)
    by_key = {s["key"]: s for s in shown["settings"]}
    assert by_key["currency"]["value"] == "EUR"
    assert by_key["currency"]["source"] == shown["file"]
    assert (by_key["saw"]["value"], by_key["saw"]["source"]) == ("large-column", "env SAWPLAN_SAW")
    assert (by_key["units"]["value"], by_key["units"]["source"]) == ("metric", "default")


@pytest.mark.parametrize(
    ("key", "value"),
    [
        pytest.param("units", "furlongs", id="units"),
        pytest.param("log_mode", "044", id="a mode the owner cannot write"),
        pytest.param("currency", "E" * 13, id="currency too long"),
        pytest.param("saw", "bay\x002", id="control character"),
    ],
)
def test_set_refuses_what_the_option_would_refuse_and_keeps_the_file(cli, key, value):
    assert cli("config", "set", "currency", "USD").code == 0
    before = config.config_path().read_text(encoding="utf-8")
    result = cli("config", "set", key, value)
    assert result.code == ExitCode.BAD_DATA, result.err
    assert result.err.count("\n") == 1 and result.err.startswith("error: ")
    assert config.config_path().read_text(encoding="utf-8") == before


def test_unknown_setting_is_a_usage_error(cli):
    result = cli("config", "set", "colour", "blue")
    assert result.code == ExitCode.USAGE and "settings: units" in result.err


def test_a_damaged_config_file_is_named_not_overwritten(cli):
    path = config.config_path()
    path.write_text('units = "us"\nsaw = \n', encoding="utf-8")
    result = cli("weigh", "4140", "round", "60mm", "--length", "1m")
    assert result.code == ExitCode.BAD_DATA and str(path) in result.err
    assert cli("config", "set", "units", "metric").code == ExitCode.BAD_DATA
    assert path.read_text(encoding="utf-8") == 'units = "us"\nsaw = \n'


def test_set_keeps_the_shops_comments(cli):
    path = config.config_path()
    path.write_text('# bay 2 is our main saw\nsaw = "large-column"\n', encoding="utf-8")
    assert cli("config", "set", "units", "us").code == 0
    text = path.read_text(encoding="utf-8")
    assert "# bay 2 is our main saw" in text and 'units = "us"' in text
    assert cli("config", "unset", "saw").code == 0
    assert "saw" not in path.read_text(encoding="utf-8").replace("main saw", "")


def test_sawplan_config_names_the_file(cli, tmp_path, monkeypatch):
    path = tmp_path / "elsewhere" / "shop.toml"
    monkeypatch.setenv("SAWPLAN_CONFIG", str(path))
    assert cli("config", "set", "units", "us").code == 0
    assert path.is_file() and weight_unit(cli) == "lb"


def test_configured_saw_is_the_default_for_cut(cli):
    def saw_named(result) -> str:
        return json.loads(result.out)["saw"]

    assert saw_named(cli("cut", "4140", "round", "60mm", "--json")) == "mid-production"
    cli("config", "set", "saw", "large-column")
    assert saw_named(cli("cut", "4140", "round", "60mm", "--json")) == "large-column"
    chosen = cli("cut", "4140", "round", "60mm", "--saw", "small-horizontal", "--json")
    assert saw_named(chosen) == "small-horizontal"


def test_configured_log_is_used_relative_to_the_config_file(cli):
    assert cli("config", "set", "db", "shop-log.sqlite").code == 0
    assert cli("saw", "add", "bay 2", "--like", "mid-production").code == 0
    assert (config.config_path().parent / "shop-log.sqlite").is_file()
    assert "bay 2" in cli("saw", "list").out


def test_configured_currency_prices_a_job_that_names_none(cli, tmp_path):
    from pathlib import Path

    text = (Path(__file__).parent / "data" / "plan_small.toml").read_text(encoding="utf-8")
    job = tmp_path / "job.toml"
    job.write_text(text.replace('currency = "EUR"\n', ""), encoding="utf-8")
    cli("config", "set", "currency", "CHF")
    assert json.loads(cli("plan", str(job), "--json").out)["currency"] == "CHF"
    job.write_text(text, encoding="utf-8")  # the job's own currency wins
    assert json.loads(cli("plan", str(job), "--json").out)["currency"] == "EUR"


@pytest.mark.parametrize(
    ("mode", "file_mode", "folder_mode"),
    [
        pytest.param("private", 0o600, 0o700, id="private"),
        pytest.param("group", 0o660, 0o770, id="group"),
        pytest.param("640", 0o640, 0o750, id="octal"),
    ],
)
def test_log_mode_gives_file_and_folder_permissions(monkeypatch, mode, file_mode, folder_mode):
    monkeypatch.setenv("SAWPLAN_LOG_MODE", mode)
    assert config.log_file_mode() == file_mode
    assert config.log_folder_mode() == folder_mode
    assert stat.filemode(stat.S_IFREG | file_mode)[1:3] == "rw"  # the owner reads and writes


def test_no_config_file_is_made_by_reading(cli):
    weight_unit(cli)
    cli("config", "show")
    assert not os.path.exists(config.config_path())


def test_configured_currency_labels_blade_prices(cli):
    cli("blade", "add", "B-1", "--pitch", "3/4", "--blade-width", "27mm",
        "--blade-thickness", "0.9mm", "--price", "60")  # fmt: skip
    assert "price EUR" not in cli("blade", "list").out
    cli("config", "set", "currency", "EUR")
    assert "price EUR" in cli("blade", "list").out
    assert "60.00 EUR" in cli("blade", "show", "B-1").out
