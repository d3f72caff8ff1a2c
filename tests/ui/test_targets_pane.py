"""The targets pane at 80x24: rank by yield, the order from a specification, the error
budget's own inputs, the search's outcome and progress under the form (Pilot tests)."""

from __future__ import annotations

import io

from rich.console import Console
from test_flows import SIZE, settle
from textual.widgets import DataTable, Input, Select, Static

from picker.ui import backend
from picker.ui.app import PickerApp
from picker.ui.offload import Lane
from picker.ui.targets_form import TEXT_FIELDS, Targets


def shown(app, selector: str) -> str:
    return str(app.screen.query_one(selector).render())


async def type_into(pilot, app, name: str, text: str) -> None:
    """Focus a field of the form, clear it and type ``text`` (keys, as a person would)."""
    app.screen.query_one(f"#t-{name}", Input).focus()
    await pilot.press("ctrl+u", *text)


async def test_rank_has_three_modes_and_yield_shows_each_candidates_yield(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        rank = app.screen.query_one("#t-rank", Select)
        rank.focus()
        await pilot.press("enter")  # the list opens on "pieces"
        await pilot.pause()
        await pilot.press("down", "down", "enter")  # pieces, error, yield
        await settle(pilot, app, 0.5)
        assert rank.value == "yield" and app.screen.targets.rank == "yield"
        table = app.screen.query_one("#m-table", DataTable)
        assert table.row_count >= 1
        notes = [str(table.get_row_at(i)[4]) for i in range(table.row_count)]
        assert all(n.startswith("yield ") and "%" in n for n in notes), notes
        # the rows' order is the yield ranking's: rank 1 is the highest Monte Carlo
        # yield of those confirmed (docs/yield.md), here within one standard error
        kind, result = backend.search_job(app.screen.stock, app.screen.targets)
        assert kind == "done"
        best = result.yields[0]
        assert all(best.value >= y.value - 3 * (y.std_error or 0) for y in result.yields)


async def test_stopband_and_attenuation_set_the_order_and_the_pane_says_what_it_gives(
    stock_copy,
):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        await type_into(pilot, app, "stopband", "4k")
        await type_into(pilot, app, "attenuation", "40")
        await pilot.pause()
        # the order field still says 2: both set the order, as on the command line
        assert "both set the order" in shown(app, "#m-order")
        await type_into(pilot, app, "order", "")
        await settle(pilot, app, 0.5)
        # Butterworth at 4 fc: 10 log10(1 + 4^(2n)) >= 40 dB first at n = 4 (48.2 dB);
        # scipy.signal.buttord(1, 4, 3.0103, 40, analog=True) also gives 4
        assert "from the stopband: order 4: 48.2 dB at 4 kHz, 40 dB asked" in shown(app, "#m-order")
        assert app.screen.targets.order == 4
        assert "order 4" in shown(app, "#m-status")  # the search ran for order 4
        # 90 dB at 2 fc takes order 15 (scipy.signal.buttord(1, 2, 3.0103, 90,
        # analog=True)); order 8 gives 10 log10(1 + 2^16) = 48.2 dB there
        await type_into(pilot, app, "attenuation", "90")
        await type_into(pilot, app, "stopband", "2k")
        await pilot.pause()
        message = shown(app, "#m-stopband")
        assert message.startswith("error: 90 dB at 2 kHz") and "takes order 15" in message
        assert "which gives 48.2 dB there" in message
        assert "--" not in message


async def test_the_budget_inputs_reach_the_chosen_candidates_budget(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)

        async def budget_text() -> str:
            await pilot.press("f3", "enter")  # rank 1 in the chosen pane
            await settle(pilot, app)
            console = Console(width=200, record=True, file=io.StringIO())
            console.print(app.screen.query_one("#c-budget", Static).content)
            return console.export_text()

        before = await budget_text()
        assert "No peak output voltage given" in before
        await pilot.press("f2")
        await type_into(pilot, app, "vout", "5")
        await type_into(pilot, app, "supply", "12")
        await type_into(pilot, app, "temp", "-20..85")
        await settle(pilot, app, 0.5)
        targets = app.screen.targets
        assert (targets.vout_peak, targets.supply, targets.temp) == (5.0, 12.0, (-20.0, 85.0))
        after = await budget_text()
        assert "No peak output voltage given" not in after
        assert "12 V supply" in after  # the small stock's capacitor lines give no rating


def test_the_budget_gets_the_forms_inputs_as_the_cli_gives_its_options(stock_copy):
    """The same candidate's budget from the form's targets and from the CLI's options."""
    from picker.budget import budget
    from picker.cli import build_parser
    from picker.commands.design_cmd import parse_request

    stock = backend.load_stock(stock_copy)
    candidate = backend.search_job(stock, Targets())[1].candidates[0]
    argv = ["design", "lowpass", "--fc", "1k", "--window", "2%", "--temp", "-20..85"]
    argv += ["--supply", "12", "--vout-peak", "5"]
    cli = budget(candidate, **parse_request(build_parser().parse_args(argv))["_budget"])
    form = Targets(window=0.02, temp=(-20.0, 85.0), supply=12.0, vout_peak=5.0)
    ui = backend.detail_job(candidate, form)["budget"]
    assert ui.warnings == cli.warnings
    assert ui.monte_carlo.yield_ == cli.monte_carlo.yield_


async def test_no_design_reason_names_the_form_fields(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        await type_into(pilot, app, "r_max", "10k")  # the bounds, not the parts, bind
        await type_into(pilot, app, "c_max", "22n")
        await type_into(pilot, app, "fc", "100")  # 1 / (2 pi 10k 22n) = 723 Hz is the lowest
        await settle(pilot, app, 0.5)
        outcome = shown(app, "#t-outcome")
        assert outcome.startswith("search: no design:"), outcome
        assert "R max" in outcome and "--" not in outcome


async def test_progress_shows_under_the_form_and_s_still_stops(stock_copy, monkeypatch):
    """The progress lines of a real search reach panes 2 and 3; s stops the search."""
    import picker.commands.design_progress as design_progress

    monkeypatch.setattr(design_progress, "DELAY", 0.0)  # every report, from the start
    monkeypatch.setattr(backend, "PROGRESS_EVERY_S", 0.0)

    def run_in_thread(self, fn, stock, targets, stop, on_progress=None):
        lines: list[str] = []

        def report(line: str) -> None:
            lines.append(line)
            if len(lines) == 1:
                on_progress(line)
                assert stop.wait(30)  # the search holds on until s is pressed

        return fn(stock, targets, stop, progress=report)

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        monkeypatch.setattr(Lane, "run", run_in_thread)
        await pilot.press("2")
        await type_into(pilot, app, "order", "4")
        for _ in range(400):
            if "(s outside a text field: stop)" in shown(app, "#t-outcome") and "stage" in (
                shown(app, "#t-outcome")
            ):
                break
            await pilot.pause(0.01)
        outcome = shown(app, "#t-outcome")
        assert outcome.startswith("searching: stage 1, "), outcome
        assert shown(app, "#m-status").startswith("[busy] searching: stage 1, ")
        await pilot.press("f3", "s")
        await settle(pilot, app)
        assert shown(app, "#t-outcome").startswith("search: stopped:")


async def test_the_form_scrolls_and_the_focused_field_stays_in_view(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        last = list(TEXT_FIELDS)[-1]
        for _ in range(40):  # tab through the form, down to its last field
            if app.focused is app.screen.query_one(f"#t-{last}"):
                break
            await pilot.press("tab")
        field = app.screen.query_one(f"#t-{last}", Input)
        assert app.focused is field
        await pilot.pause()
        region = field.region
        assert 1 <= region.y < SIZE[1] - 3  # below the bar, above the two lines and footer
        assert app.screen.get_widget_at(region.x + 1, region.y)[0] is field
        for line in ("#t-status", "#t-outcome"):  # the state lines stay in view
            assert app.screen.query_one(line).region.bottom <= SIZE[1] - 1


async def test_a_yield_search_names_rank_1s_yield_under_the_form(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        app.screen.query_one("#t-rank", Select).focus()
        await pilot.press("enter")
        await pilot.pause()
        await pilot.press("down", "down", "enter")
        await settle(pilot, app, 0.5)
        outcome = shown(app, "#t-outcome")
        assert "; rank 1 yield " in outcome and "%" in outcome, outcome
        assert not app.screen.query_one("#t-status").display  # no empty row when all read
