"""Critical points of a polynomial system by elimination, not by ``solve``.

The gradient of a trial function is a system of polynomials in the
variables with coefficients in QQ[parameters].  The last variable is
eliminated down to one polynomial by resultants (FLINT's multivariate
polynomials, fast), which is factored over QQ(parameters).  A factor linear
in that variable gives it as a rational function of the parameters; it is
substituted and the smaller system solved the same way, down to one
variable, where sympy writes the roots in radicals when it can.  A quadratic
factor is added to the system, whose lexicographic Groebner basis over
QQ(parameters) then writes the other variables through its two roots.  Any
other factor (or a root sympy cannot write) is kept as an *implicit
component*: the polynomials that cut it out.  Its points are computed
exactly at a sample point of the parameters (a Groebner basis over QQ, then
the real roots of its last polynomial isolated by FLINT), which is how the
root choice is made for it; with no parameters that is exact.  The numeric
helpers of that choice (60-digit values, the zero tolerance) live here too.
"""
from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Sequence

import flint
import mpmath
from .lazysympy import sympy

from . import surds


#: Digits of the real roots of implicit components.
DIGITS = 60
#: Below this a number computed to 50 digits counts as zero.
TOL = sympy.Float("1e-30", 50)


class FamilyError(ValueError):
    """The critical points form a continuous family (a degenerate Hessian)."""


@dataclass(frozen=True)
class Closed:
    """A critical point in closed form (rational functions and radicals)."""

    coords: tuple[sympy.Expr, ...]


@dataclass(frozen=True)
class Implicit:
    """The common zeros of the gradient and ``extra``, a component with no
    closed form found; ``polynomial`` is its eliminant in ``variable``."""

    extra: tuple[sympy.Expr, ...]
    polynomial: sympy.Expr
    variable: sympy.Symbol

    @property
    def degree(self) -> int:
        return sympy.degree(self.polynomial, self.variable)

    def points(self, system: Sequence[sympy.Poly], variables, point) -> tuple[list["RealPoint"], int]:
        """The real points at a parameter point, and the number of complex ones.

        A lexicographic Groebner basis over QQ puts the component in shape
        position (each other variable a polynomial in the last); the real
        roots of the last polynomial are isolated by FLINT.
        """
        gens = system[0].gens
        polys = list(system) + [_poly(e, gens) for e in self.extra]
        values = {g: v for g, v in point.items() if g in gens}
        polys = [(p.eval(values) if values else p).as_expr() for p in polys]
        basis = sympy.groebner([p for p in polys if p != 0], *variables, order="lex")
        exprs = list(basis.exprs)
        if exprs == [1]:
            return [], 0
        last = variables[-1]
        others = shape(exprs, variables, {last})
        if others is None:
            raise ValueError("the critical points are not in general position")
        eliminant = sympy.Poly(exprs[-1], last).sqf_part()
        roots = _real_roots(eliminant)
        coefficients = [[mpmath.mpf(int(c.p)) / int(c.q) for c in sympy.Poly(h, last).all_coeffs()]
                        for h in others]
        reals = []
        for k, r in enumerate(roots):
            with mpmath.workdps(DIGITS):
                at = mpmath.mpf(str(r))
                numeric = tuple(sympy.Float(str(mpmath.polyval(c, at)), DIGITS) for c in coefficients)
            reals.append(RealPoint(eliminant, others, last, k, numeric + (r,)))
        return reals, eliminant.degree() - len(roots)


@dataclass(frozen=True)
class RealPoint:
    """A real point of an implicit component at one parameter point: the
    ``index``-th real root of ``eliminant`` and the others as polynomials in it."""

    eliminant: sympy.Poly
    others: tuple[sympy.Expr, ...]
    variable: sympy.Symbol
    index: int
    numeric: tuple[sympy.Float, ...]

    def exact(self) -> tuple[sympy.Expr, ...]:
        return tuple(self.reduced(h) for h in self.others) + (self.reduced(self.variable),)

    def reduced(self, expr: sympy.Expr) -> sympy.Expr:
        """A polynomial in the last variable at the root, written below the
        eliminant's degree (so through powers of one ``CRootOf``)."""
        rest = sympy.rem(sympy.Poly(expr, self.variable), self.eliminant)
        return rest.as_expr().xreplace(
            {self.variable: sympy.CRootOf(self.eliminant.as_expr(), self.index)})

    def value(self, f: sympy.Expr, variables) -> sympy.Expr:
        """A rational function ``f`` of the variables at this point, exactly."""
        at = dict(zip(variables[:-1], self.others))
        num, den = sympy.fraction(sympy.together(f.xreplace(at)))
        return self.reduced(sympy.expand(num)) / self.reduced(sympy.expand(den))


@functools.lru_cache(maxsize=64)
def _poly(expr: sympy.Expr, gens: tuple) -> sympy.Poly:
    return sympy.Poly(expr, *gens)


def _real_roots(poly: sympy.Poly) -> list[sympy.Float]:
    """The real roots of a squarefree polynomial over QQ, ascending (the
    order of ``CRootOf``).  A root ball that meets the real axis holds a real
    root: a non-real one would share it with its conjugate."""
    coeffs = [flint.fmpq(int(c.p), int(c.q)) for c in reversed(poly.all_coeffs())]
    old = flint.ctx.dps
    flint.ctx.dps = DIGITS + 10
    try:
        found = flint.fmpq_poly(coeffs).complex_roots()
    finally:
        flint.ctx.dps = old
    reals = [r.real.mid().str(DIGITS + 5, radius=False) for r, _ in found if r.imag.contains(0)]
    return sorted(sympy.Float(r, DIGITS + 5) for r in reals)


def split_content(f, variables):
    """f = content * g, with the content free of the variables.

    Where the content vanishes f is identically zero (a trivial theory, such
    as N = 1); those parameter values are excluded from the decision, and the
    sign of the content turns a maximum of g into a minimum of f.
    """
    num, den = sympy.fraction(sympy.together(f))
    if num == 0:
        raise ValueError("the function is identically zero")
    content, g = sympy.Integer(1), sympy.Integer(1)
    for part, power in ((num, 1), (den, -1)):
        coeff, factors = surds.factor_list(part) or sympy.factor_list(part)
        content *= coeff ** power
        for base, mult in factors:
            if base.has(*variables):
                g *= base ** (mult * power)
            else:
                content *= base ** (mult * power)
    return content, g


def critical_components(numerators: Sequence[sympy.Expr], variables: Sequence[sympy.Symbol],
                        params: Sequence[sympy.Symbol]) -> list[Closed | Implicit]:
    """Every critical point of the system ``numerators = 0``: closed forms
    (in a fixed order, without repeats) and implicit components.

    Raises FamilyError when the solutions are not isolated."""
    found = _solve([sympy.expand(p) for p in numerators], list(variables), list(params), ())
    closed = sorted({c.coords for c in found if isinstance(c, Closed)}, key=sympy.default_sort_key)
    return [Closed(c) for c in closed] + [c for c in found if isinstance(c, Implicit)]


def _solve(polys, variables, params, extra):
    polys = [p for p in polys if p != 0]
    if not polys:
        raise FamilyError("every equation vanishes")
    x = variables[-1]
    if len(variables) == 1:
        return _univariate(polys, x, extra)
    factors = _eliminate(polys, variables[:-1], variables + params)
    if factors is None:
        raise FamilyError(f"no single equation in {x} is left")
    found = []
    for factor in factors:
        if not factor.has(x):
            continue
        if sympy.degree(factor, x) == 2:
            found += _quadratic(polys, variables, params, extra, factor)
        elif sympy.degree(factor, x) == 1:
            value = sympy.cancel(-(factor - factor.coeff(x) * x) / factor.coeff(x))
            reduced = [sympy.numer(sympy.together(p.xreplace({x: value}))) for p in polys]
            for sub in _solve([sympy.expand(p) for p in reduced], variables[:-1], params,
                              extra + (sympy.numer(sympy.together(x - value)),)):
                found.append(Closed(sub.coords + (value,)) if isinstance(sub, Closed) else sub)
        else:
            found.append(Implicit(extra + (factor,), factor, x))
    return found


def _quadratic(polys, variables, params, extra, factor):
    """The points over an irreducible quadratic factor of the eliminant: with
    the factor added, a lexicographic Groebner basis over QQ(parameters)
    writes the other variables as polynomials in the last, evaluated at the
    factor's two roots (none when the factor was an artefact of elimination)."""
    x = variables[-1]
    domain = sympy.QQ.frac_field(*params) if params else sympy.QQ
    basis = list(sympy.groebner(list(polys) + [factor], *variables, order="lex",
                                domain=domain).exprs)
    if basis == [1]:
        return []
    others = shape(basis, variables, {x, *params})
    if others is None or sympy.degree(basis[-1], x) != 2:
        return [Implicit(extra + (factor,), factor, x)]
    return [Closed(tuple(sympy.expand(h.xreplace({x: r})) for h in others) + (r,))
            for r in sympy.roots(sympy.Poly(basis[-1], x))]


def shape(basis, variables, allowed) -> tuple | None:
    """The other variables as polynomials in the last one when a lexicographic
    basis is in shape position (``x_i - h_i(x_n)``, then one polynomial in
    x_n), else None."""
    last = variables[-1]
    if len(basis) != len(variables) or basis[-1].free_symbols - allowed or not basis[-1].has(last):
        return None
    others = []
    for g, v in zip(basis[:-1], variables[:-1]):
        c = g.coeff(v)
        rest = g - c * v
        if c == 0 or c.has(*variables) or rest.free_symbols - allowed:
            return None
        others.append(sympy.expand(-rest / c))
    return tuple(others)


def _univariate(polys, x, extra):
    """Roots of the common factor of polynomials in one variable."""
    common = polys[0]
    for p in polys[1:]:
        common = sympy.gcd(common, p)
    if not common.has(x):
        return []
    roots = sympy.roots(sympy.Poly(common, x))
    if sum(roots.values()) == sympy.degree(common, x):
        return [Closed((r,)) for r in roots]
    found = []
    for factor, _ in sympy.factor_list(common)[1]:
        if not factor.has(x):
            continue
        roots = sympy.roots(sympy.Poly(factor, x))
        if sum(roots.values()) == sympy.degree(factor, x):
            found += [Closed((r,)) for r in roots]
        else:
            found.append(Implicit(extra + (factor,), factor, x))
    return found


def _eliminate(polys, eliminated, gens):
    """The irreducible factors of one polynomial in the remaining variables
    that vanishes at every common zero of ``polys`` (None: it is zero):
    pairwise resultants eliminate each variable in turn, FLINT factors."""
    names = [f"v{i}" for i in range(len(gens))]
    ctx = flint.fmpq_mpoly_ctx.get(tuple(names), "lex")
    current = [_to_flint(p, gens, ctx) for p in polys]
    for y in eliminated:
        name = names[gens.index(y)]
        index = gens.index(y)
        having = sorted((p for p in current if p.degrees()[index] > 0), key=lambda p: p.degrees()[index])
        rest = [p for p in current if p.degrees()[index] == 0]
        if having:
            pivot = having[0]
            rest += [pivot.resultant(p, name) for p in having[1:]]
        current = [p for p in rest if not p.is_zero()]
        if not current:
            return None
    result = current[0]
    for p in current[1:]:
        result = result.gcd(p)
    return [_from_flint(factor, gens) for factor, _ in result.factor()[1]]


def _to_flint(expr, gens, ctx):
    poly = sympy.Poly(expr, *gens, domain=sympy.QQ)
    return ctx.from_dict({monom: flint.fmpq(int(c.numerator), int(c.denominator))
                          for monom, c in poly.terms()})


def _from_flint(poly, gens):
    terms = []
    for monom, c in poly.to_dict().items():
        term = sympy.Rational(int(c.p), int(c.q))
        for g, e in zip(gens, monom):
            term *= g ** e
        terms.append(term)
    return sympy.Add(*terms)


class RationalFunction:
    """A rational function of the variables and parameters, specialized fast
    at a parameter point (numerator and denominator terms in the variables)."""

    def __init__(self, expr, gens):
        num, den = sympy.fraction(sympy.together(expr))
        self.polys = [sympy.Poly(x, *gens) for x in (num, den)]

    def at(self, point) -> tuple[list, list]:
        values = {g: v for g, v in point.items() if g in self.polys[0].gens}
        return tuple((p.eval(values) if values else p).terms() for p in self.polys)


def numeric_value(function, coords) -> sympy.Float:
    """A specialized rational function at 60-digit coordinates, to 50 digits."""
    with mpmath.workdps(DIGITS):
        values = [mpmath.mpf(str(c)) for c in coords]
        num, den = (mpmath.fsum(mpmath.mpf(int(c.p)) / int(c.q) * mpmath.fprod(
            v ** e for v, e in zip(values, monom)) for monom, c in terms) for terms in function)
        return sympy.Float(str(num / den), 50)


def finite(x) -> bool:
    return x.is_number and not x.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo)


def is_real(x) -> bool:
    re, im = x.as_real_imag()
    return abs(im) <= TOL * (1 + abs(re))


def numeric_sign(x) -> int:
    if abs(x) <= TOL:
        return 0
    return 1 if x > 0 else -1
