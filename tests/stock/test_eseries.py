"""Preferred numbers against IEC 60063 (tables typed here from the standard's tables, from
memory, then cross-checked against the geometric formula with the exceptions the trade
knows: the irregular E24 values and 9.20 in E192)."""

import pytest

from stock.eseries import ORDER, nearest, series, series_of

# IEC 60063:2015 table 1
E3 = (1.0, 2.2, 4.7)
E6 = (1.0, 1.5, 2.2, 3.3, 4.7, 6.8)
E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
E24 = (
    1.0,
    1.1,
    1.2,
    1.3,
    1.5,
    1.6,
    1.8,
    2.0,
    2.2,
    2.4,
    2.7,
    3.0,
    3.3,
    3.6,
    3.9,
    4.3,
    4.7,
    5.1,
    5.6,
    6.2,
    6.8,
    7.5,
    8.2,
    9.1,
)
# IEC 60063:2015 table 2, E48 in full
E48 = (
    1.00,
    1.05,
    1.10,
    1.15,
    1.21,
    1.27,
    1.33,
    1.40,
    1.47,
    1.54,
    1.62,
    1.69,
    1.78,
    1.87,
    1.96,
    2.05,
    2.15,
    2.26,
    2.37,
    2.49,
    2.61,
    2.74,
    2.87,
    3.01,
    3.16,
    3.32,
    3.48,
    3.65,
    3.83,
    4.02,
    4.22,
    4.42,
    4.64,
    4.87,
    5.11,
    5.36,
    5.62,
    5.90,
    6.19,
    6.49,
    6.81,
    7.15,
    7.50,
    7.87,
    8.25,
    8.66,
    9.09,
    9.53,
)


@pytest.mark.parametrize(
    "name, table", [("E3", E3), ("E6", E6), ("E12", E12), ("E24", E24), ("E48", E48)]
)
def test_tables(name, table):
    assert series(name) == pytest.approx(table, abs=1e-12)


def test_e24_irregular_values_present():
    # IEC 60063 table 1: the historic E24 values that differ from round(10**(i/24), 1)
    for v in (2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 8.2, 9.1):
        assert v in series("E24")


def test_e24_differs_from_formula_exactly_at_known_places():
    # common practice: the rounded geometric sequence gives 2.6, 2.9, 3.2, 3.5, 3.8, 4.2,
    # 4.6 and 8.3 where the published E24 has 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2
    diff = {v for i, v in enumerate(series("E24")) if round(10 ** (i / 24), 1) != v}
    assert diff == {2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2}


def test_e192_count_and_spot_values():
    e192 = series("E192")
    assert len(e192) == 192 and len(series("E96")) == 96 and len(series("E48")) == 48
    # IEC 60063 table 2 spot checks
    for v in (1.00, 1.01, 1.02, 1.04, 1.62, 2.32, 3.57, 4.75, 4.99, 6.04, 7.77, 9.20, 9.88):
        assert any(abs(v - x) < 1e-12 for x in e192), v
    assert e192 == tuple(sorted(e192)) and e192[0] == 1.0 and e192[-1] == 9.88


def test_e192_is_the_formula_except_9_20():
    # IEC 60063 table 2 follows round(10**(i/192), 2) except 9.20 (the formula gives 9.19)
    diff = [
        (i, v) for i, v in enumerate(series("E192")) if abs(round(10 ** (i / 192), 2) - v) > 1e-9
    ]
    assert diff == [(185, 9.20)]
    for name, n in (("E48", 48), ("E96", 96)):
        assert all(abs(round(10 ** (i / n), 2) - v) < 1e-9 for i, v in enumerate(series(name)))


def test_series_nest():
    # IEC 60063: each series contains the one with half as many values
    for small, big in (
        ("E3", "E6"),
        ("E6", "E12"),
        ("E12", "E24"),
        ("E48", "E96"),
        ("E96", "E192"),
    ):
        assert set(series(small)) <= set(series(big))


@pytest.mark.parametrize(
    "value, name, expected",
    [
        (37.4e3, "E12", 39e3),
        (9.6, "E24", 10.0),
        (1.04e-9, "E6", 1e-9),
        (2.9e3, "E24", 3.0e3),
        (4.8e3, "E96", 4.75e3),
        (9.19, "E192", 9.2),
        (9.93, "E192", 9.88),
        (9.95, "E192", 10.0),
        (0.0305, "E12", 0.033),
        (1e6, "E3", 1e6),
    ],
)
def test_nearest(value, name, expected):
    # expected from the IEC 60063 tables by hand (log-scale nearest)
    assert nearest(value, name) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    "value, expected",
    [
        (4700, "E3"),
        (1.5e-9, "E6"),
        (8.2e3, "E12"),
        (3.0e-9, "E24"),
        (9.1, "E24"),
        (4870, "E48"),
        (4750, "E96"),
        (9.2e3, "E192"),
        (4.8e3, None),
        (0, None),
        (-1, None),
    ],
)
def test_series_of(value, expected):
    assert series_of(value) == expected


def test_order_and_unknown():
    assert ORDER == ("E3", "E6", "E12", "E24", "E48", "E96", "E192")
    assert series("e12") == series("E12")
    with pytest.raises(ValueError, match="E7"):
        series("E7")
