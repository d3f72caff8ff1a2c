"""Pilot tests of the UI flows at 80x24, on a private copy of a small stock file."""

from __future__ import annotations

from textual.widgets import DataTable, Input

from picker.ui.app import PickerApp
from picker.ui.widgets.drawers import DrawersPane

SIZE = (80, 24)


async def settle(pilot, app, seconds: float = 0.05, *, search: bool = True) -> None:
    """Wait for start-up (panes mount a moment after the first paint) and, unless
    ``search`` is False, for the search and the workers to finish."""
    await pilot.pause(seconds)
    for _ in range(200):
        if getattr(app.screen, "idle" if search else "started", True):
            break
        await pilot.pause(0.05)
    if search:
        await app.workers.wait_for_complete()
    await pilot.pause()


async def test_filter_stock(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        table = app.screen.query_one("#stock-table", DataTable)
        assert table.row_count == 8  # 4 resistors, 3 capacitors, 1 op amp in the file
        await pilot.press("slash")
        await pilot.press(*"4.7k")  # another spelling of the 4k7 line
        await pilot.pause()
        assert table.row_count == 1
        assert str(table.get_row_at(0)[1]) == "4k7"
        for _ in range(4):
            await pilot.press("backspace")
        await pilot.press(*"c0g")  # a word of a cell, any case
        await pilot.pause()
        assert table.row_count == 1
        assert str(table.get_row_at(0)[1]) == "10n"


async def test_edit_quantity_changes_exactly_that_number(stock_copy):
    """A bad quantity is refused beside the field; a good one changes just that line."""
    before = stock_copy.read_text(encoding="utf-8")
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("e", *"-11", "enter")  # 4k7 has 10
        message = str(app.screen.query_one("#qty-message").render())
        assert "only 10 on hand" in message and message.startswith("error:")
        await pilot.press(*["backspace"] * 3, *"2x")
        message = str(app.screen.query_one("#qty-message").render())
        assert "'2x'" in message
        assert stock_copy.read_text(encoding="utf-8") == before
        await pilot.press("backspace", "backspace", "shift+tab")  # back to the table
        assert isinstance(app.focused, DataTable)
        await pilot.press("down")  # second line: 10k, qty 20
        await pilot.press("e")
        assert isinstance(app.focused, Input) and app.focused.id == "qty"
        await pilot.press(*"-3", "enter")
        await settle(pilot, app)
        table = app.screen.query_one("#stock-table", DataTable)
        assert [str(c) for c in table.get_row_at(1)[1:3]] == ["10k", "17"]
    after = stock_copy.read_text(encoding="utf-8")
    # exactly one line differs, and it is the 10k line's qty going from 20 to 17
    diff = [(a, b) for a, b in zip(before.splitlines(), after.splitlines(), strict=False) if a != b]
    assert diff == [("qty = 20", "qty = 17")]
    assert len(before.splitlines()) == len(after.splitlines())


async def test_add_line_validates_in_place_then_writes_after_its_kind(stock_copy):
    before = stock_copy.read_text(encoding="utf-8")
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("a")
        await pilot.pause()
        dialog = app.screen
        await pilot.press(*"4x7")
        await pilot.pause()
        message = str(dialog.query_one("#msg-value").render())
        assert message.startswith("error:") and "4x7" in message
        await pilot.press(*["backspace"] * 3, *"6k8", "tab", *"5", "tab", *"1%")
        await pilot.press("tab", *"B2", "enter")
        await settle(pilot, app)
        assert not isinstance(app.screen, type(dialog))
        pane = app.screen.query_one(DrawersPane)
        assert [r.cells[1] for r in pane.rows if r.kind == "resistor"][-1] == "6k8"
    text = stock_copy.read_text(encoding="utf-8")
    # after the last resistor (the 15k in A5), before the capacitors; nothing else changed
    at = before.index('location = "A5"\n\n[[capacitor]]') + len('location = "A5"\n')
    added = '\n[[resistor]]\nvalue = "6k8"\nqty = 5\ntolerance = "1%"\nlocation = "B2"\n'
    assert text == before[:at] + added + before[at:]


async def test_help_and_pane_keys_and_letters_inside_fields(stock_copy):
    from picker.ui.screens.help import CAUTIONS, KEYS, HelpScreen

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("question_mark")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)
        cautions = " ".join(CAUTIONS.split())
        for words in (
            "Discharge capacitors",
            "Isolate",
            "rated",
            "voltage margin",
            "polarity",
            "local electrical codes",
            "licensed practice",
        ):
            assert words in cautions
        assert "ctrl+q" in KEYS
        await pilot.press("q")
        await pilot.pause()
        assert not isinstance(app.screen, HelpScreen)
        await pilot.press("2")
        assert app.screen.query_one("#panes").current == "targets"
        fc = app.screen.query_one("#t-fc", Input)
        fc.focus()
        await pilot.press("end", "1")  # a digit in a field types, it does not switch
        assert fc.value == "1k1"
        assert app.screen.query_one("#panes").current == "targets"
        await pilot.press("ctrl+n")  # works from inside the field
        assert app.screen.query_one("#panes").current == "matches"


async def targets_field(pilot, app, name: str):
    """Go to the targets pane and put the focus in its field ``name``; the field."""
    await pilot.press("2")
    field = app.screen.query_one(f"#t-{name}", Input)
    field.focus()
    await pilot.pause()
    return field


async def search_from_targets(pilot, app):
    """Go to the targets, set a 1 kHz second-order low-pass and wait for the matches."""
    await pilot.press("2")
    fc = app.screen.query_one("#t-fc", Input)
    fc.focus()
    await pilot.press("ctrl+u", *"1.2k")
    await settle(pilot, app, 0.5)  # the debounce, then the search worker
    await settle(pilot, app, 0.1)


async def test_enter_targets_then_matches_are_ranked(stock_copy):
    """A bad fc is explained beside the field; a good one gives ranked matches."""
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        app.screen.query_one("#t-fc", Input).focus()
        await pilot.press("ctrl+u", *"12q")
        await pilot.pause()
        message = str(app.screen.query_one("#m-fc").render())
        assert message.startswith("error:") and "'12q'" in message
        await search_from_targets(pilot, app)
        screen = app.screen
        assert screen.targets.fc_hz == 1200.0 and screen.result_targets.fc_hz == 1200.0
        from picker.ui.widgets.matches import MatchesPane

        pane = screen.query_one(MatchesPane)
        from picker.search.ranking import rank_key  # the default ranking: pieces

        keys = [rank_key("pieces", 0.005, c) for c in pane.candidates]
        assert keys and keys == sorted(keys)
        status = str(screen.query_one("#m-status").render())
        assert status.startswith("done:") and "1200 Hz" in status
        # the same search straight through the core gives the same best candidate
        from picker.ui import backend

        direct = backend.search(screen.stock, backend.plan(screen.targets), screen.targets)
        assert direct.candidates[0] == pane.candidates[0]


async def choose_first(pilot, app):
    await search_from_targets(pilot, app)
    await pilot.press("ctrl+n")  # from inside the fc field: the next pane
    assert app.focused.id == "m-table"
    await pilot.press("enter")
    await settle(pilot, app, 0.2)
    assert app.screen.query_one("#panes").current == "chosen"


async def test_pick_a_candidate_then_build_and_undo(stock_copy):
    """Choose the best match: its plot and budget; build it (after a no), undo it."""
    import numpy as np
    from scipy import signal

    from picker.ui.screens.confirm import ConfirmScreen
    from picker.ui.widgets.chosen import ChosenPane
    from picker.ui.widgets.plots import F0Histogram, ResponsePlot

    before = stock_copy.read_bytes()
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await choose_first(pilot, app)
        pane = app.screen.query_one(ChosenPane)
        candidate = pane.candidate
        (stage,) = candidate.stages
        plot = pane.query_one(ResponsePlot)
        assert len(plot.freqs) == 400
        # the plotted magnitude against scipy.signal.freqs of the standard second-order
        # low-pass w0^2 / (s^2 + s w0/Q + w0^2) with the candidate's achieved f0 and Q
        # (the op amp's finite GBW moves it by far less than 0.1 dB up to 10 f0 here)
        w0 = 2 * np.pi * stage.achieved.f0_hz
        q = stage.achieved.q
        gain = stage.achieved.gain or 1.0
        f = np.array(plot.freqs)
        keep = f < 10 * stage.achieved.f0_hz
        _w, h = signal.freqs([gain * w0**2], [1, w0 / q, w0**2], worN=2 * np.pi * f[keep])
        assert np.allclose(np.array(plot.mag_db)[keep], 20 * np.log10(abs(h)), atol=0.1)
        drawn = str(plot.render())
        assert "magnitude, dB" in drawn and "1 kHz" in drawn and "phase" in drawn
        hist = pane.query_one(F0Histogram)
        assert hist.hist is not None and sum(hist.hist["counts"]) > 0
        assert "inside the window" in str(hist.render())
        budget_text = str(pane.query_one("#c-budget").render())
        assert "not available" not in budget_text and "error:" not in budget_text
        await pilot.press("b")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        listing = app.screen.body
        assert "by drawer" in listing and "A" in listing and "discharged" in listing
        await pilot.press("n")  # say no first: nothing changes
        await pilot.pause()
        assert stock_copy.read_bytes() == before
        await pilot.press("b")
        await pilot.pause()
        await pilot.press("y")
        await settle(pilot, app)
        built = stock_copy.read_bytes()
        assert built != before
        status = str(app.screen.query_one("#c-status").render())
        assert status.startswith("built:")
        await pilot.press("u")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.press("y")
        await settle(pilot, app)
        assert stock_copy.read_bytes() == before


async def test_bundled_sample_is_read_only():
    from picker.commands.common import bundled_sample_path

    sample = bundled_sample_path()
    before = sample.read_bytes()
    app = PickerApp(sample, note="using the bundled sample")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app, search=False)  # its search is long and not needed here
        await pilot.press("e", *"+1", "enter")
        await pilot.pause()
        message = str(app.screen.query_one("#qty-message").render())
        assert message.startswith("error:") and "bundled sample" in message
    assert sample.read_bytes() == before


async def test_matches_are_marked_old_while_the_targets_have_an_error(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        app.screen.query_one("#t-order", Input).focus()
        await pilot.press("backspace", "9")  # order 9: out of range
        await pilot.pause()
        status = str(app.screen.query_one("#m-status").render())
        assert status.startswith("[old]") and "pane 2" in status
        await pilot.press("backspace", "3")
        await settle(pilot, app, 0.5)
        status = str(app.screen.query_one("#m-status").render())
        assert status.startswith("done:") and "order 3" in status
