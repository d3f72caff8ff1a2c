"""The command line's options (docs/cli.md): negative values reach their option, RKM
frequencies are read, ``--stock`` after every subcommand, and the design options read by
the shared rules of ``picker.targets`` (bad values exit 2 quoting the value; options
that do not apply are warnings)."""

from __future__ import annotations

import json

import pytest

from picker import cli
from tests.helpers import SMALL_STOCK
from tests.helpers import run_cli as run

# ------------------------------------------------------------------ argument parsing


def test_negative_values_reach_their_option(capsys, small):
    code, _, err = run(capsys, "design", "lowpass", "--fc", "-1k", "--stock", str(small))
    assert code == 2
    assert "--fc '-1k': must be above 0" in err
    assert "expected one argument" not in err


def test_negative_temperature_span_is_read(capsys, small):
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--order",
        "1",
        "--temp",
        "-20..85",
        "--trials",
        "100",
        "--stock",
        str(small),
        "--json",
    )
    assert code == 0, err

    temp = json.loads(out)["candidates"][0]["stages"][0]["budget"]["temperature"]
    assert temp  # computed over the span given


def test_rkm_frequency_is_read(capsys, small):
    # 1k5 is 1.5 k in the RKM code of IEC 60062
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k5",
        "--order",
        "1",
        "--json",
        "--trials",
        "50",
        "--stock",
        str(small),
    )
    assert code == 0, err

    assert json.loads(out)["candidates"][0]["stages"][0]["targets"]["f0"] == 1500.0


@pytest.mark.parametrize(
    "argv",
    [
        ["stock", "check"],
        ["stock", "list"],
        ["stock", "list", "--json"],
    ],
)
def test_stock_after_every_subcommand(capsys, small, argv):
    code, out, err = run(capsys, *argv, "--stock", str(small))
    assert code == 0, err
    assert "unrecognized arguments" not in err
    assert "bundled sample" not in err  # the file given was used


def test_every_command_parser_takes_stock():
    parser = cli.build_parser()
    leaves = list(cli._leaf_parsers(parser))
    assert len(leaves) >= 7
    for leaf in leaves:
        assert "--stock" in leaf._option_string_actions, leaf.prog


@pytest.mark.parametrize(
    "where",
    [
        lambda a, b: ["--stock", a, "stock", "list", "--stock", b],  # before and after
        lambda a, b: ["--stock", a, "--stock", b, "stock", "list"],  # twice before
        lambda a, b: ["design", "lowpass", "--fc", "1k", "--stock", a, "--stock", b],
    ],
)
def test_stock_named_twice_with_two_files_is_refused(capsys, small, tmp_path, where):
    other = tmp_path / "other.toml"
    other.write_text(SMALL_STOCK)
    code, out, err = run(capsys, *where(str(small), str(other)))
    assert code == 2 and out == ""
    assert "--stock names two files" in err and "other.toml" in err


def test_stock_named_twice_with_one_file_is_fine(capsys, small):
    code, _, err = run(capsys, "--stock", str(small), "stock", "list", "--stock", str(small))
    assert code == 0, err


def test_stock_check_file_and_stock_option_must_agree(capsys, small, tmp_path):
    other = tmp_path / "other.toml"
    other.write_text(SMALL_STOCK)
    code, _, err = run(capsys, "stock", "check", str(small), "--stock", str(other))
    assert code == 2 and "two stock files" in err


@pytest.mark.parametrize(
    "argv, quoted",
    [
        (["--window", "150%"], "at most 100 %"),
        (["--window", "0%"], "above 0 %"),
        (["--r-min", "-1k"], "--r-min '-1k': must be above 0"),
        (["--gain", "-2"], "--gain '-2': must be above 0"),
        (["--order", "9"], "--order '9': write a whole number from 1 to 8"),
        (["--order", "-1"], "--order '-1'"),
        (["--ripple", "-1", "--response", "chebyshev"], "--ripple '-1' dB"),
        (["--temp", "85..-20"], "--temp '85..-20': LO must be at most HI"),
        (["--temp", "-300..20"], "below absolute zero"),
        (["--supply", "-12"], "--supply '-12': must be above 0"),
        (["--r-min", "100k", "--r-max", "10k"], "--r-max 10k is below --r-min 100k"),
    ],
)
def test_bad_design_options_exit_2_quoting_the_value(capsys, small, argv, quoted):
    code, _, err = run(capsys, "design", "lowpass", "--fc", "1k", *argv, "--stock", str(small))
    assert code == 2, err
    assert quoted in err


def test_ripple_without_a_ripple_response_is_a_warning(capsys, small):
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--order",
        "1",
        "--ripple",
        "0.5",
        "--trials",
        "50",
        "--json",
        "--stock",
        str(small),
    )
    assert code == 0, err
    assert "warning: --ripple is not used: a butterworth response has no passband ripple" in err


def test_bandpass_report_is_titled_by_what_it_is(capsys, small, monkeypatch):
    monkeypatch.setenv("COLUMNS", "100")
    code, out, err = run(
        capsys,
        "design",
        "bandpass",
        "--fc",
        "1k",
        "--q",
        "2",
        "--trials",
        "50",
        "--stock",
        str(small),
    )
    assert code == 0, err
    first = out.splitlines()[0]
    assert first == "band-pass, centre 1 kHz, Q 2, gain 1, 1 stage"
    assert "butterworth" not in out


def test_bandpass_title_does_not_name_a_response():
    from picker.commands.design_cmd import title_of

    req = {"type": "bandpass", "fc_hz": 1e3, "q": 5.0, "gain": 1.0, "response": "butterworth"}
    assert title_of(req, 1) == "band-pass, centre 1 kHz, Q 5, gain 1, 1 stage"
    req = {"type": "lowpass", "fc_hz": 2e3, "q": None, "gain": 2.0}
    req |= {"response": "chebyshev", "ripple_db": 0.5}
    assert title_of(req, 2) == "low-pass chebyshev 0.5 dB ripple, fc 2 kHz, gain 2, 2 stages"


def test_response_with_a_bandpass_is_a_warning(capsys, small):
    code, _, err = run(
        capsys,
        "design",
        "bandpass",
        "--fc",
        "1k",
        "--q",
        "2",
        "--response",
        "bessel",
        "--trials",
        "50",
        "--json",
        "--stock",
        str(small),
    )
    assert "warning: --response bessel is not used for a band-pass" in err


def test_one_stock_path_is_one_file_even_while_another_process_replaces_it(monkeypatch, tmp_path):
    """A stat of each name races with an atomic replace by another process (``stock
    adjust`` in a second shell): the inode changes between the two stats. The same path,
    or two spellings of it, is one file without asking the file system."""
    import os

    from picker import cli

    path = tmp_path / "inv.toml"
    path.write_text("", encoding="utf-8")
    monkeypatch.setattr(os.path, "samefile", lambda a, b: False)  # the race, every time
    assert cli._same_file(str(path), str(path))
    assert cli._same_file(str(path), str(tmp_path / "." / "inv.toml"))
    assert not cli._same_file(str(path), str(tmp_path / "other.toml"))
