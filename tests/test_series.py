"""Exact expansions of (a + b sqrt(R)) / d (algebra/series.py) against sympy's lazy series.

``leading`` and ``series`` expand such values, which is what extremization
gives, with their own binomial and geometric series on FLINT polynomials.
The tidied terms must be the ones sympy's lazy series gives, in value and in
display form, or the exact path must decline and leave the value to sympy.
The property tests draw values with one square root whose leading
coefficient stays one radical, at infinity, and rational functions at
rational points (values with a root are left to sympy there), and compare
the first 1..4 nonzero terms of both paths.
"""
from __future__ import annotations

from fractions import Fraction
from itertools import islice

import pytest
import sympy
from hypothesis import given, settings, strategies as st

from compiler import expansions
from compiler.algebra import budget, series
from compiler.algebra.radicals import is_rational
from compiler.algebra.sampling import SymbolSpec
from compiler.engine import BuildOptions, build

SPECS = [SymbolSpec("N", integer=True, lower=Fraction(1)), SymbolSpec("z"),
         SymbolSpec("g", lower=Fraction(0), lower_strict=True)]
N, z, g = (spec.symbol for spec in SPECS)


def exact(f, point=None):
    """The raw terms of the exact path, None where it declines."""
    return series.terms(f, N, point, sympy.Dummy("t", positive=True),
                        lambda root: expansions._radicals(root) <= 1)


def first(f, point, n):
    return list(islice(expansions.tidied_terms(f, N, point, SPECS), n))


def by_sympy(f, point, n):
    """The same terms by sympy's lazy series (the exact path switched off)."""
    with pytest.MonkeyPatch.context() as m:
        m.setattr(series, "terms", lambda *args: None)
        return first(f, point, n)


def same_terms(mine, theirs) -> bool:
    """Equal term by term; a series of rational terms becomes a ring element
    (one normal form whatever the terms look like), the others must have
    the same expression."""
    if len(mine) != len(theirs):
        return False
    if all(map(is_rational, mine + theirs)):
        return all(sympy.cancel(a - b) == 0 for a, b in zip(mine, theirs))
    return sympy.Add(*mine) == sympy.Add(*theirs)


# ---------------------------------------------------------------- known series

@pytest.mark.parametrize("f, point, n, expected", [
    # (1 + 3u)^(1/2) (1 + u)^3 = 1 + 9u/2 + 51u^2/8 + ..., u = 1/N^2 (binomial series,
    # common practice, no source)
    (sympy.sqrt(N**2 + 3) * (N**2 + 1)**3, None, 3, [N**7, 9 * N**5 / 2, 51 * N**3 / 8]),
    # geometric series (common practice, no source)
    (1 / (1 - N), Fraction(0), 4, [1, N, N**2, N**3]),
    # sqrt(c N^2 + 1) = sqrt(c) N (1 + 1/(2 c N^2) - ...), c = z^2 + 1 (binomial series)
    (sympy.sqrt((z**2 + 1) * N**2 + 1), None, 2,
     [sympy.sqrt(z**2 + 1) * N, 1 / (2 * N * sympy.sqrt(z**2 + 1))]),
    # a pole at the point: 1/(N - 1) + 1 (partial fractions of N/(N - 1), common practice)
    (N / (N - 1), Fraction(1), 3, [1 / (N - 1), 1]),
    # a polynomial is its own Taylor series at a point, and the expansion ends there
    # (Taylor's theorem, common practice, no source)
    (N**3, Fraction(1), 5, [1, 3 * (N - 1), 3 * (N - 1)**2, (N - 1)**3]),
])
def test_known_series_come_from_the_exact_path(f, point, n, expected):
    assert exact(f, point) is not None
    found = first(f, point, n)
    assert len(found) == len(expected)
    assert all(sympy.simplify(a - b) == 0 for a, b in zip(found, expected)), found


@pytest.mark.parametrize("f, point", [
    (sympy.sqrt(N**3 + 1), None),              # half-integer powers of N
    (sympy.sqrt(N), Fraction(0)),              # half-integer powers of N
    (N + sympy.sqrt(N**2 + 2 * N + 1), None),  # sqrt(R) is a polynomial: the series ends
    (sympy.sqrt(1 - N**2), None),              # the root of a negative leading coefficient
    (sympy.sqrt(3 * g * N**2 + 1), None),      # sqrt(3 g) is two radicals
    (sympy.sqrt(N) + sympy.sqrt(N + 1), None),  # two square roots
    (sympy.exp(1 / N), None),                  # no radical of a polynomial
    (sympy.sqrt(1 + N), Fraction(0)),          # a root at a point: sympy's display forms
])
def test_the_exact_path_declines_what_sympy_writes_its_own_way(f, point):
    assert exact(f, point) is None


def test_an_expired_time_limit_stops_the_exact_path():
    terms = exact(sympy.sqrt((z**2 + 1) * N**2 + 1) / (N + 1))
    with budget.deadline(-1, "step time limit of 0 s"), pytest.raises(budget.BudgetExceeded):
        list(islice(terms, 3))


def test_a_series_sympy_can_only_write_with_i_is_an_error_step(tmp_path):
    text = "```derive\nsymbol N: integer, N >= 2\nlet y = leading(sqrt(1 - N^2), N)\n```\n"
    (tmp_path / "doc.md").write_text(text)
    report = build(str(tmp_path / "doc.md"), text, BuildOptions(use_cache=False))
    (step,) = [s for s in report.steps if s.source.startswith("let y")]
    assert step.status == "error" and "no usable expansion" in step.checks[0].detail


# ---------------------------------------------------------------- against sympy

COEFFS = st.sampled_from([1, 1, z, g, z * g, z**2])


@st.composite
def polynomials(draw, low: int, high: int):
    degree = draw(st.integers(low, high))
    return sum(draw(st.integers(-3, 3)) * draw(COEFFS) * N**i for i in range(degree + 1))


@st.composite
def values(draw):
    """(a + b sqrt(R)) / d with R's leading coefficient p z^2 + q in N
    (p >= 0, q > 0); b is 0 in about one value in four."""
    a, b, d = draw(polynomials(0, 2)), draw(polynomials(0, 1)), draw(polynomials(0, 2))
    m = draw(st.integers(1, 2))
    r0 = draw(st.integers(0, 3)) * z**2 + draw(st.integers(1, 3))
    radicand = r0 * N**(2 * m) + draw(polynomials(0, 2 * m - 1))
    if draw(st.integers(0, 3)) == 0:
        b = 0
    return (a + b * sympy.sqrt(radicand)) / (d if d != 0 else 1)


@st.composite
def fractions(draw):
    """a / d, rational functions."""
    d = draw(polynomials(0, 2))
    return draw(polynomials(0, 3)) / (d if d != 0 else 1)


@settings(max_examples=12)
@given(f=values(), n=st.integers(1, 4))
def test_at_infinity_the_terms_are_sympys(f, n):
    _compare(f, None, n)


@settings(max_examples=12)
@given(f=fractions(), point=st.sampled_from([Fraction(0), Fraction(1), Fraction(1, 2), Fraction(-2)]),
       n=st.integers(1, 4))
def test_at_a_point_the_terms_are_sympys(f, point, n):
    _compare(f, point, n)


def _compare(f, point, n):
    if N not in f.free_symbols or exact(f, point) is None:
        return
    mine, theirs = first(f, point, n), by_sympy(f, point, n)
    assert same_terms(mine, theirs), (f, point, mine, theirs)
