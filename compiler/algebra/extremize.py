"""maximize / minimize / extremize: critical points, second-order test, one root.

The answer of an a-maximization is a root of a polynomial whose branch can
depend on the parameters, so the choice is made explicit: every critical
point is found in closed form, the ones with the required Hessian are kept,
and exactly one must remain -- decided from the declared assumptions when
sympy can, otherwise at deterministic sample points of the parameters.  Any
other outcome is an error that asks the author for a range.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Sequence

import sympy

from .sampling import SymbolSpec, describe_point, evaluate, is_enumerated, sample_points

MODES = ("maximize", "minimize", "extremize")
_NEEDED = {"maximize": "a negative-definite Hessian (a maximum)",
           "minimize": "a positive-definite Hessian (a minimum)",
           "extremize": "a non-degenerate Hessian"}
_KIND = {"maximize": "maximum", "minimize": "minimum", "extremize": "critical point"}
_TOL = sympy.Float("1e-30", 50)
#: Largest number of critical points solved for, bounded by the product of the
#: degrees of the critical-point equations (Bezout): radicals of high degree
#: take sympy minutes.  Anomark's own choice (common practice, no source).
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
              specs: Sequence[SymbolSpec], seed: str, *, name: str = "f",
              count: int = 24) -> ExtremumResult:
    """Find the unique admissible critical point of ``f`` over ``variables``.

    ``specs`` are the declarations of the parameters (a variable's own spec,
    if present, restricts its domain like a range does).  ``seed`` fixes the
    sample points; ``name`` is how ``f`` is called in messages.
    """
    if mode not in MODES:
        raise ValueError(f"unknown mode {mode!r}")
    if count < 20:
        raise ValueError("extremization samples at least 20 points")
    problem = _Problem(mode, f, variables, specs, name)
    return problem.solve(seed, count)


class _Problem:
    def __init__(self, mode, f, variables, specs, name):
        self.mode, self.f, self.name = mode, f, name
        self.vars = [v for v, _ in variables]
        if len(set(self.vars)) != len(self.vars):
            raise ExtremizeError("a variable is listed twice")
        by_symbol = {s.symbol: s for s in specs}
        self.domains = [_domain(v, interval, by_symbol.get(v)) for v, interval in variables]
        for v in self.vars:
            if v.is_integer:
                raise ExtremizeError(f"cannot {mode} over the integer symbol {v}")
        self.params = [s for s in specs if s.symbol not in self.vars]
        known = {s.symbol for s in self.params} | set(self.vars)
        self.params += [SymbolSpec(s) for s in sorted(f.free_symbols - known, key=str)]
        if not f.is_rational_function(*self.vars):
            raise ExtremizeError(f"{name} is not a rational function of "
                                 f"{_names(self.vars)}; only polynomial or rational "
                                 f"functions can be extremized")
        for v in self.vars:
            if not f.has(v):
                raise ExtremizeError(f"{name} does not depend on {v}, so the Hessian "
                                     f"is degenerate")
        self.content, self.g = _split_content(f, self.vars)
        self.var_names = _names(self.vars)

    # -- critical points ----------------------------------------------------

    def critical_points(self) -> list[_Candidate]:
        """Every critical point of ``g`` in closed form, in a fixed order."""
        numerators = [sympy.numer(sympy.together(sympy.diff(self.g, v))) for v in self.vars]
        bound = math.prod(max(sympy.Poly(p, *self.vars).total_degree(), 1) for p in numerators)
        if bound > MAX_CRITICAL_DEGREE:
            raise ExtremizeError(f"the critical-point equations of {self.name} have degree {bound} "
                                 f"in {self.var_names}; at most {MAX_CRITICAL_DEGREE} is solved "
                                 f"(the extremization degree limit)")
        if len(self.vars) == 1:
            solutions = [(r,) for r in _roots(numerators[0], self.vars[0], self.name)]
        else:
            found = sympy.solve(numerators, self.vars, dict=True)
            solutions = []
            for sol in found:
                if any(v not in sol for v in self.vars):
                    raise ExtremizeError(
                        f"the critical points of {self.name} form a continuous family "
                        f"({_point_text(self.vars, [sol.get(v, v) for v in self.vars])}), "
                        f"so the Hessian is degenerate")
                solutions.append(tuple(sol[v] for v in self.vars))
        denominator = sympy.denom(sympy.together(self.g))
        hessian = sympy.hessian(self.g, self.vars)
        minors = [hessian[:k, :k].det() for k in range(1, len(self.vars) + 1)]
        candidates = []
        for coords in sorted(set(solutions), key=sympy.default_sort_key):
            at = dict(zip(self.vars, coords))
            if sympy.simplify(denominator.xreplace(at)) == 0:
                continue  # a pole, not a critical point
            candidates.append(_Candidate(tuple(tidy(c, self.params) for c in coords),
                                         [sympy.together(m.xreplace(at)) for m in minors]))
        return candidates

    def admissible_pattern(self, minors_signs: list[int], sign_c: int) -> bool:
        """Whether signs of g's minors, scaled by the sign of the content, fit the mode."""
        if self.mode == "extremize":
            return minors_signs[-1] != 0
        scaled = [(sign_c ** (k + 1)) * s for k, s in enumerate(minors_signs)]
        if self.mode == "maximize":
            return all(((-1) ** (k + 1)) * s > 0 for k, s in enumerate(scaled))
        return all(s > 0 for s in scaled)

    def value_at(self, coords):
        """f at a critical point; in one variable f is first reduced modulo the
        polynomial whose root the point is, which keeps radicals to low powers."""
        if len(self.vars) == 1:
            v = self.vars[0]
            p = sympy.Poly(sympy.numer(sympy.together(sympy.diff(self.g, v))), v)
            num, den = sympy.fraction(sympy.together(self.f))
            if p.degree() > 1:
                num, den = (sympy.rem(sympy.Poly(x, v), p).as_expr() for x in (num, den))
            return (num / den).xreplace({v: coords[0]})
        return self.f.xreplace(dict(zip(self.vars, coords)))

    # -- the decision -------------------------------------------------------

    def solve(self, seed: str, count: int) -> ExtremumResult:
        candidates = self.critical_points()
        if not candidates:
            raise ExtremizeError(f"{self.name} has no critical point in "
                                 f"{self.var_names}, so no {_KIND[self.mode]}", "failed")
        found = "critical points " + "; ".join(_point_text(self.vars, c.coords)
                                               for c in candidates)
        decided = self.decide_symbolically(candidates)
        if decided is not None:
            index, reason = decided
            settled, samples = "symbolic", 0
        else:
            index, reason, samples = self.decide_by_sampling(candidates, seed, count)
            settled = "sampled"
        chosen = candidates[index]
        point = tuple(tidy(c, self.params) for c in chosen.coords)
        value = tidy(self.value_at(chosen.coords), self.params)
        account = f"{found}; kept {_point_text(self.vars, point)}: {reason}"
        return ExtremumResult(point, value, account, settled, samples)

    def decide_symbolically(self, candidates):
        """(index, reason) when the assumptions settle everything, else None."""
        signer = _Signer(self.params)
        sign_c = signer.sign_of_content(self.content)
        if sign_c is None:
            return None
        admissible, complex_count = [], 0
        for i, cand in enumerate(candidates):
            verdicts = [signer.is_real(c) for c in cand.coords]
            if None in verdicts:
                return None
            if False in verdicts:
                complex_count += 1
                continue
            inside = self.inside(cand.coords, signer.sign)
            if inside is None:
                return None
            signs = [signer.sign(m) for m in cand.minors]
            if signs[-1] == 0:
                if inside:
                    raise ExtremizeError(self.degenerate_message(cand, None))
                continue
            if not inside:
                continue
            if any(s is None for s in signs):
                return None
            if self.admissible_pattern(signs, sign_c):
                admissible.append(i)
        if complex_count == len(candidates):
            raise ExtremizeError(self.complex_message(candidates, None))
        if len(admissible) != 1:
            raise ExtremizeError(self.count_message(candidates, admissible, None), "failed")
        chosen = candidates[admissible[0]]
        return admissible[0], self.test_text(chosen, sign_c, symbolic=True)

    def inside(self, coords, sign):
        """Whether coordinates lie in every variable's domain (None: undecided)."""
        verdict = True
        for x, (lo, lo_strict, hi, hi_strict) in zip(coords, self.domains):
            for bound, strict, direction in ((lo, lo_strict, 1), (hi, hi_strict, -1)):
                if bound is None:
                    continue
                s = sign(direction * (x - bound))
                if s is None:
                    verdict = None
                elif s < 0 or (s == 0 and strict):
                    return False
        return verdict

    def decide_by_sampling(self, candidates, seed, count):
        """Settle the root choice at ``count`` sample points of the parameters."""
        picks: dict[int, dict] = {}
        used = 0
        skipped = []
        points = sample_points(self.params, count * 3, seed)
        # Spare points replace skipped ones; a small finite domain is used whole.
        limit = len(points) if is_enumerated(self.params, count * 3) else count
        for point in points:
            if used == limit:
                break
            c_value = evaluate(self.content, point)
            if not _finite(c_value) or abs(c_value) < _TOL:
                skipped.append(point)   # f vanishes identically (or is singular) here
                continue
            numeric = []
            for cand in candidates:
                coords = [evaluate(c, point) for c in cand.coords]
                minors = [evaluate(m, point) for m in cand.minors]
                if not all(_finite(x) for x in coords + minors):
                    numeric = None
                    break
                numeric.append((coords, minors))
            if numeric is None:
                skipped.append(point)   # the closed forms are singular at this point
                continue
            used += 1
            sign_c = 1 if c_value > 0 else -1
            admissible, complex_seen = [], False
            for i, (coords, minors) in enumerate(numeric):
                if not all(_is_real(x) for x in coords):
                    complex_seen = True
                    continue
                reals = [sympy.re(x) for x in coords]
                if not self.inside(reals, _numeric_sign):
                    continue
                signs = [_numeric_sign(sympy.re(m)) for m in minors]
                if signs[-1] == 0:
                    raise ExtremizeError(self.degenerate_message(candidates[i], point))
                if self.admissible_pattern(signs, sign_c):
                    admissible.append(i)
            if len(admissible) != 1:
                if not admissible and complex_seen and not any(
                        all(_is_real(x) for x in coords) for coords, _ in numeric):
                    raise ExtremizeError(self.complex_message(candidates, point))
                raise ExtremizeError(self.count_message(candidates, admissible, point), "failed")
            picks.setdefault(admissible[0], point)
            if len(picks) > 1:
                raise ExtremizeError(self.branch_message(candidates, picks), "failed")
        if used == 0:
            raise ExtremizeError(f"no usable sample point of {_names(s.symbol for s in self.params)}: "
                                 f"{self.name} vanishes identically or its critical points are "
                                 f"singular at every one")
        index = next(iter(picks))
        reason = self.test_text(candidates[index], None, symbolic=False)
        reason += f" at all {used} sample points of {_names(s.symbol for s in self.params)}"
        if skipped:
            reason += (f" (skipped {len(skipped)} where {self.name} is identically zero "
                       f"or the closed forms are singular, e.g. {describe_point(skipped[0])})")
        return index, reason, used

    # -- messages -----------------------------------------------------------

    def test_text(self, cand: _Candidate, sign_c, symbolic: bool) -> str:
        """The second-order test in words, e.g. ``d²a/deps² = -3 < 0``."""
        if len(self.vars) == 1:
            v = self.vars[0]
            second = tidy(self.content * cand.minors[0], self.params) if symbolic else None
            rel = {"maximize": "< 0", "minimize": "> 0", "extremize": "≠ 0"}[self.mode]
            lhs = f"d²{self.name}/d{v}²"
            return f"{lhs} = {sympy.sstr(second)} {rel}" if symbolic else f"{lhs} {rel}"
        kind = {"maximize": "negative definite", "minimize": "positive definite",
                "extremize": "non-degenerate"}[self.mode]
        return f"the Hessian of {self.name} in {self.var_names} is {kind}"

    def degenerate_message(self, cand, point) -> str:
        where = f" at {describe_point(point)}" if point else ""
        return (f"the Hessian of {self.name} is degenerate (zero determinant) at the "
                f"critical point {_point_text(self.vars, cand.coords)}{where}; the "
                f"second-order test cannot decide")

    def complex_message(self, candidates, point) -> str:
        where = f" at {describe_point(point)}" if point else ""
        return (f"every critical point of {self.name} is complex{where}: "
                + "; ".join(_point_text(self.vars, c.coords) for c in candidates)
                + f"; {self.name} has no real {_KIND[self.mode]}")

    def range_hint(self) -> str:
        v = self.vars[0]
        return (f"give a range, e.g. `{self.mode} {self.name} over {v} in (-1, 1) -> ...`")

    def count_message(self, candidates, admissible, point) -> str:
        where = f" at {describe_point(point)}" if point else ""
        if not admissible:
            return (f"no critical point of {self.name} has {_NEEDED[self.mode]}"
                    f"{self.domain_text()}{where}; critical points: "
                    + "; ".join(_point_text(self.vars, c.coords) for c in candidates))
        listed = "; ".join(_point_text(self.vars, candidates[i].coords) for i in admissible)
        return (f"{len(admissible)} critical points of {self.name} have "
                f"{_NEEDED[self.mode]}{self.domain_text()}{where}: {listed}; "
                + self.range_hint())

    def branch_message(self, candidates, picks) -> str:
        parts = []
        for i, point in picks.items():
            values = ", ".join(f"{v} ≈ {sympy.re(evaluate(x, point)).evalf(6)}"
                               for v, x in zip(self.vars, candidates[i].coords))
            parts.append(f"{_point_text(self.vars, candidates[i].coords)} at "
                         f"{describe_point(point)} ({values})")
        return (f"different sample points pick different roots for the {_KIND[self.mode]} "
                f"of {self.name}: " + "; ".join(parts) + "; restrict the parameters in "
                "their `symbol` declarations or " + self.range_hint())

    def domain_text(self) -> str:
        parts = []
        for v, (lo, lo_strict, hi, hi_strict) in zip(self.vars, self.domains):
            if lo is None and hi is None:
                continue
            left = "(" if lo_strict or lo is None else "["
            right = ")" if hi_strict or hi is None else "]"
            parts.append(f"{v} in {left}{'-oo' if lo is None else lo}, "
                         f"{'oo' if hi is None else hi}{right}")
        return (" with " + ", ".join(parts)) if parts else ""


# -- helpers ------------------------------------------------------------------

def _names(symbols) -> str:
    return ", ".join(str(s) for s in symbols)


def _point_text(variables, coords) -> str:
    return ", ".join(f"{v} = {sympy.sstr(c)}" for v, c in zip(variables, coords))


def _domain(v, interval, spec):
    """(lo, lo_strict, hi, hi_strict) from a range and the variable's declaration."""
    lo = hi = None
    lo_strict = hi_strict = False
    if spec is not None:
        lo, lo_strict, hi, hi_strict = spec.lower, spec.lower_strict, spec.upper, spec.upper_strict
    if interval is not None:
        a, b = (None if x is None else Fraction(str(x)) for x in interval)
        if a is not None and b is not None and a >= b:
            raise ExtremizeError(f"the range ({a}, {b}) for {v} is empty")
        if a is not None and (lo is None or a >= lo):
            lo, lo_strict = a, True
        if b is not None and (hi is None or b <= hi):
            hi, hi_strict = b, True
    to_sympy = (lambda x: None if x is None else sympy.Rational(x.numerator, x.denominator))
    return to_sympy(lo), lo_strict, to_sympy(hi), hi_strict


def _split_content(f, variables):
    """f = content * g, with the content free of the variables.

    Where the content vanishes f is identically zero (a trivial theory, such
    as N = 1); those parameter values are excluded from the decision, and the
    sign of the content turns a maximum of g into a minimum of f.
    """
    num, den = sympy.fraction(sympy.together(f))
    if num == 0:
        raise ExtremizeError("the function is identically zero")
    content, g = sympy.Integer(1), sympy.Integer(1)
    for part, power in ((num, 1), (den, -1)):
        coeff, factors = sympy.factor_list(part)
        content *= coeff ** power
        for base, mult in factors:
            if base.has(*variables):
                g *= base ** (mult * power)
            else:
                content *= base ** (mult * power)
    return content, g


def _roots(numerator, v, name):
    """All roots of a polynomial in one variable, with parameters, in closed form."""
    poly = sympy.Poly(numerator, v)
    if poly.degree() <= 0:
        return []
    found = sympy.roots(poly)
    if sum(found.values()) < poly.degree():
        raise ExtremizeError(f"the critical points of {name} (roots of a degree "
                             f"{poly.degree()} polynomial in {v}) have no closed form")
    return list(found)


def _finite(x) -> bool:
    return x.is_number and not x.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo)


def _is_real(x) -> bool:
    re, im = x.as_real_imag()
    return abs(im) <= _TOL * (1 + abs(re))


def _numeric_sign(x) -> int:
    if abs(x) <= _TOL:
        return 0
    return 1 if x > 0 else -1


class _Signer:
    """Signs decided from the declarations.

    A parameter with a lower bound L is written L + t with t >= 0 (similarly
    for an upper bound, and a rational map for an open or half-open
    interval), so that sympy's sign rules on sums and products of
    nonnegative terms can use the bounds, not only the sympy assumptions.
    """

    def __init__(self, specs: Sequence[SymbolSpec]):
        self.subs = {}
        for spec in specs:
            image = _reparametrize(spec)
            if image is not None:
                self.subs[spec.symbol] = image

    def sign(self, expr):
        expr = sympy.together(expr.xreplace(self.subs))
        if expr.is_zero:
            return 0
        for form in (expr, sympy.factor(expr), sympy.expand(expr)):
            if form.is_positive:
                return 1
            if form.is_negative:
                return -1
            if form.is_zero:
                return 0
        num, den = sympy.fraction(sympy.factor(expr))
        a, b = _radical_sign(num), _radical_sign(den)
        if a is not None and b is not None and b != 0:
            return a * b
        return None

    def is_real(self, expr):
        """True/False when every even root has a decided sign; None otherwise
        (closed forms through complex numbers, such as Cardano's, are sampled)."""
        expr = expr.xreplace(self.subs)
        if expr.has(sympy.I):
            return None
        for power in expr.atoms(sympy.Pow):
            if power.exp.is_Rational and power.exp.q % 2 == 0:
                s = self.sign(power.base)
                if s is None:
                    return None
                if s < 0:
                    return False
        return True

    def sign_of_content(self, content):
        """Sign of the content away from its zeros (a factor >= 0 counts as > 0).

        The content may be a rational function of the parameters: numerator
        and denominator factors count alike (a sign is a sign either way)."""
        num, den = sympy.fraction(sympy.together(content))
        (cn, fn), (cd, fd) = sympy.factor_list(num), sympy.factor_list(den)
        coeff = cn / cd
        if not coeff.is_real:
            raise ExtremizeError(f"the function has a complex coefficient ({coeff}); "
                                 "only real functions can be extremized")
        total = 1 if coeff > 0 else -1
        for base, mult in fn + fd:
            b = base.xreplace(self.subs)
            if any(form.is_nonnegative for form in (b, sympy.expand(b), sympy.factor(b))):
                continue
            if any(form.is_nonpositive for form in (b, sympy.expand(b), sympy.factor(b))):
                total *= (-1) ** mult
                continue
            return None
        return total


def _reparametrize(spec: SymbolSpec):
    """The parameter written through a fresh symbol ranging over a simple set."""
    lo, hi = spec.lower, spec.upper
    if spec.integer:
        first, last = spec._integer_range()
        t = sympy.Symbol("t_" + spec.name, integer=True, nonnegative=True)
        if first is not None and last is None:
            return first + t
        if last is not None and first is None:
            return last - t
        return None   # bounded integers are sampled exhaustively
    rat = (lambda x: sympy.Rational(x.numerator, x.denominator))
    if lo is not None and hi is not None:
        if spec.lower_strict and spec.upper_strict:
            t = sympy.Symbol("t_" + spec.name, positive=True)
            return rat(lo) + (rat(hi) - rat(lo)) * t / (1 + t)
        if spec.upper_strict:
            t = sympy.Symbol("t_" + spec.name, nonnegative=True)
            return rat(lo) + (rat(hi) - rat(lo)) * t / (1 + t)
        if spec.lower_strict:
            t = sympy.Symbol("t_" + spec.name, nonnegative=True)
            return rat(hi) - (rat(hi) - rat(lo)) * t / (1 + t)
        return None
    if lo is not None:
        t = sympy.Symbol("t_" + spec.name, **{"positive" if spec.lower_strict else "nonnegative": True})
        return rat(lo) + t
    if hi is not None:
        t = sympy.Symbol("t_" + spec.name, **{"positive" if spec.upper_strict else "nonnegative": True})
        return rat(hi) - t
    return None


def _radical_sign(expr):
    """Sign of a + b*sqrt(c) from the signs of a, b and a^2 - b^2 c."""
    expr = sympy.expand(expr)
    roots = [p for p in expr.atoms(sympy.Pow) if p.exp == sympy.Rational(1, 2)]
    if len(roots) != 1:
        s = expr.is_positive, expr.is_negative
        return 1 if s[0] else (-1 if s[1] else None)
    r = roots[0]
    b = expr.coeff(r)
    a = sympy.expand(expr - b * r)
    if a.has(r) or b.has(r):
        return None
    sa, sb = _plain_sign(a), _plain_sign(b)
    if sa is None or sb is None:
        return None
    if sb == 0:
        return sa
    if sa == 0 or sa == sb:
        return sb
    diff = _plain_sign(sympy.expand(a ** 2 - b ** 2 * r.base))
    return None if diff is None else sa * diff


def _plain_sign(expr):
    for form in (expr, sympy.factor(expr)):
        if form.is_zero:
            return 0
        if form.is_positive:
            return 1
        if form.is_negative:
            return -1
    return None


def tidy(expr, specs: Sequence[SymbolSpec]):
    """A short exact form: square factors pulled out of radicals using the
    declarations, then the shortest of a few standard rewritings."""
    expr = _pull_squares(expr, _Signer(specs))
    forms = [expr]
    rewrites = [sympy.factor, _radical_form]
    if sympy.count_ops(expr) < 200:   # simplify is slow on large expressions
        rewrites.append(sympy.simplify)
    for rewrite in rewrites:
        try:
            forms.append(rewrite(expr))
        except (TypeError, ValueError, NotImplementedError, sympy.PolynomialError):
            continue
    return min(forms, key=sympy.count_ops)


def _radical_form(expr):
    """An expression with one square root r written as K (A + B r) / D."""
    radicals = {p.base for p in expr.atoms(sympy.Pow) if p.exp.is_Rational and p.exp.q == 2}
    if len(radicals) != 1:
        return expr
    r = sympy.sqrt(radicals.pop())
    num, den = (sympy.expand(x) for x in sympy.fraction(sympy.together(expr)))
    if den.has(r):
        db = den.coeff(r)
        da = sympy.expand(den - db * r)
        num = sympy.expand(num * (da - db * r))
        den = sympy.expand(da ** 2 - db ** 2 * r.base)
    b = num.coeff(r)
    a = sympy.expand(num - b * r)
    if a.has(r) or b.has(r) or den.has(r):
        return expr
    common = sympy.gcd(sympy.gcd(a, b), den)
    a, b, den = (sympy.cancel(x / common) for x in (a, b, den))
    k = sympy.gcd(a, b) if b != 0 else a
    if k == 0:
        return sympy.Integer(0)
    return sympy.factor(k) * (sympy.factor(sympy.cancel(a / k))
                              + sympy.factor(sympy.cancel(b / k)) * r) / sympy.factor(den)


def _pull_squares(expr, signer):
    """(b^2 c)^(k/2) -> |b|^k c^(k/2) where the sign of b follows from the declarations."""
    def is_radical(e):
        return e.is_Pow and e.exp.is_Rational and e.exp.q == 2

    def pull(part):
        if part.is_number:
            return sympy.Integer(1), part
        coeff, factors = sympy.factor_list(part)
        outside, inside = sympy.Integer(1), coeff
        for base, mult in factors:
            s = signer.sign(base) if mult >= 2 else None
            if s in (1, -1):
                outside *= (s * base) ** (mult // 2)
                inside *= base ** (mult % 2)
            else:
                inside *= base ** mult
        return outside, inside

    def rewrite(power):
        num, den = sympy.fraction(sympy.together(power.base))
        (out_n, in_n), (out_d, in_d) = pull(num), pull(den)
        return (out_n / out_d * sympy.sqrt(in_n / in_d)) ** power.exp.p

    return expr.replace(is_radical, rewrite)
