"""Pane 4's `w`: the saved design, BOM CSV and netlist, written as the CLI writes them."""

from __future__ import annotations

import os

import pytest
from test_flows import SIZE, choose_first, settle
from textual.widgets import Input

from picker.cli import main
from picker.ui.app import PickerApp
from picker.ui.outputs import default_names

# the defaults for the targets choose_first sets: a 1.2 kHz second-order Butterworth low-pass
NAMES = {
    "design": "lowpass-butterworth-o2-1.2kHz.toml",
    "bom": "lowpass-butterworth-o2-1.2kHz-bom.csv",
    "netlist": "lowpass-butterworth-o2-1.2kHz.cir",
}


def cli(capsys, *argv) -> str:
    """What the CLI prints for ``argv`` (stdout is not a terminal here: the raw CSV)."""
    code = main([str(a) for a in argv])
    out, _err = capsys.readouterr()
    assert code == 0
    return out


async def open_dialog(pilot, app):
    from picker.ui.screens.write_files import WriteFilesScreen

    await pilot.press("w")
    await pilot.pause()
    assert isinstance(app.screen, WriteFilesScreen)
    return app.screen


async def set_name(pilot, dialog, kind: str, text: str) -> None:
    field = dialog.query_one(f"#w-{kind}", Input)
    field.focus()
    await pilot.press("ctrl+u", *text) if text else await pilot.press("ctrl+u")


def status(dialog) -> str:
    return str(dialog.query_one("#write-status").render())


async def test_write_the_design_bom_and_netlist_as_the_cli_does(
    stock_copy, tmp_path, monkeypatch, capsys
):
    from picker.ui.screens.confirm import ConfirmScreen
    from picker.ui.widgets.chosen import ChosenPane

    out = tmp_path / "out"
    out.mkdir()
    monkeypatch.chdir(out)
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await choose_first(pilot, app)
        pane = app.screen.query_one(ChosenPane)
        assert default_names(pane.targets) == NAMES
        dialog = await open_dialog(pilot, app)
        assert {k: dialog.query_one(f"#w-{k}", Input).value for k in NAMES} == NAMES
        await pilot.press("enter")
        await pilot.pause()
        assert not isinstance(app.screen, type(dialog))
        note = str(pane.query_one("#c-status").render())
        assert note.startswith("wrote: ") and all(n in note for n in NAMES.values())
        written = {k: (out / n).read_bytes() for k, n in NAMES.items()}
        # again: every file exists now, so a question names them all before anything
        dialog = await open_dialog(pilot, app)
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        assert all(n in app.screen.question for n in NAMES.values())
        assert app.screen.yes == "y: yes, replace these 3 files"
        await pilot.press("n")
        await pilot.pause()
        assert app.screen is dialog and "nothing written" in status(dialog)
        assert {k: (out / n).read_bytes() for k, n in NAMES.items()} == written
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("y")
        await pilot.pause()
        assert "(replaced)" in str(pane.query_one("#c-status").render())
        # one file there: the yes names it
        (out / NAMES["bom"]).unlink()
        (out / NAMES["netlist"]).unlink()
        await open_dialog(pilot, app)
        await pilot.press("enter")
        await pilot.pause()
        assert app.screen.yes == f"y: yes, replace {NAMES['design']}"
        await pilot.press("y")
        await pilot.pause()
    design = out / NAMES["design"]
    # the BOM and the netlist are byte for byte what the CLI prints for the saved design
    assert (out / NAMES["bom"]).read_bytes().decode("utf-8") == cli(capsys, "bom", design, "--csv")
    assert (out / NAMES["netlist"]).read_text(encoding="utf-8") == cli(capsys, "netlist", design)
    # and the saved design holds the pick and what it answers (the CLI reads it back)
    heading = cli(capsys, "bom", design)
    assert "lowpass butterworth, order 2, fc 1.2 kHz" in heading


@pytest.mark.parametrize("kind", ["design", "bom", "netlist"])
async def test_folders_fifos_devices_and_the_stock_file_are_refused_with_the_reason(
    stock_copy, tmp_path, monkeypatch, kind
):
    out = tmp_path / "out"
    out.mkdir()
    monkeypatch.chdir(out)
    os.mkfifo(out / "pipe")
    (out / "folder").mkdir()
    (out / "notes.toml").write_text('title = "my notes"\n', encoding="utf-8")
    before = stock_copy.read_bytes()
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await choose_first(pilot, app)
        dialog = await open_dialog(pilot, app)
        for name, why in (
            ("folder", "is a folder"),
            ("pipe", "is a FIFO"),
            ("/dev/null", "is a device"),
            (str(stock_copy), "is the stock file"),
        ):
            await set_name(pilot, dialog, kind, name)
            await pilot.press("enter")
            await pilot.pause()
            assert app.screen is dialog  # refused, still open
            text = status(dialog)
            assert text.startswith("refused: ") and name in text and why in text, text
        if kind == "design":  # a design replaces only an older saved design
            await set_name(pilot, dialog, kind, "notes.toml")
            await pilot.press("enter")
            await pilot.pause()
            assert "not a design saved by picker" in status(dialog)
        for other in NAMES:
            await set_name(pilot, dialog, other, "")
        await pilot.press("enter")
        await pilot.pause()
        assert "every name is blank" in status(dialog)
        await pilot.press("ctrl+g")
        await pilot.pause()
        assert app.screen is not dialog
    assert sorted(p.name for p in out.iterdir()) == ["folder", "notes.toml", "pipe"]
    assert stock_copy.read_bytes() == before
