"""The UI's door to the functional core, imported lazily.

Every heavy import (numpy, scipy, the search) happens inside these functions, which
the UI calls from worker threads, so the first screen paints before any of it loads.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from picker.ui.targets_form import Targets

TRIALS = 10000  # Monte Carlo trials, as the CLI's --trials default
PROGRESS_EVERY_S = 0.25  # at most this often a progress line goes to the screen


# stock -----------------------------------------------------------------------------
def load_stock(path: Path):
    from stock.file import load

    return load(path)


def format_value(value: float, kind: str) -> str:
    """RKM text for tables ("4k7", "2n2")."""
    from stock.values import format_rkm

    return format_rkm(value, kind)


def format_si(value: float, unit: str = "") -> str:
    from stock.values import format_si as si

    return si(value, unit)


def parse_value(text: str, kind: str | None = None) -> float:
    from stock.values import parse_value as parse

    return parse(text, kind=kind)


def refuse_sample(path: Path) -> None:
    """The bundled sample is read only here, as in the CLI: StockEditError saying why."""
    from picker.commands.common import is_bundled_sample
    from stock.errors import StockEditError

    if path is not None and is_bundled_sample(path):
        raise StockEditError(
            "this is the bundled sample, which picker does not change: copy "
            "it to ./inventory.toml (or name your own with --stock FILE)"
        )


def change_qty(path: Path, kind: str, index: int, delta: int, *, expect_sha256: str | None):
    refuse_sample(path)
    from stock.file import QtyChange, apply_changes

    return apply_changes(path, [QtyChange(kind, index, delta)], expect_sha256=expect_sha256)


def add_line(path: Path, kind: str, fields: dict, *, expect_sha256: str | None):
    refuse_sample(path)
    from stock.file import add_line as add

    return add(path, kind, fields, expect_sha256=expect_sha256)


# design ----------------------------------------------------------------------------
def plan(targets: Targets):
    """The stage list for the targets: [(Topology, StageTarget)]."""
    from picker.filters import plan_stages

    return plan_stages(
        targets.response_type,
        response=targets.response,
        order=targets.order,
        fc_hz=targets.fc_hz,
        gain=targets.gain,
        ripple_db=targets.ripple_db,
        q=targets.q,
        family=targets.family,
    )


def search(stock, stages, targets: Targets, *, top: int = 8, should_stop=None, progress=None):
    """The search the CLI runs for these targets: ``rank`` pieces or error through
    ``picker.search.search``, yield through ``picker.search.yieldrank.search`` with the
    budget's Monte Carlo settings (the CLI's defaults, the form's window)."""
    from picker.search import Bounds
    from picker.search import search as by_rank

    bounds = Bounds(
        r_min=targets.r_min, r_max=targets.r_max, c_min=targets.c_min, c_max=targets.c_max
    )
    common: dict[str, Any] = dict(
        singles=targets.singles,
        allow_polarized=targets.allow_polarized,
        bounds=bounds,
        top=top,
        for_people=True,
    )
    extra: dict[str, Any] = {
        "max_error": targets.max_error,
        "time_limit": targets.time_limit,
        "should_stop": should_stop,
        "progress": progress,
    }
    if targets.rank == "yield":
        from picker.search.yieldrank import search as by_yield

        mc: dict[str, Any] = {
            "window": targets.window,
            "trials": TRIALS,
            "distribution": "uniform",
            "seed": 0,
        }
        return by_yield(stock, stages, **mc, **common, **extra)
    return by_rank(stock, stages, rank=targets.rank, **common, **extra)


def response(candidate, freqs_hz):
    """Complex H(j 2 pi f) of the whole candidate, op amp GBW included when known."""
    from picker.analysis import cascade_response
    from picker.filters import get_topology

    nets = [get_topology(stage.topology).netlist(stage.values()) for stage in candidate.stages]
    gbw = candidate.opamp.gbw if candidate.opamp is not None else None
    return cascade_response(nets, freqs_hz, gbw_hz=gbw)


def budget(candidate, targets: Targets | None = None):
    """The error budget; the targets' window, temperature, supply and peak output go in
    as the CLI's --window, --temp, --supply and --vout-peak do (None: their defaults)."""
    options = targets.budget_options() if targets is not None else {}
    from picker.budget import budget as run_budget

    return run_budget(candidate, trials=TRIALS, **options)


def schematic(candidate):
    from picker.report import schematic as draw

    return draw(candidate)


def budget_panel(budget_):
    """The budget's rich panel, compact: the pane draws its own f0 histogram."""
    from picker.report.budget_panel import BudgetPanel

    return BudgetPanel(budget_, compact=True)


def f0_histogram(budget_) -> dict:
    """The Monte Carlo f0 histogram of a ``picker.budget.Budget`` as plain data."""
    mc = budget_.monte_carlo
    h = mc.histogram
    return {
        "edges": list(h.edges),
        "counts": list(h.counts),
        "target": h.target,
        "nominal": h.nominal,
        "window": dict(mc.window).get("f0", 0.0),
        "trials": mc.trials,
        "yield": mc.yield_,
        "quantity": h.quantity,
        "outside": h.outside,
    }


# building --------------------------------------------------------------------------
def plan_build(candidate, stock, targets: Targets | None):
    """The checked build plan of ``candidate`` (nothing is written yet)."""
    import dataclasses

    refuse_sample(stock.path)
    from picker import building
    from picker.export import design_from_candidate

    request = dataclasses.asdict(targets) if targets is not None else {}
    design = design_from_candidate(candidate=candidate, request=request, stock=stock)
    return building.plan_build(design, stock)


def build_listing(plan, stock=None) -> str:
    """What the confirmation shows (``picker.ui.build_text.build_listing``): the parts by
    drawer, the exact stock line where a drawer holds look-alikes, cautions, safety."""
    from picker.ui.build_text import build_listing as listing

    return listing(plan, stock)


def do_build(plan, stock_path: Path) -> str:
    refuse_sample(stock_path)
    from picker import building

    building.do_build(stock_path, plan)
    return f"{plan.count} item(s) taken out of {Path(stock_path).name}"


def last_build(stock_path: Path) -> str:
    """What undo would undo, in words; raises StockEditError when it cannot."""
    refuse_sample(stock_path)
    from picker.building import undo_preview

    record = undo_preview(stock_path)
    lines = [f"build {record.number} of {record.time}:"]
    lines += [f"  {s}" for s in record.summary]
    return "\n".join(lines)


def undo_last(stock_path: Path) -> str:
    refuse_sample(stock_path)
    from picker.building import undo_last as undo

    undo(stock_path)
    return f"{Path(stock_path).name} is back as it was before that build"


# jobs for a child process (picker.ui.offload): plain arguments in, plain data out ----
def search_job(stock, targets: Targets, stop=None, top: int = 8, progress=None):
    """("done", SearchResult); PickerError propagates.

    ``stop``: an event shared with the UI; once set the search returns its best so far.
    ``progress``: called with one line of words per progress report of the search (the
    CLI's status line, ``picker.commands.design_progress.describe``).
    """
    should_stop = stop.is_set if stop is not None else None
    report = None
    if progress is not None:
        from picker.commands.design_progress import DELAY, describe

        sent = [-PROGRESS_EVERY_S]

        def report(record) -> None:  # as the CLI: nothing for a quick search
            if record.elapsed_s >= DELAY and record.elapsed_s - sent[0] >= PROGRESS_EVERY_S:
                sent[0] = record.elapsed_s
                progress(describe(record))

    found = search(stock, plan(targets), targets, top=top, should_stop=should_stop, progress=report)
    return "done", found


def detail_job(candidate, targets: Targets | None = None, points: int = 400) -> dict:
    """The response curve and the error budget of ``candidate``, each or its reason;
    the budget with the inputs of ``targets`` (the targets the pick answers).

    Keys: "plot" (freqs, mag_db, phase_deg lists) or "plot_note"; "budget" (the
    Budget) or "budget_note".
    """
    import numpy as np

    out: dict = {}
    try:
        lo = min(s.target.f0_hz for s in candidate.stages) / 100
        hi = max(s.target.f0_hz for s in candidate.stages) * 100
        freqs = np.logspace(np.log10(lo), np.log10(hi), points)
        h = response(candidate, freqs)
        mag = 20 * np.log10(np.maximum(np.abs(h), 1e-30))
        phase = np.degrees(np.unwrap(np.angle(h)))
        out["plot"] = (freqs.tolist(), mag.tolist(), phase.tolist())
    except Exception as exc:  # shown in the pane as text
        out["plot_note"] = f"error: {type(exc).__name__}: {exc}"
    try:
        out["budget"] = budget(candidate, targets)
    except Exception as exc:
        out["budget_note"] = f"error: {type(exc).__name__}: {exc}"
    return out
