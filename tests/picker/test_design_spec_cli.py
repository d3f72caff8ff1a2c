"""``picker design ... --stopband FS --attenuation DB``: the order chosen, shown, saved;
impossible requests exit 2 naming the order they would take."""

from __future__ import annotations

import json
import math
import tomllib

import pytest
from scipy import signal

from tests.helpers import copy_sample
from tests.helpers import run_cli as run


@pytest.fixture
def stock_file(tmp_path):
    return copy_sample(tmp_path)


def test_order_is_chosen_shown_and_saved(capsys, stock_file, tmp_path):
    save = tmp_path / "d.toml"
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--stopband",
        "10k",
        "--attenuation",
        "40",
        "--stock",
        str(stock_file),
        "--save",
        str(save),
        "--top",
        "1",
        "--trials",
        "200",
    )
    assert code == 0, err
    # scipy.signal.buttord(2 pi 1e3, 2 pi 1e4, 3.0103, 40, analog=True) gives N = 2;
    # 10 log10(1 + 10^4) = 40.0 dB (Butterworth closed form)
    n_ref, _ = signal.buttord(2 * math.pi * 1e3, 2 * math.pi * 1e4, 3.0103, 40, analog=True)
    assert n_ref == 2
    assert out.splitlines()[0] == "order 2: 40.0 dB at 10 kHz, 40 dB asked"
    assert "1 stage" in out  # order 2: one second-order stage
    saved = tomllib.loads(save.read_text(encoding="utf-8"))["request"]
    assert saved["order"] == 2 and saved["stopband_hz"] == 1e4 and saved["attenuation_db"] == 40


def test_json_carries_the_choice(capsys, stock_file):
    code, out, err = run(
        capsys,
        "design",
        "highpass",
        "--fc",
        "1k",
        "--stopband",
        "250",
        "--attenuation",
        "30",
        "--response",
        "chebyshev",
        "--ripple",
        "0.5",
        "--stock",
        str(stock_file),
        "--json",
        "--top",
        "1",
        "--trials",
        "200",
    )
    assert code == 0, err
    doc = json.loads(out)
    spec = doc["order_from_spec"]
    # scipy.signal.cheb1ord(2 pi 1e3, 2 pi 250, 0.5, 30, analog=True): the high-pass order
    n_ref, _ = signal.cheb1ord(2 * math.pi * 1e3, 2 * math.pi * 250, 0.5, 30, analog=True)
    assert spec["order"] == n_ref
    assert spec["attenuation_db"] >= 30 and spec["attenuation_asked_db"] == 30
    assert sum(st["order"] for st in doc["candidates"][0]["stages"]) == n_ref


@pytest.mark.parametrize(
    "extra, words",
    [
        (["--stopband", "900", "--attenuation", "40"], "not above the corner"),
        (["--stopband", "1.2k", "--attenuation", "60"], "takes order 38"),
        (["--stopband", "10k"], "go together"),
        (["--stopband", "10k", "--attenuation", "40", "--order", "3"], "give one of them"),
        (["--stopband", "10k", "--attenuation", "loud"], "not a number"),
        (["--stopband", "ten", "--attenuation", "40"], "ten"),
    ],
)
def test_impossible_or_bad_requests_exit_2(capsys, stock_file, extra, words):
    # order 38: scipy.signal.buttord(2 pi 1e3, 2 pi 1.2e3, 3.0103, 60, analog=True)
    code, out, err = run(
        capsys, "design", "lowpass", "--fc", "1k", "--stock", str(stock_file), *extra
    )
    assert code == 2
    assert words in err and "Traceback" not in err
    assert out == ""
