"""``picker analyse`` and ``picker substitute``: repair mode (docs/repair.md).

    picker analyse TOPOLOGY NAME=VALUE... [--gbw F] [--json]     (also: analyze)
    picker analyse --list
    picker analyse --stage "TOPOLOGY NAME=VALUE ..." --stage ...
    picker analyse --design DESIGN.toml
    picker substitute TOPOLOGY NAME=VALUE... --part NAME [--free NAME...] [--stock FILE]
                      [--top N] [--json] [--save FILE [--pick N]] [--allow-polarized]

Exit codes: 0 done; 1 the stock holds nothing that can refill the part; 2 bad input
(unknown topology, position or value). Heavy modules load inside the ``run`` functions.
"""

from __future__ import annotations

import argparse
import sys

ANALYSE_EXAMPLES = """\
examples:
  picker analyse --list
  picker analyse sallen-key-lowpass R1=10k R2=10k C1=22n C2=10n
  picker analyse mfb-bandpass R1=15k/1% R2=680R R3=150k C1=10n C2=10n --gbw 1MHz
  picker analyse --stage "sallen-key-lowpass R1=10k R2=10k C1=22n C2=10n" \\
                 --stage "non-inverting-lowpass R1=10k C1=15n"
  picker analyse --design d.toml --json

A value is RKM or SI (10k, 4k7, 2n2, 0.1u, 1e-8); a tolerance follows a slash
(R1=10k/1%). Without one, 5 % for resistors and 10 % for capacitors is assumed (the
stock file's defaults) and the report says so."""

SUBSTITUTE_EXAMPLES = """\
examples:
  picker substitute sallen-key-lowpass R1=10k R2=10k C1=22n C2=10n --part C1
  picker substitute sallen-key-lowpass R1=10k R2=10k C1=22n C2=10n --part C1 \\
                    --free C2 --top 8 --save fix.toml
  picker bom fix.toml && picker build fix.toml --stock inventory.toml

The marked values define what the stage should do; only --part and --free positions
are refilled, from the stock (singles, series or parallel pairs, quantities honoured),
ranked by the worst error of f0, Q and gain against the marked stage."""


def _epilog(examples: str) -> str:
    from picker.repair.safety import help_epilog

    return examples + "\n\n" + help_epilog()


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "analyse",
        aliases=["analyze"],
        help="what a stage does as built: f0, Q, gain, response, tolerance",
        description="Analyse a filter stage from the values read off its parts: f0, Q and "
        "gain, the magnitude and phase response, the extremes within the parts' "
        "tolerances and, with --gbw, what the op amp's gain-bandwidth does to it.",
        epilog=_epilog(ANALYSE_EXAMPLES),
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("topology", nargs="?", metavar="TOPOLOGY", help="circuit (see --list)")
    p.add_argument("values", nargs="*", metavar="NAME=VALUE", help="one per position")
    p.add_argument("--list", action="store_true", help="name every circuit with its positions")
    p.add_argument(
        "--stage",
        action="append",
        default=[],
        metavar='"TOPOLOGY NAME=VALUE ..."',
        help="one stage of a cascade, in signal order (repeat it)",
    )
    p.add_argument("--design", metavar="DESIGN.toml", help="analyse a saved design's stages")
    p.add_argument("--gbw", metavar="F", help="op amp gain-bandwidth, e.g. 1MHz")
    p.add_argument("--no-plot", action="store_true", help="leave the response plots out")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(run=run_analyse)

    p = subparsers.add_parser(
        "substitute",
        help="stock parts that replace a failed one and keep the stage's response",
        description="Find parts in the stock file that replace a failed part of a stage "
        "so that its f0, Q and gain stay what the marked values give.",
        epilog=_epilog(SUBSTITUTE_EXAMPLES),
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("topology", metavar="TOPOLOGY", help="circuit (picker analyse --list)")
    p.add_argument("values", nargs="+", metavar="NAME=VALUE", help="the marked values")
    p.add_argument("--part", required=True, metavar="NAME", help="the failed position")
    p.add_argument(
        "--free",
        nargs="+",
        action="extend",
        default=[],
        metavar="NAME",
        help="other positions that may be changed too (e.g. the partner of a matched pair)",
    )
    p.add_argument("--top", type=int, default=5, metavar="N", help="options shown (default 5)")
    p.add_argument("--singles", action="store_true", help="one piece per position, no pairs")
    p.add_argument(
        "--allow-polarized",
        action="store_true",
        help="let polarized capacitors (electrolytic, tantalum) fill positions",
    )
    p.add_argument("--save", metavar="DESIGN.toml", help="save an option for bom and build")
    p.add_argument("--pick", type=int, default=1, metavar="N", help="option to save (default 1)")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.add_argument(
        "--stock", metavar="FILE", default=argparse.SUPPRESS, help="stock file (as picker --stock)"
    )
    p.set_defaults(run=run_substitute)


def _print(renderable) -> None:
    from rich.console import Console

    Console(width=min(Console().width, 100), highlight=False).print(renderable)


def _list() -> int:
    from picker.repair.marked import listing

    for key, what, positions in listing():
        print(f"{key}: {what}")
        for name, kind, role in positions:
            print(f"    {name:<3} {kind:<9} {role}")
    return 0


def _analyse_items(args):
    """(stages as analysable pieces) from the positional stage, --stage or --design."""
    from pathlib import Path

    from picker.errors import DesignError
    from picker.repair.analyse import design_pieces, marked_pieces
    from picker.repair.marked import parse_stage, parse_stage_text

    design = args.design
    topo = args.topology
    if design is None and topo and topo.endswith(".toml") and Path(topo).is_file():
        design, topo = topo, None
        if args.values:
            raise DesignError(f"{design}: a saved design takes no NAME=VALUE after it")
    sources = sum(bool(x) for x in (topo, args.stage, design))
    if sources != 1:
        raise DesignError(
            "give one of: TOPOLOGY NAME=VALUE..., --stage (repeated) or --design FILE"
            + ("" if sources else "; picker analyse --list names the circuits")
        )
    if design:
        from picker.export import load_design

        return design_pieces(load_design(design))
    stages = [parse_stage(topo, args.values)] if topo else [parse_stage_text(t) for t in args.stage]
    out = []
    for st in stages:
        sp, assumed = marked_pieces(st)
        out.append((st.topology, sp, assumed))
    return out


def run_analyse(args) -> int:
    if args.list:
        return _list()
    from picker.repair.analyse import analyse
    from stock.values import parse_frequency

    items = _analyse_items(args)
    gbw = None if args.gbw is None else parse_frequency(args.gbw)
    result = analyse(items, gbw_hz=gbw)
    if args.json:
        import json

        from picker.repair.records import analysis_json

        print(json.dumps(analysis_json(result), indent=2))
        return 0
    from picker.repair.report import AnalysisReport

    _print(AnalysisReport(result, plot=not args.no_plot))
    return 0


def run_substitute(args) -> int:
    from pathlib import Path

    from picker.commands.common import load_stock
    from picker.errors import DesignError
    from picker.repair.marked import parse_stage

    stage = parse_stage(args.topology, args.values)
    if args.top < 1:
        raise DesignError(f"--top {args.top}: give at least 1")
    if args.pick < 1 or args.pick > args.top:
        raise DesignError(f"--pick {args.pick}: choose 1..{args.top} (the --top options)")
    stock = load_stock(getattr(args, "stock", None))
    if args.save:
        from picker.export.design_file import check_save_target

        check_save_target(Path(args.save), stock)
    from picker.repair.substitute import save_option, substitute

    sub = substitute(
        stage,
        stock,
        part=args.part,
        free=args.free,
        allow_polarized=args.allow_polarized,
        singles=args.singles,
        top=args.top,
    )
    if args.save:
        save_option(args.save, sub, stock, pick=args.pick)
        print(f"picker: saved option {args.pick} to {args.save}", file=sys.stderr)
    if args.json:
        import json

        from picker.repair.records import substitution_json

        print(json.dumps(substitution_json(sub), indent=2))
        return 0
    from picker.repair.report import SubstitutionReport

    _print(SubstitutionReport(sub))
    return 0
