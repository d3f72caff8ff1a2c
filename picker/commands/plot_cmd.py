"""``picker plot DESIGN.toml --svg FILE [--png FILE] [--csv [FILE]] [--step]``.

Magnitude and phase of a saved design against log frequency, with the target corner,
the -3 dB point and the tolerance band; the step response with ``--step``; the curve as
CSV. numpy and matplotlib load inside ``run`` only. Contracts: docs/outputs.md.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "plot",
        help="response of a saved design as a figure (SVG, PNG) or CSV",
        description="Draw the magnitude (dB) and phase (degrees) of a saved design against "
        "log frequency, with the target corner, the -3 dB point and the band its parts' "
        "tolerances allow; or write the response as CSV.",
        epilog="examples:\n  picker plot d.toml --svg d.svg\n"
        "  picker plot d.toml --png d.png --step\n"
        "  picker plot d.toml --csv > d.csv\n  picker plot d.toml --csv d.csv --svg d.svg",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("design", metavar="DESIGN.toml", help="a design saved with picker design --save")
    p.add_argument("--svg", metavar="FILE", help="write the figure as SVG")
    p.add_argument("--png", metavar="FILE", help="write the figure as PNG")
    p.add_argument(
        "--csv",
        metavar="FILE",
        nargs="?",
        const="-",
        help="write the response as CSV: frequency_hz, magnitude_db, phase_deg and the "
        "tolerance band (to standard output without FILE)",
    )
    p.add_argument("--step", action="store_true", help="add the step response to the figure")
    p.set_defaults(run=run)


def _target(path_text: str, design, what: str) -> Path:
    """Where to write ``what``: refuse a folder, the design file and its stock file."""
    from picker.errors import DesignError

    path = Path(path_text)
    if path.is_dir():
        raise DesignError(f"{path}: is a folder; give a file name for the {what}")
    for other, name in ((design.path, "the design file"), (design.stock_path, "its stock file")):
        try:
            same = other is not None and path.exists() and path.samefile(other)
        except OSError:
            same = False
        if same:
            raise DesignError(f"{path}: is {name}; the {what} is not written over it")
    return path


def run(args) -> int:
    from picker.errors import DesignError
    from picker.export import load_design

    if not (args.svg or args.png or args.csv):
        raise DesignError("say what to write: --svg FILE, --png FILE or --csv [FILE]")
    design = load_design(args.design)
    outputs = [
        (fmt, _target(name, design, fmt.upper()))
        for fmt, name in (("svg", args.svg), ("png", args.png))
        if name
    ]
    csv_path = None
    if args.csv and args.csv != "-":
        csv_path = _target(args.csv, design, "CSV")
    from picker.export.response_data import response_csv, response_data

    data = response_data(design)
    if args.csv:
        text = response_csv(data)
        if csv_path is None:
            sys.stdout.write(text)
        else:
            from picker.export.design_file import write_atomic

            write_atomic(csv_path, text.encode("utf-8"))
            print(f"picker: wrote the response to {csv_path}", file=sys.stderr)
    if outputs:
        from picker.commands.outputs_cmd import design_heading
        from picker.export.plot import draw, write_figure

        step = None
        if args.step:
            from picker.analysis.step_delay import step_view

            step = step_view(design)
        title = f"{Path(args.design).name}: {design_heading(design)}"
        fig, _ = draw(data, title=_wrap(title), step=step)
        for fmt, path in outputs:
            write_figure(fig, path, fmt)
            print(f"picker: wrote the {fmt.upper()} figure to {path}", file=sys.stderr)
    return 0


def _wrap(title: str, width: int = 80) -> str:
    import textwrap

    return "\n".join(textwrap.wrap(title, width)) or title
