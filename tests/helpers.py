"""Helpers the test modules share: where the tree is, the sample stock, running the CLI
in process and writing a stock file for a test."""

from __future__ import annotations

from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "sample_inventory.toml"

# a stock just large enough for a first- or second-order design (invented parts)
SMALL_STOCK = """\
[[resistor]]
value = "10k"
qty = 4
tolerance = "1%"
location = "A1"

[[resistor]]
value = "22k"
qty = 3
tolerance = "1%"
location = "A3"

[[capacitor]]
value = "10n"
qty = 4
tolerance = "5%"
dielectric = "C0G"
location = "C1"

[[opamp]]
name = "dual general purpose"
gbw = "3MHz"
channels = 2
qty = 2
location = "IC tray"
"""


def run_cli(capsys, *argv: str) -> tuple[int | str | None, str, str]:
    """``picker ARGV`` in this process: (exit code, stdout, stderr). argparse's exit (0
    after --help, 2 for a bad option) is returned as the code like any other."""
    from picker.cli import main

    try:
        code: int | str | None = main(list(argv))
    except SystemExit as exc:
        code = exc.code
    out, err = capsys.readouterr()
    return code, out, err


def write_stock(folder: Path, text: str, name: str = "inventory.toml") -> Path:
    """A stock file ``folder/name`` holding ``text``."""
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def copy_sample(folder: Path, name: str = "inventory.toml") -> Path:
    """A copy of the sample stock that a test may change."""
    path = folder / name
    path.write_bytes(SAMPLE.read_bytes())
    return path
