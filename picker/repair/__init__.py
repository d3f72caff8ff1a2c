"""Repair mode: what a stage does as built, and stock substitutes for a failed part.

    from picker.repair import parse_stage, analyse_marked, substitute

``marked`` reads a stage as marked on the board, ``analyse`` gives its f0, Q, gain,
response and tolerance extremes, ``substitute`` refills failed positions from the stock,
``safety`` holds the cautions every repair report carries. See docs/repair.md.
"""
