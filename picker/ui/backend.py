"""The UI's door to the functional core, imported lazily.

Every heavy import (numpy, scipy, the search) happens inside these functions, which
the UI calls from worker threads, so the first screen paints before any of it loads.
A piece of the core that is not installed yet raises ``Unavailable``: the pane shows
"not available yet" instead of made-up data.
"""

from __future__ import annotations

import importlib
from pathlib import Path

from picker.ui.targets_form import Targets

TRIALS = 10000  # Monte Carlo trials, as the CLI's --trials default
PROGRESS_EVERY_S = 0.25  # at most this often a progress line goes to the screen


class Unavailable(Exception):
    """A part of the core this pane needs is not there (yet)."""


def need(module: str, *names: str):
    """Import ``module`` and check it has ``names``; raise ``Unavailable`` otherwise.

    Only a missing module or name counts: an import that fails inside an existing
    module is a real bug and propagates.
    """
    try:
        mod = importlib.import_module(module)
    except ModuleNotFoundError as exc:
        if exc.name and (module == exc.name or module.startswith(exc.name + ".")):
            raise Unavailable(f"{module} is not available yet") from None
        raise
    for name in names:
        if not hasattr(mod, name):
            raise Unavailable(f"{module}.{name} is not available yet")
    return mod


# stock -----------------------------------------------------------------------------
def load_stock(path: Path):
    return need("stock.file", "load").load(path)


def format_value(value: float, kind: str) -> str:
    """RKM text for tables ("4k7", "2n2")."""
    return need("stock.values", "format_rkm").format_rkm(value, kind)


def format_si(value: float, unit: str = "") -> str:
    return need("stock.values", "format_si").format_si(value, unit)


def parse_value(text: str, kind: str | None = None) -> float:
    return need("stock.values", "parse_value").parse_value(text, kind=kind)


def refuse_sample(path: Path) -> None:
    """The bundled sample is read only here, as in the CLI: StockEditError saying why."""
    from stock.errors import StockEditError

    common = need("picker.commands.common", "is_bundled_sample")
    if path is not None and common.is_bundled_sample(path):
        raise StockEditError(
            "this is the bundled sample, which picker does not change: copy "
            "it to ./inventory.toml (or name your own with --stock FILE)"
        )


def change_qty(path: Path, kind: str, index: int, delta: int, *, expect_sha256: str | None):
    refuse_sample(path)
    mod = need("stock.file", "apply_changes", "QtyChange")
    return mod.apply_changes(path, [mod.QtyChange(kind, index, delta)], expect_sha256=expect_sha256)


def add_line(path: Path, kind: str, fields: dict, *, expect_sha256: str | None):
    refuse_sample(path)
    return need("stock.file", "add_line").add_line(path, kind, fields, expect_sha256=expect_sha256)


# design ----------------------------------------------------------------------------
def plan(targets: Targets):
    """The stage list for the targets: [(Topology, StageTarget)]."""
    filters = need("picker.filters", "plan_stages")
    return filters.plan_stages(
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
    import inspect

    mod = need("picker.search", "search", "Bounds")
    bounds = mod.Bounds(
        r_min=targets.r_min, r_max=targets.r_max, c_min=targets.c_min, c_max=targets.c_max
    )
    common = dict(
        singles=targets.singles,
        allow_polarized=targets.allow_polarized,
        bounds=bounds,
        top=top,
        for_people=True,
    )
    extra = {
        "max_error": targets.max_error,
        "time_limit": targets.time_limit,
        "should_stop": should_stop,
        "progress": progress,
    }
    if targets.rank == "yield":
        by_yield = need("picker.search.yieldrank", "search").search
        mc = {"window": targets.window, "trials": TRIALS, "distribution": "uniform", "seed": 0}
        return by_yield(stock, stages, **mc, **common, **extra)
    takes = inspect.signature(mod.search).parameters  # only what this search knows
    extra["rank"] = targets.rank
    return mod.search(stock, stages, **common, **{k: v for k, v in extra.items() if k in takes})


def response(candidate, freqs_hz):
    """Complex H(j 2 pi f) of the whole candidate, op amp GBW included when known."""
    get_topology = need("picker.filters", "get_topology").get_topology
    analysis = need("picker.analysis", "cascade_response")
    nets = [get_topology(stage.topology).netlist(stage.values()) for stage in candidate.stages]
    gbw = candidate.opamp.gbw if candidate.opamp is not None else None
    return analysis.cascade_response(nets, freqs_hz, gbw_hz=gbw)


def budget(candidate, targets: Targets | None = None):
    """The error budget; the targets' window, temperature, supply and peak output go in
    as the CLI's --window, --temp, --supply and --vout-peak do (None: their defaults)."""
    options = targets.budget_options() if targets is not None else {}
    return need("picker.budget", "budget").budget(candidate, trials=TRIALS, **options)


def schematic(candidate):
    return need("picker.report", "schematic").schematic(candidate)


def budget_panel(budget_):
    """The budget's rich panel, compact: the pane draws its own f0 histogram."""
    return need("picker.report.budget_panel", "BudgetPanel").BudgetPanel(budget_, compact=True)


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
    exp = need("picker.export", "design_from_candidate")
    building = need("picker.building", "plan_build", "do_build")
    request = dataclasses.asdict(targets) if targets is not None else {}
    design = exp.design_from_candidate(candidate=candidate, request=request, stock=stock)
    return building.plan_build(design, stock)


def build_listing(plan, stock=None) -> str:
    """What the confirmation shows (``picker.ui.build_text.build_listing``): the parts by
    drawer, the exact stock line where a drawer holds look-alikes, cautions, safety."""
    from picker.ui.build_text import build_listing as listing

    return listing(plan, stock)


def do_build(plan, stock_path: Path) -> str:
    refuse_sample(stock_path)
    need("picker.building", "do_build").do_build(stock_path, plan)
    return f"{plan.count} item(s) taken out of {Path(stock_path).name}"


def last_build(stock_path: Path) -> str:
    """What undo would undo, in words; raises StockEditError when it cannot."""
    refuse_sample(stock_path)
    record = need("picker.building", "undo_preview").undo_preview(stock_path)
    lines = [f"build {record.number} of {record.time}:"]
    lines += [f"  {s}" for s in record.summary]
    return "\n".join(lines)


def undo_last(stock_path: Path) -> str:
    refuse_sample(stock_path)
    need("picker.building", "undo_last").undo_last(stock_path)
    return f"{Path(stock_path).name} is back as it was before that build"


# jobs for a child process (picker.ui.offload): plain arguments in, plain data out ----
def search_job(stock, targets: Targets, stop=None, top: int = 8, progress=None):
    """("done", SearchResult) or ("unavailable", message); PickerError propagates.

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

    try:
        found = search(
            stock, plan(targets), targets, top=top, should_stop=should_stop, progress=report
        )
    except Unavailable as exc:
        return "unavailable", f"search not available yet ({exc})"
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
    except Unavailable as exc:
        out["plot_note"] = f"not available yet ({exc})"
    except Exception as exc:  # shown in the pane as text
        out["plot_note"] = f"error: {type(exc).__name__}: {exc}"
    try:
        out["budget"] = budget(candidate, targets)
    except Unavailable as exc:
        out["budget_note"] = f"not available yet ({exc})"
    except Exception as exc:
        out["budget_note"] = f"error: {type(exc).__name__}: {exc}"
    return out
