"""Deciding claims: proven, sampled, failed or error.

Equalities between ring elements are decided exactly (the normal form is
unique, so a zero difference is a proof).  Only values that left the
rational functions (square roots from an extremization) may fall back to
sampling at deterministic 50-digit points.  Inequalities are never sampled:
they are decided exactly at each point of a ``for`` range, or proven by the
sign oracle from the symbols' declared assumptions, bounds and relations, or
the check is an error.
"""
from __future__ import annotations

import itertools
import operator
from dataclasses import dataclass, field
from fractions import Fraction
from functools import cached_property

from . import notation
from .algebra.graded import Element
from .algebra.lazysympy import sympy, sympy_symbol
from .algebra.region import Region, Relation
from .algebra.sampling import describe_point, evaluate
from .expressions import Value, as_expr, is_class_free, rational_value, unify
from .results import CheckResult, weakest

#: How many points a sampled equality is tested at (the spec asks >= 20).
SAMPLES = 24
#: Sampled equalities agree to this many significant digits.
DIGITS = 50


@dataclass
class Context:
    """What a check needs besides its two sides."""

    ring: object
    specs: dict  # name -> SymbolSpec, in declaration order
    seed: str
    relations: tuple[Relation, ...] = field(default=())

    @cached_property
    def region(self) -> Region:
        """The declared region; without relations the symbols are drawn in
        order of name, so sample points do not move when declarations do."""
        specs = self.specs.values()
        if not self.relations:
            specs = sorted(specs, key=lambda s: s.name)
        return Region(tuple(specs), tuple(self.relations))

    @cached_property
    def oracle(self):
        """The sign oracle (``algebra.signs``: sympy, imported when a check first needs it)."""
        from .algebra.signs import SignOracle
        return SignOracle(self.region)

    def samples(self, symbols) -> list[dict]:
        """Sample points of the region restricted to ``symbols`` (and the
        symbols related to them)."""
        symbols = [sympy_symbol(s) for s in symbols]
        return self.region.restrict(symbols).sample(SAMPLES, self.seed)

    def declared(self, symbols) -> bool:
        return all(s.name in self.specs for s in symbols)

    def at(self, point: dict) -> "Context":
        """The context once ``point`` fixes some symbols (see ``Region.fixing``;
        without relations that only drops them)."""
        if not point:
            return self
        if not self.relations:
            fixed = {s.name for s in point}
            return Context(self.ring, {k: s for k, s in self.specs.items() if k not in fixed}, self.seed)
        left = self.region.fixing(sympy_point(point))
        return Context(self.ring, {s.name: s for s in left.specs}, self.seed, left.relations)


def sympy_point(point: dict) -> dict:
    """A point (the ring's symbols or sympy's, exact values) as sympy reads it."""
    return {sympy_symbol(s): sympy.Rational(v.numerator, v.denominator) if isinstance(v, Fraction) else v
            for s, v in point.items()}


def substitute(ring, value: Value, point: dict) -> Value:
    """``value`` with the symbols of ``point`` replaced by exact numbers."""
    if not point:
        return value
    if isinstance(value, Element):
        return value.substitute({s: ring.scalar(v) for s, v in point.items()})
    return value.subs(sympy_point(point))


def free_symbols(value: Value) -> set:
    return value.free_symbols() if isinstance(value, Element) else set(value.free_symbols)


def show(value: Value) -> str:
    return value.to_text() if isinstance(value, Element) else notation.text(value)


def claim(lhs: Value, op: str, rhs: Value, points: list[dict], ctx: Context,
          text: str = "claim") -> CheckResult:
    """Decide ``lhs OP rhs``, at each of ``points`` (or once, symbolically)."""
    what = text + (f" (at {len(points)} points)" if len(points) > 1 else "")
    results = []
    for point in points or [{}]:
        try:
            left = substitute(ctx.ring, lhs, point)
            right = substitute(ctx.ring, rhs, point)
            here = ctx.at(point)
        except (ZeroDivisionError, ValueError) as exc:
            results.append(("error", f"at {describe_point(point)}: {exc}"))
            continue
        status, detail = DECIDERS[op](left, right, here)
        if point and detail:
            detail = f"at {describe_point(point)}: {detail}"
        results.append((status, detail))
    status = weakest(s for s, _ in results)
    detail = next((d for s, d in results if s == status and d), "")
    if status == "sampled" and len(results) > 1:
        detail = f"{len(results)} points; " + detail
    return CheckResult(what, status, detail)


# ---------------------------------------------------------------- equality

def _degree_clash(left: Value, right: Value) -> str:
    """Two nonzero sides with no form degree in common cannot be compared."""
    degrees = [set(v.degrees()) if isinstance(v, Element) else ({0} if v != 0 else set())
               for v in (left, right)]
    if degrees[0] and degrees[1] and not degrees[0] & degrees[1]:
        show_degrees = [", ".join(map(str, sorted(d))) for d in degrees]
        return (f"degree clash: the left side has degree {show_degrees[0]}, "
                f"the right side degree {show_degrees[1]}")
    return ""


def _equal(left: Value, right: Value, ctx: Context):
    clash = _degree_clash(left, right)
    if clash:
        return "error", clash
    if isinstance(left, Element) and isinstance(right, Element):
        difference = left - right
        if difference.is_zero:
            return "proven", ""
        return "failed", _witness(left, right, difference, ctx)
    left, right = unify(ctx.ring, left, right)
    difference = _tidied(left - right, ctx)
    if difference == 0:
        return "proven", ""
    if not difference.free_symbols and difference.is_zero is False:
        return "failed", f"left = {_approx(left)}, right = {_approx(right)}"
    return _sample_equal(left, right, difference, ctx)


def _tidied(expr, ctx: Context):
    """A difference of values off the ring, simplified with the region's signs."""
    from .algebra.radicals import tidy_with  # sympy: imported when such a value is checked
    return tidy_with(expr, ctx.oracle)


def _approx(value: sympy.Expr, point=None) -> str:
    """A number for a failure message: exact when rational, else 20 digits."""
    value = value.subs(point) if point else value
    if value.is_Rational or value.free_symbols:
        return notation.text(value)
    return notation.text(evaluate(value, {}).round(20))


def _witness(left: Element, right: Element, difference: Element, ctx: Context) -> str:
    """A point where two ring elements differ, with both sides there."""
    symbols = difference.free_symbols()
    if not symbols:
        return f"left = {show(left)}, right = {show(right)}"
    for point in ctx.samples(symbols):
        try:
            if not substitute(ctx.ring, difference, point).is_zero:
                return (f"at {describe_point(point)}: left = {show(substitute(ctx.ring, left, point))}, "
                        f"right = {show(substitute(ctx.ring, right, point))}")
        except ZeroDivisionError:
            continue
    return f"the difference is {show(difference)}"


def _sample_equal(left, right, difference, ctx: Context):
    symbols = difference.free_symbols
    points = ctx.samples(symbols) if symbols else [{}]
    for point in points:
        value = evaluate(difference, point, digits=DIGITS + 10)
        scale = 1 + abs(evaluate(left, point, digits=DIGITS + 10))
        if not value.is_number or abs(value) > sympy.Rational(1, 10**DIGITS) * scale:
            where = f"at {describe_point(point)}: " if point else ""
            return "failed", f"{where}left = {_approx(left, point)}, right = {_approx(right, point)}"
    if not symbols:
        return "sampled", f"equal to {DIGITS} digits"
    return "sampled", f"equal at {len(points)} random exact points ({DIGITS} digits)"


def _not_equal(left, right, ctx):
    """Classes: not the same element.  Class-free values: different at every
    admissible value of the symbols (like the other inequalities)."""
    if not (is_class_free(left) and is_class_free(right)):
        if isinstance(left, Element) and isinstance(right, Element) and not (left - right).is_zero:
            return "proven", ""
        return "failed", f"both sides equal {show(left)}"
    numbers = rational_value(left), rational_value(right)
    if None not in numbers:  # two numbers: no sympy needed
        return ("proven", "") if numbers[0] != numbers[1] else ("failed", f"both sides equal {show(left)}")
    difference = _tidied(as_expr(left) - as_expr(right), ctx)
    if difference == 0:
        return "failed", f"both sides equal {show(left)}"
    if ctx.oracle.truth("!=", difference):
        return "proven", ""
    counterexample = _counterexample(lambda d: d != 0, "!=", difference, ctx)
    if counterexample:
        return "failed", counterexample
    return "error", "could not be decided exactly from the declared assumptions; give a for range"


# ---------------------------------------------------------------- inequalities

_SIGN_TESTS = {
    "<": lambda d: d.is_negative, "<=": lambda d: d.is_nonpositive,
    ">": lambda d: d.is_positive, ">=": lambda d: d.is_nonnegative,
}


_COMPARE = {"<": operator.lt, "<=": operator.le, ">": operator.gt, ">=": operator.ge}


def _order(op: str):
    def decide(left: Value, right: Value, ctx: Context):
        if not (is_class_free(left) and is_class_free(right)):
            return "error", "inequalities compare class-free values only"
        numbers = rational_value(left), rational_value(right)
        if None not in numbers:  # two numbers: no sympy needed
            if _COMPARE[op](*numbers):
                return "proven", ""
            return "failed", f"left = {show(left)}, right = {show(right)}"
        difference = as_expr(left) - as_expr(right)
        if difference.free_symbols:  # a number's sign is read exactly as it stands
            difference = sympy.simplify(difference)
        verdict = ctx.oracle.truth(op, difference)
        if verdict is True:
            return "proven", ""
        if verdict is False and not difference.free_symbols:
            return "failed", f"left = {show(left)}, right = {show(right)}"
        counterexample = _counterexample(_SIGN_TESTS[op], op, difference, ctx)
        if counterexample:
            return "failed", counterexample
        if verdict is False:
            return "failed", f"false for the declared range: {notation.text(difference)} is not {op} 0"
        return "error", "could not be decided exactly from the declared assumptions; give a for range"
    return decide


def _counterexample(holds, op: str, difference: sympy.Expr, ctx: Context) -> str:
    """An exact admissible point where the inequality is false, if one is
    found among the sample points and the declared bounds.  Finding one
    disproves the claim; not finding one proves nothing."""
    symbols = difference.free_symbols
    if not symbols or not ctx.declared(symbols):
        return ""
    region = ctx.region.restrict(symbols)
    corners = {}
    for spec in region.specs:
        edges = [b for b in (spec.lower, spec.upper, 0) if b is not None]
        admitted = [sympy.Rational(b.numerator, b.denominator) if not isinstance(b, int) else sympy.Integer(b)
                    for b in edges if spec.admits(b)]
        corners[spec.symbol] = admitted
    candidates = [dict(zip(corners, combo)) for combo in itertools.product(*corners.values())]
    candidates = [p for p in candidates if not region.violations(p)]
    for point in candidates + region.sample(SAMPLES, ctx.seed):
        try:
            value = difference.subs(point)
        except ZeroDivisionError:
            continue
        if value.is_number and holds(value) is False:
            return f"at {describe_point(point)}: {notation.text(value)} is not {op} 0"
    return ""


DECIDERS = {"==": _equal, "!=": _not_equal, **{op: _order(op) for op in _SIGN_TESTS}}
