"""Error budget of a candidate: how far the built filter can land from the target.

    from picker.budget import budget, Budget
    b = budget(candidate, trials=10000, window=0.05, temp=(0.0, 70.0))
    b.stage_json(0), b.candidate_json(), b.warnings

Modules by role: ``pieces`` (pieces <-> positions over arrays), ``tolerance`` (corners,
Q range, sensitivities), ``montecarlo`` and ``cascade`` (yield, histogram), ``temperature``
(tempco and dielectric classes), ``opamp`` (finite GBW by nodal analysis, slew rate,
input impedance), ``checks`` (practical warnings), ``records`` (frozen results, JSON).
No rich or textual here; ``picker.report.budget_panel`` draws it.
"""

from picker.budget.core import budget
from picker.budget.records import Budget, StageBudget

__all__ = ["Budget", "StageBudget", "budget"]
