"""The one sign oracle: signs of expressions over the declared region.

Checks (``check x < 1``) and extremization (which root, which Hessian sign)
ask the same question -- is this expression positive, negative, zero, or
undecided for every admissible value of the symbols -- so one oracle answers
both.  Each symbol is written through a fresh symbol over a simple set:
``x = L + t`` (t >= 0) for a lower bound L, ``U - t`` for an upper one,
``L + (U - L) t/(1 + t)`` for an open interval, where L and U are declared
literals or linear relations in earlier symbols (``Nf > Nc`` gives
``Nf = Nc + 1 + t`` for integers).  Substituting the latest symbol first
leaves an expression in nonnegative parameters whose sign sympy's rules on
sums and products can see.  Each such rewriting covers a superset of the
region, so any decided answer is a proof; several choices of bounds are
tried in turn.  One square root is handled as a + b sqrt(c).

A rational function is first asked on FLINT polynomials: with the fresh
parameters substituted, a numerator and denominator whose coefficients all
share one sign (and which cannot vanish) decide it without sympy's
assumptions, which are slow; anything else goes through sympy's rules.
"""
from __future__ import annotations

import itertools

from .lazysympy import sympy

from . import budget, surds
from .region import Region
from .sampling import spelled
from .surds import Surds

_TESTS = {
    ">": lambda e: e.is_positive, ">=": lambda e: e.is_nonnegative,
    "<": lambda e: e.is_negative, "<=": lambda e: e.is_nonpositive,
    "!=": lambda e: e.is_nonzero,
}
_BY_SIGN = {">": {1}, ">=": {0, 1}, "<": {-1}, "<=": {-1, 0}, "!=": {-1, 1}}
#: The rewritings tried per expression (several bound choices per symbol).
MAX_CHAINS = 6


class SignOracle:
    """Signs decided exactly from a region's declarations and relations."""

    def __init__(self, region: Region):
        self.region = region
        options = [_images(region, symbol) for symbol in reversed(region.symbols)]
        self.chains = [[(s, image) for s, image in zip(reversed(region.symbols), combo)
                        if image is not None]
                       for combo in itertools.islice(itertools.product(*options), MAX_CHAINS)]
        self._flint = None

    def rewritten(self, expr):
        """``expr`` in each chain's fresh parameters, latest symbol first."""
        for chain in self.chains or [[]]:
            form = expr
            for symbol, image in chain:
                form = form.xreplace({symbol: image})
            yield form

    def truth(self, op: str, expr: sympy.Expr) -> bool | None:
        """Whether ``expr OP 0`` holds on the whole region (True), nowhere
        (False), or is undecided (None).  ``op`` is one of > >= < <= !=."""
        test = _TESTS[op]
        verdict = None
        for form in self._forms(expr):
            answer = test(form)
            if answer:
                return True
            if answer is False:
                verdict = False
        s = self._radical_sign(expr)
        if s is not None:
            return s in _BY_SIGN[op]
        return verdict

    def sign(self, expr: sympy.Expr) -> int | None:
        """1, -1 or 0 on the whole region; None when undecided."""
        fast = self._flint_sign(expr)
        if fast is not None:
            return fast
        expr = sympy.together(expr)
        if expr.is_zero or sympy.expand(expr) == 0:
            return 0
        decided = self._form_sign(expr)
        return decided if decided is not None else self._radical_sign(expr)

    def is_real(self, expr: sympy.Expr) -> bool | None:
        """True/False when every even root has a decided sign; None otherwise
        (closed forms through complex numbers, such as Cardano's, are sampled)."""
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

    def sign_of_content(self, content: sympy.Expr) -> int | None:
        """Sign of a rational function away from its zeros (a factor >= 0
        counts as > 0); None when a factor's sign is undecided.  Raises
        ValueError for a complex coefficient."""
        num, den = sympy.fraction(sympy.together(content))
        (cn, fn), (cd, fd) = (surds.factor_list(x) or sympy.factor_list(x) for x in (num, den))
        coeff = cn / cd
        if not coeff.is_real:
            raise ValueError(f"complex coefficient {spelled(coeff)}")
        total = 1 if coeff > 0 else -1
        for base, mult in fn + fd:
            if self.truth(">=", base):
                continue
            if self.truth("<=", base):
                total *= (-1) ** mult
                continue
            return None
        return total

    # -- internals ----------------------------------------------------------

    def _forms(self, expr):
        for form in self.rewritten(expr):
            budget.check()
            form = sympy.together(form)
            yield form
            yield sympy.factor(form)
            yield sympy.expand(form)

    def _radical_sign(self, expr):
        """Sign of (a + b sqrt(c)) / d from the signs of a, b, d and a^2 - b^2 c."""
        num, den = sympy.fraction(sympy.factor(sympy.together(expr)))
        if not (num.has(sympy.Pow) or den.has(sympy.Pow)):
            return None
        a, b = self._one_radical(num), self._one_radical(den)
        if a is not None and b is not None and b != 0:
            return a * b
        return None

    def _one_radical(self, expr):
        expr = sympy.expand(expr)
        roots = [p for p in expr.atoms(sympy.Pow) if p.exp == sympy.Rational(1, 2)]
        if len(roots) != 1:
            return self._plain_sign(expr)
        r = roots[0]
        b = expr.coeff(r)
        a = sympy.expand(expr - b * r)
        if a.has(r) or b.has(r):
            return None
        sa, sb = self._plain_sign(a), self._plain_sign(b)
        if sa is None or sb is None:
            return None
        if sb == 0:
            return sa
        if sa == 0 or sa == sb:
            return sb
        diff = self._plain_sign(sympy.expand(a ** 2 - b ** 2 * r.base))
        return None if diff is None else sa * diff

    def _plain_sign(self, expr):
        if expr.has(sympy.Pow) and any(p.exp.is_Rational and not p.exp.is_Integer
                                       for p in expr.atoms(sympy.Pow)):
            return None
        if expr == 0:
            return 0
        return self._form_sign(expr)

    def _form_sign(self, expr):
        """The sign sympy decides on the first of the forms that tells, or None."""
        fast = self._flint_sign(expr)
        if fast is not None:
            return fast
        for form in self._forms(expr):
            if form.is_positive:
                return 1
            if form.is_negative:
                return -1
            if form.is_zero:
                return 0
        return None

    def _flint_sign(self, expr):
        """The sign of a rational function read off its coefficients after each
        chain's substitution (None: not a rational function, or undecided)."""
        if self._flint is None:
            self._flint = _FlintChains(self.chains or [[]])
        return self._flint.sign(expr)


class _FlintChains:
    """The chains' substitutions on FLINT polynomials over the rationals in
    the symbols met so far and the fresh parameters (each ``>= 0`` or ``> 0``)."""

    def __init__(self, chains):
        self.source = chains
        self._compile(sorted({s for chain in chains for s, image in chain} | {
            t for chain in chains for _, image in chain for t in image.free_symbols},
            key=sympy.default_sort_key))

    def _compile(self, symbols):
        """The polynomials in ``symbols`` and each chain's images (p, q) there;
        a chain whose denominators are not plainly positive is left to sympy."""
        self.surds = Surds(symbols)
        self.chains = []
        for chain in self.source:
            images = [(self.surds.index[s], self.surds.parts(image, None)) for s, image in chain]
            if all(image is not None and self.coefficient_sign(image[2]) == 1 for _, image in images):
                self.chains.append([(i, (a, d)) for i, (a, _, d) in images])

    def sign(self, expr):
        """The sign of (a + b sqrt(R)) / d, from those of a, b, d and a^2 - b^2 R
        as polynomials (b = 0 for a rational function); None when undecided."""
        new = expr.free_symbols - set(self.surds.index)
        if new:
            self._compile(self.surds.symbols + sorted(new, key=sympy.default_sort_key))
        found = self.surds.read(expr)
        if found is None:
            return None
        (a, b, d), radicand = found
        if b.is_zero():
            return self.product_sign(a, d)
        sa, sb, sd = self.poly_sign(a), self.poly_sign(b), self.poly_sign(d)
        if sa is None or sb is None or sd is None:
            return None
        if sa == 0 or sa == sb:
            return sb * sd
        diff = self.poly_sign(a ** 2 - b ** 2 * radicand)
        return None if diff is None else sa * diff * sd

    def product_sign(self, num, den):
        """The sign of num/den, both decided in one chain (0 for num = 0)."""
        for chain in self.chains:
            n, d = (_substitute_all(x, chain) for x in (num, den))
            if n.is_zero():
                return 0
            signs = (self.coefficient_sign(n), self.coefficient_sign(d))
            if None not in signs:
                return signs[0] * signs[1]
        return None

    def poly_sign(self, poly):
        return self.product_sign(poly, self.surds.constant(1))

    def coefficient_sign(self, poly):
        """1 or -1 when every coefficient has that sign, every term is >= 0
        (its symbols nonnegative, or real to even powers) and some term
        cannot vanish; None otherwise."""
        coeffs = poly.coeffs()
        if not coeffs or not (all(c > 0 for c in coeffs) or all(c < 0 for c in coeffs)):
            return None
        symbols, monoms = self.surds.symbols, poly.monoms()
        for i, d in enumerate(poly.degrees()):
            if d and not symbols[i].is_nonnegative and not (
                    symbols[i].is_real and all(m[i] % 2 == 0 for m in monoms)):
                return None
        if not any(all(e == 0 or symbols[i].is_positive for i, e in enumerate(m)) for m in monoms):
            return None
        return 1 if coeffs[0] > 0 else -1


def _substitute(poly, i, p, q):
    """``poly`` with generator ``i`` replaced by p/q, times q^(its degree)."""
    degree = poly.degrees()[i]
    if degree == 0:
        return poly
    ctx = poly.context()
    parts = [ctx.constant(0) for _ in range(degree + 1)]
    for monom, c in poly.to_dict().items():
        parts[monom[i]] += ctx.from_dict({monom[:i] + (0,) + monom[i + 1:]: c})
    total = ctx.constant(0)
    for j, part in enumerate(parts):
        if not part.is_zero():
            total += part * p ** j * q ** (degree - j)
    return total


def _substitute_all(poly, chain):
    for i, (p, q) in chain:
        poly = _substitute(poly, i, p, q)
    return poly


def _images(region: Region, symbol) -> list:
    """The ways to write ``symbol`` through a fresh parameter, best first;
    the last choice, None, keeps the symbol with its sympy assumptions."""
    spec = region.spec(symbol)
    lowers, uppers = region.bounds_on(symbol)
    if spec.integer:
        lowers, uppers = _integer_bounds(spec, lowers, uppers)
    name = "t_" + spec.name
    images = []
    if not spec.integer:
        for (lo, lo_strict), (hi, hi_strict) in itertools.product(lowers, uppers):
            if lo_strict or hi_strict:
                t = sympy.Symbol(name, **{"positive" if lo_strict and hi_strict else "nonnegative": True})
                images.append(lo + (hi - lo) * t / (1 + t) if hi_strict
                              else hi - (hi - lo) * t / (1 + t))
    for bounds, direction in ((lowers, 1), (uppers, -1)):
        for bound, strict in bounds:
            integral = spec.integer and _integer_valued(bound)
            t = sympy.Symbol(name, integer=integral or None,
                             **{"positive" if strict else "nonnegative": True})
            images.append(bound + direction * t)
    return images[:3] + [None]


def _integer_bounds(spec, lowers, uppers):
    """Integer symbols: a strict bound by an integer-valued expression moves
    by one (n > 0 is n >= 1), a literal one to the nearest integer."""
    first, last = spec.integer_range()
    out = []
    for bounds, step, literal in ((lowers, 1, first), (uppers, -1, last)):
        moved = []
        for bound, strict in bounds:
            if bound.is_Rational:
                moved.append((sympy.Integer(literal), False))
            elif strict and _integer_valued(bound):
                moved.append((bound + step, False))
            else:
                moved.append((bound, strict))
        out.append(moved)
    return out


def _integer_valued(expr) -> bool:
    """Whether a linear expression takes integer values on integer symbols."""
    if not all(s.is_integer for s in expr.free_symbols):
        return False
    poly = sympy.Poly(expr, *sorted(expr.free_symbols, key=str)) if expr.free_symbols else None
    return expr.is_Integer or (poly is not None and all(c.is_Integer for c in poly.coeffs()))
