"""Pilot tests of the repair screen (key m) at 80x24, on a private copy of the small stock.

The stage is a unity-gain Sallen-Key low-pass, R1 = R2 = 10k, C1 (feedback) = 22n,
C2 (to ground) = 10n. Closed forms of that circuit (the usual unity-gain Sallen-Key
low-pass formulas, common practice; the topology's own docstring gives the same):
f0 = 1 / (2 pi sqrt(R1 R2 C1 C2)) and Q = sqrt(R1 R2 C1 C2) / (C2 (R1 + R2)).
"""

from __future__ import annotations

import math

from test_flows import SIZE, settle
from textual.widgets import DataTable, Input, Select

from picker.ui.app import PickerApp
from picker.ui.screens.confirm import ConfirmScreen
from picker.ui.screens.repair import RepairScreen
from picker.ui.widgets.plots import ResponsePlot

MARKED = {"R1": "10k", "R2": "10k", "C1": "22n", "C2": "10n"}
F0_HZ = 1 / (2 * math.pi * math.sqrt(10e3 * 10e3 * 22e-9 * 10e-9))  # 1070.2 Hz, closed form
Q = math.sqrt(10e3 * 10e3 * 22e-9 * 10e-9) / (10e-9 * (10e3 + 10e3))  # 0.7416, closed form


async def wait_idle(pilot, screen) -> None:
    """Wait for the pause after typing and for the jobs of the repair screen."""
    await pilot.pause(0.05)
    for _ in range(400):
        if screen.idle:
            break
        await pilot.pause(0.05)
    assert screen.idle, "the repair screen's jobs did not finish"
    await pilot.pause()


async def open_repair(pilot, app) -> RepairScreen:
    await settle(pilot, app)
    await pilot.press("m")
    await pilot.pause()
    assert isinstance(app.screen, ConfirmScreen)
    assert "discharge" in app.screen.body.lower() and "mains" in app.screen.body
    await pilot.press("y")
    await pilot.pause()
    screen = app.screen
    assert isinstance(screen, RepairScreen) and screen.confirmed
    return screen


async def type_marked(pilot, screen, values=MARKED) -> None:
    """Type each value into its field, as a person would (focus, then keys)."""
    for name, text in values.items():
        screen.query_one(f"#r-pos-{name}", Input).focus()
        await pilot.press("ctrl+u", *text)
    await wait_idle(pilot, screen)


async def test_cautions_first_and_no_goes_back(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("m")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        assert "Repair mode" in app.screen.question
        await pilot.press("n")
        await pilot.pause()
        assert type(app.screen).__name__ == "MainScreen"


async def test_values_give_f0_q_and_the_response(stock_copy):
    """f0 and Q against the closed forms; the plot against the core's analysis."""
    import numpy as np

    from picker.repair.analyse import analyse_marked
    from picker.repair.marked import parse_stage

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_repair(pilot, app)
        await type_marked(pilot, screen)
        assert screen.analysis is not None
        assert math.isclose(screen.analysis["f0_hz"], F0_HZ, rel_tol=1e-9)
        assert math.isclose(screen.analysis["q"], Q, rel_tol=1e-9)
        text = str(screen.query_one("#r-analysis").render())
        assert "f0 1.07 kHz, Q 0.7416, gain 1" in text
        assert "R1=10k/5% assumed" in text  # no tolerance typed: the default, said so
        assert "within tolerance" in text and "-3 dB corner" in text
        core = analyse_marked(
            [parse_stage("sallen-key-lowpass", [f"{k}={v}" for k, v in MARKED.items()])]
        )
        plot = screen.query_one(ResponsePlot)
        assert np.allclose(plot.freqs, core.response.freqs_hz)
        assert np.allclose(plot.mag_db, core.response.magnitude_db)
        # the standard second-order low-pass w0^2 / (s^2 + s w0/Q + w0^2) at f0: -20 log10 Q
        # (the magnitude there is Q; closed form), the phase -90 degrees
        i = int(np.argmin(np.abs(np.array(plot.freqs) - F0_HZ)))
        f = plot.freqs[i]
        w, w0 = 2 * math.pi * f, 2 * math.pi * F0_HZ
        h = w0**2 / complex(w0**2 - w**2, w * w0 / Q)
        assert math.isclose(plot.mag_db[i], 20 * math.log10(abs(h)), abs_tol=1e-6)
        assert math.isclose(plot.phase_deg[i], math.degrees(np.angle(h)), abs_tol=1e-6)
        assert "magnitude, dB" in str(plot.render())


async def test_tolerances_and_gbw_are_read(stock_copy):
    """Typed tolerances replace the assumed ones; a GBW adds the op-amp shift."""
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_repair(pilot, app)
        await type_marked(pilot, screen, {k: v + "/1%" for k, v in MARKED.items()})
        screen.query_one("#r-gbw", Input).focus()
        await pilot.press(*"1MHz")
        await wait_idle(pilot, screen)
        text = str(screen.query_one("#r-analysis").render())
        assert "assumed" not in text and "R1=10k/1%" in text
        # every piece at 1 %: f0 ~ 1/sqrt(R1 R2 C1 C2) moves at most by 1/0.99^2 - 1
        # = +2.03 % and 1/1.01^2 - 1 = -1.97 % (closed form above)
        assert "(-1.97 % .. +2.03 %)" in text
        assert "op amp of GBW 1 MHz moves f0" in text


async def test_bad_values_are_named_and_nothing_breaks(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_repair(pilot, app)
        await type_marked(pilot, screen, {**MARKED, "R2": "10q"})
        message = str(screen.query_one("#r-msg-R2").render())
        assert message.startswith("error: R2=10q") and "'10q'" in message
        assert screen.analysis is None
        assert "waiting" in str(screen.query_one("#r-analysis").render())
        await type_marked(pilot, screen, {"R2": "10k/150%"})
        assert "tolerance must lie in 0% .. 100%" in str(screen.query_one("#r-msg-R2").render())
        await type_marked(pilot, screen, {"R2": "10k"})
        screen.query_one("#r-gbw", Input).focus()
        await pilot.press(*"fast")
        await wait_idle(pilot, screen)
        assert str(screen.query_one("#r-gbw-msg").render()).startswith("error: GBW:")
        screen.query_one("#r-gbw", Input).value = ""
        screen.query_one("#r-failed", Select).value = "C1"
        screen.query_one("#r-free", Input).focus()
        await pilot.press(*"R9")
        await wait_idle(pilot, screen)
        free = str(screen.query_one("#r-free-msg").render())
        assert free.startswith("error:") and "'R9'" in free and "R1 (" in free
        assert screen.substitution is None


async def test_substitutes_are_the_core_ranking_and_build_takes_them(stock_copy):
    """The table is picker.repair.substitute's ranking; building option 1 takes the
    22n from drawer C2 (qty 4 -> 3), and undo puts the file back byte for byte."""
    from picker.building import undo_last
    from picker.repair.marked import parse_stage
    from picker.repair.substitute import substitute
    from stock.file import load

    before = stock_copy.read_bytes()
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_repair(pilot, app)
        await type_marked(pilot, screen)
        screen.query_one("#r-failed", Select).value = "C1"
        await wait_idle(pilot, screen)
        table = screen.query_one("#r-options", DataTable)
        stage = parse_stage("sallen-key-lowpass", [f"{k}={v}" for k, v in MARKED.items()])
        core = substitute(stage, load(stock_copy), part="C1", top=8)
        assert table.row_count == len(core.options) == 8
        assert [o.score for o in screen.substitution.options] == [o.score for o in core.options]
        rows = [[str(c) for c in table.get_row_at(i)] for i in range(table.row_count)]
        assert rows[0][1:] == ["0 %", "0 %", "0 %", "0 %", "1", "C1 22n [C2]"]
        # 10n || 10n = 20n for 22n: f0 ~ C1^-1/2 and Q ~ C1^1/2 (closed forms above):
        # sqrt(22/20) - 1 = +4.88 %, sqrt(20/22) - 1 = -4.65 %
        assert rows[1][2:4] == ["+4.88 %", "-4.65 %"] and rows[1][-1] == "C1 20n = 10n || 10n [C1]"
        table.focus()
        await pilot.press("b")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        assert "option 1" in app.screen.question and "inventory.toml" in app.screen.question
        assert "C1 22n [C2]" in app.screen.question and "C2" in app.screen.body
        assert "Discharge" in app.screen.body
        await pilot.press("n")
        await pilot.pause()
        assert stock_copy.read_bytes() == before
        await pilot.press("enter")  # enter on the row asks too
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.press("y")
        await wait_idle(pilot, screen)
        assert str(screen.query_one("#r-status").render()).startswith("built: 1 item(s)")
        after = load(stock_copy)
        assert [c.qty for c in after.capacitors] == [8, 3, 3]  # 22n: 4 -> 3
        assert [c.qty for c in screen.stock.capacitors] == [8, 3, 3]  # read again here
        await pilot.press("ctrl+g")
        await settle(pilot, app)
        main = app.screen
        assert type(main).__name__ == "MainScreen"
        assert [c.qty for c in main.stock.capacitors] == [8, 3, 3]  # and on the main screen
    undo_last(stock_copy)
    assert stock_copy.read_bytes() == before


async def test_another_circuit_brings_its_positions(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_repair(pilot, app)
        screen.query_one("#r-topology", Select).value = "mfb-bandpass"
        await wait_idle(pilot, screen)
        form = screen.query_one("#r-form")
        assert form.names == ["R1", "R2", "R3", "C1", "C2"]
        assert screen.query("#r-pos-R3") and not screen.query("#r-pos-RA")
        failed = screen.query_one("#r-failed", Select)
        assert [str(v) for _, v in failed._options if v is not Select.NULL] == form.names


async def test_opened_before_the_file_is_read_it_gets_the_stock(stock_copy):
    """m pressed in the first moment, before the main screen has read the stock file:
    once the file is read the repair screen has the stock and lists substitutes (it
    used to keep "no stock loaded" for good)."""
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        main = app.screen
        main.stock = None
        screen = RepairScreen(main.stock_path, None)  # as open_repair does before the read
        await app.push_screen(screen)
        await pilot.pause()
        await pilot.press("y")  # the cautions
        await pilot.pause()
        await type_marked(pilot, screen)
        screen.query_one("#r-failed", Select).value = "C1"
        await wait_idle(pilot, screen)
        table = screen.query_one("#r-options", DataTable)
        if screen.stock is None:
            assert table.row_count == 0
            assert "not read" in str(screen.query_one("#r-sub-status").render())
        main.read_stock()
        await wait_idle(pilot, screen)
        assert screen.stock is not None
        assert [str(c) for c in table.get_row_at(0)][-1] == "C1 22n [C2]"
