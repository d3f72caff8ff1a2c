"""What to buy, from the TUI: the suggestion search of ``picker design --suggest``
(``picker.search.buying.suggest``) for the matches shown, run in a child process
(``picker.ui.offload``) so the screen keeps answering keys (no textual here).

The options are the CLI's defaults: the E24 series, 1 % resistors and 5 % capacitors,
three suggestions, the CLI's budget of seconds for all the trials and the form's time
limit for each; the ranking and precision goal are the form's (docs/buying.md).
"""

from __future__ import annotations

from picker.ui.targets_form import Targets

SUGGESTIONS = 3


def buy_job(stock, targets: Targets, before):
    """The BuyResult for ``targets`` on ``stock``; ``before``: the matches' rank 1, or
    None when the stock has no design for them."""
    from picker.commands.design_buy import DEFAULT_TOLERANCE, suggest_limit
    from picker.search import Bounds
    from picker.search.buying import suggest
    from picker.ui import backend
    from stock.values import parse_percent

    tol_r, tol_c = (parse_percent(t) for t in DEFAULT_TOLERANCE.split(","))
    return suggest(
        stock,
        backend.plan(targets),
        rank=targets.rank,
        max_error=targets.max_error,
        series="E24",
        tolerance_r=tol_r,
        tolerance_c=tol_c,
        n=SUGGESTIONS,
        bounds=Bounds(
            r_min=targets.r_min, r_max=targets.r_max, c_min=targets.c_min, c_max=targets.c_max
        ),
        singles=targets.singles,
        allow_polarized=targets.allow_polarized,
        time_limit=suggest_limit(targets.time_limit),
        trial_time_limit=targets.time_limit,
        before="none" if before is None else before,
    )
