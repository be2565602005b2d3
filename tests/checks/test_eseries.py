"""E-series against the IEC 60063 tables."""

from __future__ import annotations

import pytest

from checks.eseries import mantissas, nearest, series_for_tolerance, values_between

# IEC 60063 [book: IEC 60063], as tabulated in full for E12 and E24.
E12 = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2]
E24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7,
       5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1]


def test_e12_in_full():
    """E12 is the published list, including 2.7, 3.3, 3.9, 4.7 and 8.2 [book: IEC 60063]."""
    assert [m / 10 for m in mantissas(12)] == E12


def test_e24_in_full():
    """E24 is the published list [book: IEC 60063]."""
    assert [m / 10 for m in mantissas(24)] == E24


def test_short_series_nest():
    """E6 is every other E12 value; E12 every other E24 value [book: IEC 60063]."""
    assert mantissas(6) == mantissas(12)[::2]
    assert mantissas(12) == mantissas(24)[::2]


# The published E96 list [book: IEC 60063].
E96 = """100 102 105 107 110 113 115 118 121 124 127 130 133 137 140 143 147 150 154 158 162 165
169 174 178 182 187 191 196 200 205 210 215 221 226 232 237 243 249 255 261 267 274 280 287 294
301 309 316 324 332 340 348 357 365 374 383 392 402 412 422 432 442 453 464 475 487 499 511 523
536 549 562 576 590 604 619 634 649 665 681 698 715 732 750 768 787 806 825 845 866 887 909 931
953 976""".split()  # noqa: SIM905  (kept in the published layout)


def test_e96_in_full():
    """E96 is the published list [book: IEC 60063]."""
    assert list(mantissas(96)) == [int(v) for v in E96]


@pytest.mark.parametrize(("i", "value"), [(0, 100), (23, 174), (46, 301), (47, 309),
                                          (66, 487), (95, 976)])
def test_e96_spot_values(i, value):
    """E96 spot values [book: IEC 60063]."""
    assert mantissas(96)[i] == value


def test_e48_is_every_other_e96():
    """E48 is every other E96 value [book: IEC 60063]."""
    assert mantissas(48) == mantissas(96)[::2]


def test_e192_exception():
    """E192 i = 185 is published as 9.20 although the formula gives 9.19 [book: IEC 60063]."""
    assert mantissas(192)[185] == 920
    assert mantissas(192)[::2] == mantissas(96)


def test_nearest_wraps_the_decade():
    """9.6 is nearer 10 than 9.1 on a log scale (common practice for E24 selection)."""
    assert nearest(9.6, 24) == pytest.approx(10.0)
    assert nearest(9.4, 24) == pytest.approx(9.1)


def test_values_between_spans_decades():
    """Values across a decade boundary come out in order."""
    assert values_between(80, 130, 12).tolist() == pytest.approx([82, 100, 120])


@pytest.mark.parametrize(("tol", "n"), [(0.01, 96), (0.02, 48), (0.05, 24), (0.1, 12),
                                        (0.2, 6), (0.3, 3)])
def test_series_for_tolerance(tol, n):
    """The series each tolerance is published for [book: IEC 60063]."""
    assert series_for_tolerance(tol) == n
