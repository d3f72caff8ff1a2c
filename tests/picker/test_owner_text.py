"""Owner text is data, never markup (docs/cli.md): a drawer, note or name that reads like
rich markup (``[bold]``, ``[/]``, ``shelf [top]``) or an emoji code shows exactly as
written in every table, report and pick list, and control characters (ESC of a CSI or
OSC sequence, BEL, C1 CSI 0x9b, a bidi override) are shown escaped, never sent raw.

Rendered with rich into text (the CLI's own consoles on captured output, and
``Console(file=StringIO())``) and compared as text.
"""

from __future__ import annotations

import io

import pytest
from rich.console import Console

from picker.report.owner import owner_text, visible
from tests.helpers import run_cli as run
from tests.helpers import write_stock

# TOML basic strings: \u001b is ESC, \u0007 BEL, \u009b the C1 CSI, \u202e a bidi override
STOCK = """\
[stock]
name = "bench [bold]one[/]"

[[resistor]]
value = "10k"
qty = 6
tolerance = "1%"
location = "shelf [top]"
note = "[red]not red[/]"

[[resistor]]
value = "22k"
qty = 6
tolerance = "1%"
location = "[/]"

[[capacitor]]
value = "10n"
qty = 6
tolerance = "5%"
dielectric = "C0G"
location = "tin \\u001b]0;retitled\\u0007 :warning:"

[[capacitor]]
value = "22n"
qty = 6
tolerance = "5%"
dielectric = "C0G"
location = "box \\u001b[2J\\u009b31m \\u202eabc"

[[opamp]]
name = "[bold]quad amp[/]"
gbw = "3MHz"
channels = 4
qty = 1
location = "tray [b]"
"""

SHOWN = [
    "shelf [top]",
    "[/]",
    "tin \\x1b]0;retitled\\x07 :warning:",
    "box \\x1b[2J\\x9b31m \\u202eabc",
    "[bold]quad amp[/]",
]
RAW = ("\x1b", "\x07", "\x9b", "\u202e", "⚠")


@pytest.fixture
def stock_file(tmp_path):
    return write_stock(tmp_path, STOCK)


def _no_raw(text: str) -> None:
    for ch in RAW:
        assert ch not in text, repr(ch)


@pytest.mark.parametrize(
    "text, shown",
    [
        ("shelf [top]", "shelf [top]"),
        ("[bold]x[/]", "[bold]x[/]"),
        ("a\x1b[31mb", "a\\x1b[31mb"),  # CSI (ECMA-48)
        ("t\x1b]0;title\x07", "t\\x1b]0;title\\x07"),  # OSC, ended by BEL
        ("c1 \x9b", "c1 \\x9b"),  # C1 control CSI (ECMA-48 8.3.16)
        ("two\nlines\ttab\r", "two\\nlines\\ttab\\r"),
        ("del \x7f nul \x00", "del \\x7f nul \\x00"),
        ("rtl \u202e lsep \u2028", "rtl \\u202e lsep \\u2028"),
        ("Ω µ ± 4k7", "Ω µ ± 4k7"),  # printable text is kept as it is
        (None, ""),
    ],
)
def test_visible_escapes_controls_only(text, shown):
    assert visible(text) == shown


def test_owner_text_is_never_markup():
    out = io.StringIO()
    console = Console(file=out, width=80, color_system=None)
    console.print(owner_text("[bold]shelf [top][/] :warning:"))
    assert out.getvalue() == "[bold]shelf [top][/] :warning:\n"


def test_stock_list_shows_owner_text_as_written(capsys, stock_file, monkeypatch):
    monkeypatch.setenv("COLUMNS", "200")  # whole drawer names on one line
    code, out, err = run(capsys, "stock", "list", str(stock_file))
    assert code == 0, err
    for s in ["bench [bold]one[/]", "[red]not red[/]", *SHOWN]:
        assert s in out, s
    _no_raw(out)


def test_stock_check_warnings_escape_controls(capsys, tmp_path):
    path = tmp_path / "inventory.toml"
    # the same value and drawer twice: a warning that quotes the drawer
    twice = '[[resistor]]\nvalue = "10k"\nqty = 1\nlocation = "bin \\u001b[2J"\n'
    path.write_text(twice + "\n" + twice, encoding="utf-8")
    code, out, err = run(capsys, "stock", "check", str(path))
    assert code == 0, err
    _no_raw(out + err)


def test_design_report_bom_pick_list_and_netlist(capsys, stock_file, tmp_path, monkeypatch):
    monkeypatch.setenv("COLUMNS", "200")  # whole drawer names on one line
    design = tmp_path / "d.toml"
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--order",
        "2",
        "--trials",
        "100",
        "--stock",
        str(stock_file),
        "--save",
        str(design),
    )
    assert code == 0, err
    _no_raw(out + err)
    assert "[bold]quad amp[/]" in out  # schematic line and the budget panel's title
    assert "op amp: [bold]quad amp[/]" in out
    used = [s for s in SHOWN if s in out]
    assert len(used) >= 3, out  # the drawers of the parts it took, as written

    code, bom, err = run(capsys, "bom", str(design))
    assert code == 0, err
    _no_raw(bom + err)
    from picker.export import load_design

    saved = load_design(design)
    drawers = {p.location for _, _, _, p in saved.parts()} | {saved.opamp.location}
    for loc in drawers:
        assert bom.count(visible(loc)) >= 2, loc  # in the BOM and in the pick list

    code, net, err = run(capsys, "netlist", str(design))
    assert code == 0, err
    _no_raw(net)
    # every line is a comment, an element, or a control line: a drawer never starts one
    for line in net.splitlines():
        assert not line.startswith(("retitled", "31m")), line


def test_report_renderables_into_stringio(stock_file):
    from picker.export import load_design, pick_list  # noqa: F401
    from picker.filters import plan_stages
    from picker.report.design import DesignReport
    from picker.search import search
    from stock.file import load

    stock = load(stock_file)
    result = search(stock, plan_stages("lowpass", order=2, fc_hz=1e3), top=2, for_people=True)
    out = io.StringIO()
    Console(file=out, width=200, color_system=None).print(DesignReport(result, title="t"))
    text = out.getvalue()
    _no_raw(text)
    assert sum(s in text for s in SHOWN) >= 3


def test_pick_table_and_bom_table_show_drawers_as_written():
    from picker.commands.outputs_cmd import bom_table, pick_table
    from picker.export.bom import BomRow
    from picker.export.picklist import PickGroup

    rows = (
        BomRow("resistor", "10k", "shelf [top]", 2, "R1, R2", "1%"),
        BomRow("capacitor", "10n", "tin \x1b]0;x\x07", 1, "C1", "5%"),
    )
    out = io.StringIO()
    console = Console(file=out, width=120, color_system=None)
    console.print(bom_table(rows))
    console.print(pick_table([PickGroup(r.location, (r,)) for r in rows]))
    text = out.getvalue()
    assert text.count("shelf [top]") == 2 and text.count("tin \\x1b]0;x\\x07") == 2
    _no_raw(text)
