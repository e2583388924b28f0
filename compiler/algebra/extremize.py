"""maximize / minimize / extremize: critical points, second-order test, one root.

The answer of an a-maximization is a root of a polynomial whose branch can
depend on the parameters, so the choice is made explicit: every critical
point is found by elimination (``critical.py``), the ones with the required
Hessian are kept, and exactly one must remain -- decided from the declared
region by the sign oracle when it can, otherwise at deterministic sample
points of the parameters, where components without a closed form are
solved exactly.  Any other outcome is an error that asks the author for a
range or says why there is no single answer.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

from .lazysympy import sympy

from . import budget, cells
from . import extremize_report as report
from .critical import (TOL, Closed, FamilyError, Implicit, RationalFunction, critical_components,
                       finite, is_real, numeric_sign, numeric_value, split_content)
from .radicals import tidy_with
from .region import Region, Relation, variable_domain
from .sampling import SymbolSpec, describe_point, evaluate
from .surds import vanishes
from .signs import SignOracle

MODES = ("maximize", "minimize", "extremize")
#: Most critical points solved for, bounded by the product of the degrees of
#: the critical-point equations (Bezout), checked before solving: roots of
#: high degree take minutes.  Anomark's own choice (common practice, no source).
MAX_CRITICAL_DEGREE = 8


class ExtremizeError(ValueError):
    """The extremum does not exist, is not unique, or cannot be decided.

    ``status`` follows the spec: a missing or ambiguous extremum is a
    *failed* step (the claim "there is one" is false); a degenerate Hessian,
    complex critical points or malformed input are *errors*.
    """

    def __init__(self, message: str, status: str = "error"):
        super().__init__(message)
        self.status = status


@dataclass(frozen=True)
class ExtremumResult:
    point: tuple[sympy.Expr, ...]
    value: sympy.Expr
    account: str
    settled: str          # "symbolic" or "sampled"
    samples: int


Interval = tuple  # (lower, upper), open; either end may be None


@dataclass
class _Candidate:
    coords: tuple[sympy.Expr, ...]
    minors: list[sympy.Expr]          # leading principal minors of the Hessian of g


def extremize(mode: str, f: sympy.Expr,
              variables: Sequence[tuple[sympy.Symbol, Interval | None]],
              specs: Sequence[SymbolSpec], seed: str, *, relations: Sequence[Relation] = (),
              name: str = "f", count: int = 24) -> ExtremumResult:
    """Find the unique admissible critical point of ``f`` over ``variables``.

    ``specs`` are the declarations of the parameters in declaration order (a
    variable's own spec, if present, restricts its domain like a range
    does) and ``relations`` the linear relations between declared symbols
    (those naming a variable restrict its domain too).  ``seed`` fixes the
    sample points; ``name`` is how ``f`` is called in messages.
    """
    if mode not in MODES:
        raise ValueError(f"unknown mode {mode!r}")
    if count < 20:
        raise ValueError("extremization samples at least 20 points")
    problem = _Problem(mode, f, variables, specs, relations, name)
    return problem.solve(seed, count)


class _Problem:
    def __init__(self, mode, f, variables, specs, relations, name):
        self.mode, self.f, self.name = mode, f, name
        self.vars = [v for v, _ in variables]
        if len(set(self.vars)) != len(self.vars):
            raise ExtremizeError("a variable is listed twice")
        by_symbol = {s.symbol: s for s in specs}
        try:
            self.domains = [variable_domain(v, interval, by_symbol.get(v)) for v, interval in variables]
        except ValueError as exc:
            raise ExtremizeError(str(exc)) from None
        for v in self.vars:
            if v.is_integer:
                raise ExtremizeError(f"cannot {mode} over the integer symbol {v}")
        self.params = [s for s in specs if s.symbol not in self.vars]
        known = {s.symbol for s in self.params} | set(self.vars)
        self.params += [SymbolSpec(s) for s in sorted(f.free_symbols - known, key=str)]
        self.param_symbols = [s.symbol for s in self.params]
        self.variable_relations = [r for r in relations if r.symbols & set(self.vars)]
        self.region = Region(tuple(self.params),
                             tuple(r for r in relations if r.symbols <= set(self.param_symbols)))
        self.oracle = SignOracle(self.region)
        if not f.is_rational_function(*self.vars):
            raise ExtremizeError(f"{name} is not a rational function of "
                                 f"{report.names(self.vars)}; only polynomial or rational "
                                 f"functions can be extremized")
        for v in self.vars:
            if not f.has(v):
                raise ExtremizeError(f"{name} does not depend on {v}, so the Hessian "
                                     f"is degenerate")
        try:
            self.content, self.g = split_content(f, self.vars)
        except ValueError as exc:
            raise ExtremizeError(str(exc)) from None
        self.var_names = report.names(self.vars)
        self.tidied: dict = {}

    def tidy(self, expr):
        """The shown form of ``expr``; a form already shown is kept as it is."""
        if expr not in self.tidied:
            shown = self.tidied[expr] = tidy_with(expr, self.oracle)
            self.tidied.setdefault(shown, shown)
        return self.tidied[expr]

    # -- critical points ----------------------------------------------------

    def critical_points(self) -> tuple[list[_Candidate], list[Implicit]]:
        """Closed-form critical points (poles dropped) and implicit components."""
        first = [sympy.diff(self.g, v) for v in self.vars]
        self.numerators = [sympy.numer(sympy.together(d)) for d in first]
        self.system = [sympy.Poly(p, *self.vars, *self.param_symbols) for p in self.numerators]
        bound = math.prod(max(sympy.Poly(p, *self.vars).total_degree(), 1) for p in self.numerators)
        if bound > MAX_CRITICAL_DEGREE:
            raise ExtremizeError(f"the critical-point equations of {self.name} have degree {bound} "
                                 f"in {', '.join(map(str, self.vars))}; at most {MAX_CRITICAL_DEGREE} "
                                 f"is solved (the extremization degree limit)")
        try:
            found = critical_components(self.numerators, self.vars, self.param_symbols)
        except FamilyError:
            raise ExtremizeError(f"the critical points of {self.name} form a continuous "
                                 f"family, so the Hessian is degenerate") from None
        self.denominator = sympy.denom(sympy.together(self.g))
        hessian = sympy.Matrix([[first[min(i, j)].diff(self.vars[max(i, j)]) for j in range(len(first))]
                                for i in range(len(first))])   # sympy's hessian, reusing ``first``
        self.minor_exprs = [hessian[:k, :k].det() for k in range(1, len(self.vars) + 1)]
        gens = (*self.vars, *self.param_symbols)
        self.minor_functions = [RationalFunction(m, gens) for m in self.minor_exprs]
        self.denominator_function = RationalFunction(self.denominator, gens)
        closed = []
        for comp in (c for c in found if isinstance(c, Closed)):
            at = dict(zip(self.vars, comp.coords))
            if vanishes(self.denominator.xreplace(at)):
                continue  # a pole, not a critical point
            closed.append(_Candidate(tuple(self.tidy(c) for c in comp.coords),
                                     [sympy.together(m.xreplace(at)) for m in self.minor_exprs]))
        # Numbers off the real line are no candidates (the variables are real), unless
        # nothing else is left: that case is reported as complex critical points.
        real = [c for c in closed if not all(x.is_number for x in c.coords)
                or all(is_real(sympy.N(x, 50)) for x in c.coords)]
        return real or closed, [c for c in found if isinstance(c, Implicit)]

    def admissible_pattern(self, minors_signs: list, sign_c: int) -> bool | None:
        """Whether signs of g's minors, scaled by the sign of the content, fit
        the mode; None when an undecided sign (None) leaves it open."""
        if self.mode == "extremize":
            return None if minors_signs[-1] is None else minors_signs[-1] != 0
        wanted = [(-1) ** (k + 1) if self.mode == "maximize" else 1
                  for k in range(len(minors_signs))]
        fits = [None if s is None else (sign_c ** (k + 1)) * s == w
                for k, (s, w) in enumerate(zip(minors_signs, wanted))]
        return False if False in fits else (None if None in fits else True)

    def value_at(self, coords):
        """f at a critical point; in one variable f is first reduced modulo the
        polynomial whose root the point is, which keeps radicals to low powers."""
        if len(self.vars) == 1 and not coords[0].has(sympy.CRootOf):
            v = self.vars[0]
            p = sympy.Poly(self.numerators[0], v)
            num, den = sympy.fraction(sympy.together(self.f))
            if p.degree() > 1:
                num, den = (sympy.rem(sympy.Poly(x, v), p).as_expr() for x in (num, den))
            return (num / den).xreplace({v: coords[0]})
        return self.f.xreplace(dict(zip(self.vars, coords)))

    # -- the decision -------------------------------------------------------

    def solve(self, seed: str, count: int) -> ExtremumResult:
        closed, implicit = self.critical_points()
        if not closed and not implicit:
            raise ExtremizeError(f"{self.name} has no critical point in "
                                 f"{self.var_names}, so no {report.KIND[self.mode]}", "failed")
        found = report.found_text(self, closed, implicit)
        if implicit:
            decided = self.prove_by_cells(closed, implicit, found)
        else:
            decided = self.decide_symbolically(closed, found)
        if decided is not None:
            index, reason = decided
            coords, value, settled, samples = closed[index].coords, None, "symbolic", 0
        else:
            coords, value, reason, samples = self.decide_by_sampling(
                closed, implicit, found, seed, count)
            settled = "sampled"
        if value is not None:   # a root with no closed form, exact through CRootOf
            point = coords
        else:
            point = tuple(self.tidy(c) for c in coords)
            value = self.tidy(self.value_at(coords))
        account = f"{found}; kept {report.point_text(self.vars, point)}: {reason}"
        return ExtremumResult(point, value, account, settled, samples)

    def decide_symbolically(self, candidates, found):
        """(index, reason) when the region settles everything, else None."""
        try:
            sign_c = self.oracle.sign_of_content(self.content)
        except ValueError as exc:
            raise ExtremizeError(f"the function has a {exc}; only real functions "
                                 "can be extremized") from None
        if sign_c is None:
            return None
        admissible, complex_count = [], 0
        for i, cand in enumerate(candidates):
            verdicts = [self.oracle.is_real(c) for c in cand.coords]
            if None in verdicts:
                return None
            if False in verdicts:
                complex_count += 1
                continue
            signs = [self.oracle.sign(m) for m in cand.minors]
            fits = self.admissible_pattern(signs, sign_c)
            if fits is False and signs[-1] != 0:
                continue   # not the kind of point asked for, wherever it lies
            inside = self.inside(cand.coords, self.oracle.sign)
            if inside is None:
                return None
            if signs[-1] == 0:
                if inside:
                    raise ExtremizeError(report.degenerate_message(self, cand.coords, None))
                continue
            if not inside:
                continue
            if fits is None:
                return None
            if fits:
                admissible.append(i)
        if complex_count == len(candidates):
            raise ExtremizeError(report.complex_message(self, found, None))
        if len(admissible) != 1:
            raise ExtremizeError(report.count_message(
                self, found, [candidates[i].coords for i in admissible], None), "failed")
        chosen = candidates[admissible[0]]
        return admissible[0], report.test_text(self, chosen.minors, symbolic=True)

    def prove_by_cells(self, closed, implicit, found):
        """(index, reason) when the closed-form points settle symbolically and
        no implicit component can hold the extremum (``cells.rule_out``)."""
        if len(self.params) != 1 or self.region.relations or not closed:
            return None
        try:
            decided = self.decide_symbolically(closed, found)
        except ExtremizeError:
            return None
        if decided is None:
            return None
        shown = cells.rule_out(self, implicit)
        if shown is None:
            return None
        index, reason = decided
        name = self.params[0].name
        return index, (f"{reason}; the other critical points are no {report.KIND[self.mode]} "
                       f"for any {name}: checked exactly at {name} = {shown}, one value "
                       f"in each interval where their number and signs can change")

    def domain_tests(self, coords):
        """(expression, strict) that must be positive at admissible coordinates."""
        tests = []
        for x, (lo, lo_strict, hi, hi_strict) in zip(coords, self.domains):
            for bound, strict, direction in ((lo, lo_strict, 1), (hi, hi_strict, -1)):
                if bound is not None:
                    tests.append((direction * (x - bound), strict))
        at = dict(zip(self.vars, coords))
        return tests + [(r.expr.xreplace(at), r.strict) for r in self.variable_relations]

    def inside(self, coords, sign):
        """Whether coordinates lie in every variable's domain and satisfy the
        relations that name a variable (None: undecided)."""
        verdict = True
        for expr, strict in self.domain_tests(coords):
            s = sign(expr)
            if s is None:
                verdict = None
            elif s < 0 or (s == 0 and strict):
                return False
        return verdict

    def numeric_candidates(self, closed, implicit, point):
        """Every critical point at a parameter point as (key, coordinates to
        show, numeric coordinates, numeric minors, exact coordinates), and
        how many are complex; None where a closed form is singular."""
        out = []
        for i, cand in enumerate(closed):
            coords = [evaluate(c, point) for c in cand.coords]
            minors = [evaluate(m, point) for m in cand.minors]
            if not all(finite(x) for x in coords + minors):
                return None, 0
            out.append((("closed", i), cand.coords, coords, minors, cand.coords))
        complex_count = 0
        minors_here = [m.at(point) for m in self.minor_functions]
        denominator = self.denominator_function.at(point)
        for j, comp in enumerate(implicit):
            try:
                reals, complex_here = comp.points(self.system, self.vars, point)
            except ValueError as exc:
                raise ExtremizeError(f"cannot solve for the critical points of {self.name}"
                                     f"{report.where(point)}: {exc}") from None
            complex_count += complex_here
            for root in reals:
                if abs(numeric_value(denominator, root.numeric)) < TOL:
                    continue  # a pole
                minors = [numeric_value(m, root.numeric) for m in minors_here]
                out.append((("implicit", j), root.numeric, list(root.numeric), minors, root))
        return out, complex_count

    def decide_by_sampling(self, closed, implicit, found, seed, count):
        """Settle the root choice at ``count`` sample points of the parameters:
        (coordinates, the value when it had to be computed already, reason,
        number of points used)."""
        picks: dict = {}
        used = 0
        skipped = []
        points = self.region.sample(count * 3, seed)
        # Spare points replace skipped ones; a small finite domain is used whole.
        limit = len(points) if self.region.is_enumerated(count * 3) else count
        for point in points:
            budget.check()
            if used == limit:
                break
            c_value = evaluate(self.content, point)
            if not finite(c_value) or abs(c_value) < TOL:
                skipped.append(point)   # f vanishes identically (or is singular) here
                continue
            numeric, complex_count = self.numeric_candidates(closed, implicit, point)
            if numeric is None:
                skipped.append(point)   # the closed forms are singular at this point
                continue
            used += 1
            sign_c = 1 if c_value > 0 else -1
            admissible, complex_seen = [], complex_count > 0
            sign_here = (lambda e: numeric_sign(sympy.re(evaluate(e, point))))
            for key, shown, coords, minors, exact in numeric:
                if not all(is_real(x) for x in coords):
                    complex_seen = True
                    continue
                if not self.inside([sympy.re(x) for x in coords], sign_here):
                    continue
                signs = [numeric_sign(sympy.re(m)) for m in minors]
                if signs[-1] == 0:
                    raise ExtremizeError(report.degenerate_message(self, shown, point))
                if self.admissible_pattern(signs, sign_c):
                    admissible.append((key, shown, exact))
            if len(admissible) != 1:
                if not admissible and complex_seen and not any(
                        all(is_real(x) for x in entry[2]) for entry in numeric):
                    raise ExtremizeError(report.complex_message(self, found, point))
                raise ExtremizeError(report.count_message(
                    self, found, [shown for _, shown, _ in admissible], point), "failed")
            key, shown, exact = admissible[0]
            picks.setdefault(key, (point, shown, exact))
            if len(picks) > 1:
                raise ExtremizeError(report.branch_message(self, {
                    report.label(self, k, closed, implicit): v[:2] for k, v in picks.items()}), "failed")
        if used == 0:
            raise ExtremizeError(f"no usable sample point of {report.names(self.param_symbols)}: "
                                 f"{self.name} vanishes identically or its critical points are "
                                 f"singular at every one")
        (kind, index), (point, shown, exact) = next(iter(picks.items()))
        if kind == "implicit" and self.param_symbols:
            raise ExtremizeError(report.implicit_message(self, implicit[index], point, shown))
        if kind == "implicit":
            return exact.exact(), exact.value(self.f, self.vars), \
                report.test_text(self, None, symbolic=False) + " (exact real roots)", used
        coords = closed[index].coords
        reason = report.test_text(self, None, symbolic=False)
        if not self.param_symbols:
            return coords, None, reason, used
        reason += f" at all {used} sample points of {report.names(self.param_symbols)}"
        if skipped:
            reason += (f" (skipped {len(skipped)} where {self.name} is identically zero "
                       f"or the closed forms are singular, e.g. {describe_point(skipped[0])})")
        return coords, None, reason, used

