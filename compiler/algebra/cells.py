"""Proof by cells: an implicit component never holds the extremum, for one parameter.

The points of an implicit component are roots of a polynomial p(x; N) in its
last variable, the others polynomials in that root.  As N moves, the number
of real roots and the sign of anything polynomial at them (a Hessian minor, a
pole, a domain bound) can change only where p's discriminant or leading
coefficient vanishes, or where p and that polynomial have a common root: the
real roots of a few resultants in N.  Between two consecutive such values
everything is constant, so checking one value of N in each interval, and each
admissible value that is itself critical, decides every N exactly.  With
more than one parameter, or a critical value that is an irrational number
inside the parameter's range, no proof is attempted.
"""
from __future__ import annotations

import math
from fractions import Fraction

import flint
from .lazysympy import sympy

from . import budget, surds
from .critical import TOL, Implicit, shape, finite, is_real, numeric_sign
from .sampling import SymbolSpec, evaluate


def critical_values(component: Implicit, system, variables, parameter, tests):
    """The real values of ``parameter`` where the component's real points or
    the signs of ``tests`` (polynomials in the variables and the parameter)
    may change, ascending; None when the component is not in shape position
    over QQ(parameter)."""
    x = variables[-1]
    basis = sympy.groebner([p.as_expr() for p in system] + [component.polynomial], *variables,
                           order="lex", domain=sympy.QQ.frac_field(parameter)).exprs
    others = shape(list(basis), variables, {x, parameter})
    if others is None:
        return None
    field = sympy.QQ.frac_field(parameter)
    p = sympy.Poly(basis[-1], x, domain=field)
    images = [sympy.Poly(h, x, domain=field) for h in others] + [sympy.Poly(x, x, domain=field)]
    # where p's roots meet or escape, where an image has a pole, where a test
    # vanishes at a root (the resultant, as a rational function of the parameter)
    critical = [p.discriminant(), p.LC()] + [c for h in images for c in h.coeffs()]
    critical += [p.resultant(_compose(test, variables, images, p, field)) for test in tests]
    critical = [f(sympy.together(c)) for c in critical for f in (sympy.numer, sympy.denom)]
    if any(c == 0 for c in critical):
        return None   # a test vanishes on the whole component: not a proof
    roots = [r for c in critical for r in _real_roots_in(c, parameter)]
    return sorted(roots, key=lambda r: r if isinstance(r, Fraction) else r[0])


def _compose(test, variables, images, p, field) -> sympy.Poly:
    """``test`` with each variable replaced by its polynomial in the last
    one, reduced modulo ``p`` as it is built (so degrees stay below p's)."""
    total = sympy.Poly(0, variables[-1], domain=field)
    numerator = sympy.numer(sympy.together(test))
    for monom, c in sympy.Poly(numerator, *variables, domain=field).terms():
        term = sympy.Poly(c, variables[-1], domain=field)
        for image, e in zip(images, monom):
            term = (term * image ** e).rem(p)
        total += term
    return total.rem(p)


def _real_roots_in(poly, parameter) -> list:
    """Real roots of a polynomial in one symbol: exact rationals, or
    (low, high) rational intervals isolating an irrational root."""
    if not poly.has(parameter):
        return []
    roots = []
    for factor, _ in (surds.factor_list(poly) or sympy.factor_list(poly))[1]:
        if not factor.has(parameter):
            continue
        q = sympy.Poly(factor, parameter)
        if q.degree() == 1:
            roots.append(Fraction(str(-q.all_coeffs()[1] / q.all_coeffs()[0])))
            continue
        coeffs = [flint.fmpq(int(c.p), int(c.q)) for c in reversed(q.all_coeffs())]
        for r, _ in flint.fmpq_poly(coeffs).complex_roots():
            if r.imag.contains(0):
                mid, rad = Fraction(r.real.mid().str(30, radius=False)), Fraction(
                    float(r.real.rad()) * 2 + 1e-25)
                roots.append((mid - rad, mid + rad))
    return roots


def test_points(spec: SymbolSpec, critical: list) -> list[Fraction] | None:
    """One admissible value of the parameter in every interval between
    critical values, and every admissible critical value; None when an
    irrational critical value lies inside a real parameter's range."""
    cuts = []
    for c in critical:
        if isinstance(c, Fraction):
            cuts.append((c, c))
        elif not spec.integer and any(spec.admits(v) for v in c):
            return None
        else:
            cuts.append(c)
    if spec.integer:
        # every run of integers between two cuts starts next to a cut or at
        # the range's first value; the integers next to each cut are tested
        first, last = spec.integer_range()
        candidates = {v for v in (first, last) if v is not None}
        for low, high in cuts:
            candidates.update(range(math.floor(low) - 1, math.ceil(high) + 2))
        if first is None and not cuts:
            candidates.add(0)
        if last is None:
            candidates.add(max(candidates, default=0) + 1)
        return sorted(Fraction(v) for v in candidates if spec.admits(v))
    points = []
    values = sorted({v for c in cuts for v in c})
    lo = spec.lower if spec.lower is not None else (values[0] if values else Fraction(0)) - 1
    hi = spec.upper if spec.upper is not None else (values[-1] if values else Fraction(0)) + 1
    grid = sorted({lo, hi, *[v for v in values if lo <= v <= hi]})
    for a, b in zip(grid, grid[1:]):
        points.append((a + b) / 2)
    points += [v for v in values if spec.admits(v)]
    return sorted(v for v in set(points) if spec.admits(v))


def rule_out(problem, implicit) -> str | None:
    """The parameter values checked when no implicit component of a one-
    parameter problem holds an admissible point for any value, else None."""
    spec = problem.params[0]
    tests = problem.minor_exprs + [problem.denominator]
    tests += [e for e, _ in problem.domain_tests(problem.vars)]
    tested = set()
    for comp in implicit:
        critical = critical_values(comp, problem.system, problem.vars, spec.symbol, tests)
        values = None if critical is None else test_points(spec, critical)
        if values is None:
            return None
        for value in values:
            budget.check()
            point = {spec.symbol: sympy.Rational(value.numerator, value.denominator)}
            c_value = evaluate(problem.content, point)
            if not finite(c_value) or abs(c_value) < TOL:
                continue    # f vanishes identically there
            numeric, _ = problem.numeric_candidates([], [comp], point)
            for _, _, coords, minors, _ in numeric:
                if not all(is_real(x) for x in coords):
                    continue
                if not problem.inside([sympy.re(x) for x in coords],
                                      lambda e: numeric_sign(sympy.re(evaluate(e, point)))):
                    continue
                signs = [numeric_sign(sympy.re(m)) for m in minors]
                if signs[-1] == 0 or problem.admissible_pattern(signs, 1 if c_value > 0 else -1):
                    return None
            tested.add(value)
    return ", ".join(str(v) for v in sorted(tested)[:6]) + (", ..." if len(tested) > 6 else "")
