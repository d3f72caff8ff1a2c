"""Nodal analysis of stage netlists: frequency response, group delay, step response.

from picker.analysis import nodal_response, cascade_response, magnitude_db, corner_hz
"""

from picker.analysis.nodal import (
    A0_DEFAULT,
    System,
    build_system,
    cascade_group_delay_s,
    cascade_response,
    chain,
    group_delay_s,
    nodal_response,
    poles,
)
from picker.analysis.response import (
    HALF_POWER_DB,
    corner_hz,
    estimate_stage,
    magnitude_db,
    passband_ripple_db,
    phase_deg,
)
from picker.analysis.transient import step_response

__all__ = [
    "A0_DEFAULT",
    "HALF_POWER_DB",
    "System",
    "build_system",
    "cascade_group_delay_s",
    "cascade_response",
    "chain",
    "corner_hz",
    "estimate_stage",
    "group_delay_s",
    "magnitude_db",
    "nodal_response",
    "passband_ripple_db",
    "phase_deg",
    "poles",
    "step_response",
]
