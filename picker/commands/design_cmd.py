"""``picker design TYPE [options]``: design a filter from the parts on hand (docs/cli.md).

Exit codes: 0 done; 1 no design is possible from this stock (NoDesignError, the
message says what is missing); 2 bad input. Heavy modules load inside ``run``.
"""

from __future__ import annotations

import argparse
import sys

from picker.commands import design_buy, design_extras

TYPES = ("lowpass", "highpass", "bandpass")


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "design",
        help="design a filter from the parts on hand",
        description="Design an active filter from the parts in the stock file: ranked "
        "candidates with drawer locations, the parts/precision trade-off and "
        "the error budget of the best one.",
    )
    p.add_argument("type", choices=TYPES, metavar="TYPE", help="lowpass, highpass or bandpass")
    p.add_argument(
        "--fc",
        required=True,
        metavar="F",
        help="corner frequency (band-pass: centre), e.g. 1k, 1kHz, 2.5 MHz",
    )
    p.add_argument("--gain", default="1", metavar="G", help="overall gain magnitude (default 1)")
    p.add_argument("--order", default=None, metavar="N", help="filter order 1..8 (default 2)")
    p.add_argument(
        "--response",
        default=None,
        choices=("butterworth", "bessel", "chebyshev"),
        help="shape of the passband (default butterworth)",
    )
    p.add_argument(
        "--ripple", default=None, metavar="DB", help="Chebyshev ripple in dB (default 1)"
    )
    p.add_argument(
        "--q", default=None, metavar="Q", help="Q of one second-order stage (band-pass: required)"
    )
    p.add_argument(
        "--topology",
        choices=("inverting", "non-inverting", "sallen-key", "mfb"),
        default=None,
        help="circuit family of the stages",
    )
    p.add_argument("--singles", action="store_true", help="one piece per position, no pairs")
    p.add_argument(
        "--allow-polarized",
        action="store_true",
        help="let polarized capacitors (electrolytic, tantalum) fill positions",
    )
    for name, default in (("r-min", "1k"), ("r-max", "1M"), ("c-min", "100p"), ("c-max", "10u")):
        p.add_argument(
            f"--{name}",
            default=default,
            metavar="V",
            help=f"bound on each position's combined value (default {default})",
        )
    p.add_argument(
        "--rank",
        choices=("pieces", "error", "yield"),
        default="pieces",
        help="what rank 1 is: pieces (default) = the fewest pieces within --max-error; "
        "error = the smallest worst error; yield = the highest Monte Carlo yield inside "
        "--window",
    )
    p.add_argument(
        "--max-error",
        default="0.5%",
        metavar="P",
        help="precision goal of --rank pieces: worst error allowed, 0.5%% or 0.005 (default 0.5%%)",
    )
    p.add_argument(
        "--time-limit",
        default="10",
        metavar="S",
        help="seconds the search may take; past them the best found so far is shown, "
        "marked not proven (default 10)",
    )
    p.add_argument("--top", type=int, default=5, metavar="N", help="candidates (default 5)")
    p.add_argument(
        "--window", default="5%", metavar="W", help="yield window around each target (default 5%%)"
    )
    p.add_argument(
        "--trials", type=int, default=10000, metavar="N", help="Monte Carlo trials (default 10000)"
    )
    p.add_argument(
        "--temp",
        default="0..70",
        metavar="LO..HI",
        help="temperature span in degrees C (default 0..70)",
    )
    p.add_argument("--supply", default=None, metavar="V", help="total supply voltage")
    p.add_argument("--vout-peak", default=None, metavar="V", help="peak output voltage")
    p.add_argument(
        "--distribution",
        choices=("uniform", "normal"),
        default="uniform",
        help="Monte Carlo spread of each piece (normal: tolerance = 3 sigma)",
    )
    p.add_argument("--seed", type=int, default=0, metavar="N", help="Monte Carlo seed")
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.add_argument("--save", metavar="DESIGN.toml", help="save the chosen candidate")
    p.add_argument(
        "--pick", type=int, default=1, metavar="N", help="candidate to save (default 1, the best)"
    )
    p.add_argument(
        "--stock",
        metavar="FILE",
        default=argparse.SUPPRESS,
        help="stock file (as the top-level --stock)",
    )
    design_extras.register_options(p)  # --stopband, --attenuation, --show (docs/outputs.md)
    design_buy.register_options(p)  # --suggest, --buy-series, --buy-tolerance (docs/buying.md)
    p.set_defaults(run=run)


def parse_request(args) -> dict:
    """The targets and options as given, checked and in SI units.

    The rules are those of ``picker.targets``, shared with the terminal UI's form."""
    from picker.errors import DesignError
    from picker.targets import (
        TOP_MAX,
        TRIALS_MAX,
        check_targets,
        read_bound,
        read_count,
        read_frequency,
        read_gain,
        read_max_error,
        read_order,
        read_q,
        read_ripple,
        read_temp,
        read_time_limit,
        read_voltage,
        read_window,
    )

    req = {
        "type": args.type,
        "response": args.response or "butterworth",
        "order": None if args.order is None else read_order(args.order),
        "fc_hz": read_frequency(args.fc, "--fc"),
        "gain": read_gain(args.gain, "--gain"),
        "ripple_db": 1.0 if args.ripple is None else read_ripple(args.ripple),
        "q": read_q(args.q),
        "topology": args.topology,
        "singles": args.singles,
        "allow_polarized": args.allow_polarized,
        "bounds": {
            "r_min": read_bound(args.r_min, "resistor", "--r-min"),
            "r_max": read_bound(args.r_max, "resistor", "--r-max"),
            "c_min": read_bound(args.c_min, "capacitor", "--c-min"),
            "c_max": read_bound(args.c_max, "capacitor", "--c-max"),
        },
        "pick": args.pick,
        "rank": args.rank,
        "max_error": read_max_error(args.max_error),
        "time_limit_s": read_time_limit(args.time_limit),
    }
    b = req["bounds"]
    given = getattr(args, "stopband", None) is not None
    errors = check_targets(response_type=args.type, q=req["q"], q_from_spec=given, **b)
    if errors:
        raise DesignError("; ".join(errors.values()))
    read_count(args.top, "--top", 1, TOP_MAX)
    if args.pick < 1 or args.pick > args.top:
        raise DesignError(f"--pick {args.pick}: choose 1..{args.top} (the --top candidates)")
    read_count(args.trials, "--trials", 1, TRIALS_MAX)
    read_count(args.seed, "--seed", 0)
    req["_budget"] = {
        "trials": args.trials,
        "distribution": args.distribution,
        "window": read_window(args.window),
        "temp": read_temp(args.temp),
        "supply": None if args.supply is None else read_voltage(args.supply, "--supply"),
        "vout_peak": None
        if args.vout_peak is None
        else read_voltage(args.vout_peak, "--vout-peak"),
        "seed": args.seed,
    }
    req["_notes"] = _ignored(args, req)
    return req


def _ignored(args, req) -> list[str]:
    """Warnings for options the asked filter has no use for (they change nothing)."""
    out = []
    one_stage = args.type == "bandpass" or req["q"] is not None
    why = "a band-pass" if args.type == "bandpass" else "a stage with --q"
    if args.response is not None and one_stage:
        out.append(f"--response {args.response} is not used for {why} (its Q sets the shape)")
    if args.ripple is not None and (one_stage or req["response"] != "chebyshev"):
        has = why if one_stage else f"a {req['response']} response"
        out.append(f"--ripple is not used: {has} has no passband ripple (chebyshev has)")
    return out


def title_of(request: dict, stages: int) -> str:
    """One line saying what was asked: the report's title."""
    from stock.values import format_si

    fc = format_si(request["fc_hz"], "Hz")
    n = f"{stages} stage{'s' if stages > 1 else ''}"
    gain = f"gain {request['gain']:g}"
    if request["type"] == "bandpass":
        return f"band-pass, centre {fc}, Q {request['q']:g}, {gain}, {n}"
    kind = {"lowpass": "low-pass", "highpass": "high-pass"}[request["type"]]
    if request["q"] is not None:
        return f"{kind}, f0 {fc}, Q {request['q']:g}, {gain}, {n}"
    shape = request["response"]
    if shape == "chebyshev":
        shape += f" {request['ripple_db']:g} dB ripple"
    return f"{kind} {shape}, fc {fc}, {gain}, {n}"


def run(args) -> int:
    from picker.commands.common import load_stock
    from picker.errors import NoDesignError
    from picker.filters import plan_stages
    from picker.search import Bounds, SearchResult, search

    request = parse_request(args)
    buy = design_buy.read_options(args)
    for w in request.pop("_notes"):
        print(f"picker: warning: {w}", file=sys.stderr)
    spec = design_extras.apply_spec(args, request)
    stock = load_stock(getattr(args, "stock", None))
    if args.save:
        # refuse a bad save target before a search that may take a while
        from pathlib import Path

        from picker.export.design_file import check_save_target

        check_save_target(Path(args.save), stock)
    stages = plan_stages(
        request["type"],
        response=request["response"],
        order=request["order"],
        fc_hz=request["fc_hz"],
        gain=request["gain"],
        ripple_db=request["ripple_db"],
        q=request["q"],
        family=request["topology"],
    )
    opts = request.pop("_budget")
    kw = dict(
        singles=request["singles"],
        allow_polarized=request["allow_polarized"],
        bounds=Bounds(**request["bounds"]),
        top=args.top,
        for_people=True,
    )
    kw.update(max_error=request["max_error"], time_limit=request["time_limit_s"])
    if request["rank"] == "yield":
        from picker.search.yieldrank import search as by_yield

        mc = {k: opts[k] for k in ("window", "trials", "distribution", "seed")}
        result: SearchResult = by_yield(stock, stages, **mc, **kw)
    else:
        from picker.commands.design_progress import status_line

        line = status_line(json=args.json)  # live status on a terminal's stderr
        try:
            result = search(stock, stages, rank=request["rank"], progress=line.update, **kw)
        except NoDesignError:
            line.close()
            if buy:  # no design: say what to buy, then exit 1 as without --suggest
                design_buy.no_design(buy, args, stock, stages, kw)
            raise
        finally:
            line.close()
    bought = buy and design_buy.run(buy, args, stock, stages, kw, result.candidates[0])
    from picker.budget import budget

    shown = result.candidates if args.json else result.candidates[:1]
    budgets = [budget(c, **opts) for c in shown]
    if args.save:
        _save(args, result, request, stock)
    if args.json:
        import json

        from picker.report.design import design_json

        out = design_json(result, budgets)
        yields = getattr(result, "yields", ())
        for cand, info in zip(out["candidates"], yields, strict=False):
            cand["yield"] = info.to_json()
        out = design_extras.add_json(out, spec, result, args)
        if bought:
            out = design_buy.add_json(out, bought)
        print(json.dumps(out, indent=2))
        return 0
    _print_report(result, budgets[0], request, stages)
    design_extras.print_views(result, args)
    if bought:
        design_buy.print_section(bought)
    return 0


def _save(args, result, request, stock) -> None:
    from picker.errors import DesignError
    from picker.export import save_design

    if args.pick > len(result.candidates):
        raise DesignError(f"--pick {args.pick}: only {len(result.candidates)} candidates")
    save_design(args.save, candidate=result.candidates[args.pick - 1], request=request, stock=stock)
    print(f"picker: saved candidate {args.pick} to {args.save}", file=sys.stderr)


def _print_report(result, budget, request, stages) -> None:
    from rich.console import Console

    from picker.report.design import DesignReport

    panel = None
    warnings: list[str] = []
    if budget is not None:
        from picker.report.budget_panel import BudgetPanel

        panel = BudgetPanel(budget)
    title = title_of(request, len(stages))
    console = Console(width=min(Console().width, 100))
    console.print(DesignReport(result, title=title, budget_panel=panel, warnings=warnings))
    if getattr(result, "yields", ()):
        from picker.report.yields import YieldTable

        console.print(YieldTable(result))
