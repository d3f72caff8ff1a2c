"""What ``picker design`` adds around the search: the order from a specification
(``--stopband FS --attenuation DB``) and the views of the candidates (``--show step,delay``).

Kept out of ``design_cmd`` so that the search options and these stay apart; the design
command calls ``register_options``, ``apply_spec``, ``add_json`` and ``print_views``.
Imports nothing heavy at module level. Contracts: docs/outputs.md.
"""

from __future__ import annotations

import argparse
import sys
from typing import Any

VIEWS = ("step", "delay")


def _views(text: str) -> tuple[str, ...]:
    names = tuple(w.strip().lower() for w in text.split(",") if w.strip())
    bad = [w for w in names if w not in VIEWS]
    if bad or not names:
        raise argparse.ArgumentTypeError(
            f"{text!r}: choose from {', '.join(VIEWS)}, separated by commas (e.g. step,delay)"
        )
    return names


def register_options(p: argparse.ArgumentParser) -> None:
    """``--stopband``, ``--attenuation`` and ``--show`` on the design parser."""
    p.add_argument(
        "--stopband",
        metavar="FS",
        default=None,
        help="order from a specification: the frequency that must be attenuated "
        "(with --attenuation, instead of --order; band-pass: sets the Q)",
    )
    p.add_argument(
        "--attenuation",
        metavar="DB",
        default=None,
        help="loss wanted at --stopband in dB below the passband peak, e.g. 40",
    )
    p.add_argument(
        "--show",
        type=_views,
        default=(),
        metavar="VIEWS",
        help="views of the best candidate after the report: step (overshoot, settling "
        "time), delay (group delay, phase); e.g. --show step,delay",
    )


def apply_spec(args, request: dict) -> Any:
    """Choose the order (band-pass: the Q) from ``--stopband``/``--attenuation``.

    Updates ``request`` (``order`` or ``q``, and ``stopband_hz``/``attenuation_db`` so
    that a saved design records what was asked), prints the choice as the report's first
    line (not under --json) and returns the ``SpecOrder``; None without the options.
    """
    stop, att = getattr(args, "stopband", None), getattr(args, "attenuation", None)
    if stop is None and att is None:
        return None
    from picker.errors import DesignError
    from picker.filters.spec_order import order_from_spec
    from picker.targets import check_spec, read_attenuation, read_frequency

    errors = check_spec(
        order_given=request.get("order") is not None,
        q_given=request.get("q") is not None,
        stopband_given=stop is not None,
        attenuation_given=att is not None,
    )
    if errors:
        raise DesignError("; ".join(errors.values()))
    stopband_hz = read_frequency(str(stop), "--stopband")  # both given: checked above
    asked = read_attenuation(att)
    spec = order_from_spec(
        request["type"],
        response=request["response"],
        fc_hz=request["fc_hz"],
        stopband_hz=stopband_hz,
        attenuation_db=asked,
        ripple_db=request["ripple_db"],
    )
    if spec.q is not None:
        request["q"] = spec.q
    else:
        request["order"] = spec.order
    request["stopband_hz"] = spec.stopband_hz
    request["attenuation_db"] = spec.asked_db
    if not getattr(args, "json", False):
        print(spec.line(), flush=True)
    return spec


def add_json(out: dict, spec, result, args) -> dict:
    """``order_from_spec`` at the top level and per candidate ``views``, when asked."""
    if spec is not None:
        out["order_from_spec"] = spec.as_json()
    show = getattr(args, "show", ())
    if show:
        from picker.analysis.step_delay import candidate_views

        for cand, row in zip(result.candidates, out.get("candidates", []), strict=False):
            row["views"] = candidate_views(cand, show).as_json()
    return out


def print_views(result, args, *, width: int | None = None) -> None:
    """The step and delay views of the best candidate, after the report."""
    show = getattr(args, "show", ())
    if not show or not result.candidates:
        return
    from rich.console import Console

    from picker.analysis.step_delay import candidate_views
    from picker.report.views import ViewsPanel

    views = candidate_views(result.candidates[0], show)
    console = Console(file=sys.stdout, width=width or min(Console().width, 100), highlight=False)
    console.print(ViewsPanel(views, title="views of the best candidate (rank 1)"))
