"""Elements of the graded ring: exact arithmetic and queries on normal forms.

An element holds ``_t`` {monomial: numerator polynomial} over ``_d``, one
monic common denominator polynomial in the symbols, cancelled against the
numerators.  Elements are immutable; one built before a rule was added is
re-normalised on first use (``_fresh``).
"""
from __future__ import annotations

from fractions import Fraction
from typing import Mapping

from . import printing, serial
from .errors import AlgebraError, LimitError
from .monomials import Mono

MAX_TERMS = 200_000
#: Largest product of coefficient sizes multiplied in one step (term pairs).
MAX_PRODUCT = 20_000_000


class Element:
    """An immutable element of a Ring, always in normal form."""

    __slots__ = ("_ring", "_t", "_d", "_epoch")
    __hash__ = None  # type: ignore[assignment]

    def __init__(self, ring, terms: dict, den):
        self._ring = ring
        self._t = terms
        self._d = den
        self._epoch = ring._epoch

    @property
    def ring(self):
        return self._ring

    def _fresh(self) -> "Element":
        """Re-normalise if rules were added since this element was built."""
        if self._epoch == self._ring._epoch:
            return self
        return self._ring._make(dict(self._t), self._d)

    # ------------------------------------------------------------ arithmetic
    def __add__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        a, b = self._fresh(), other._fresh()
        R, C = a._ring, a._ring.coeffs
        if a._d == b._d:  # the common case: no rescaling
            fa = fb = C.one
        else:
            g = C.gcd(a._d, b._d)
            fa, fb = C.exquo(b._d, g), C.exquo(a._d, g)
        terms = dict(a._t) if fa == C.one else {m: c * fa for m, c in a._t.items()}
        for m, c in b._t.items():
            v = terms.get(m, C.zero) + (c if fb == C.one else c * fb)
            if v:
                terms[m] = v
            else:
                terms.pop(m, None)
        return R._cancelled(terms, a._d * fa)

    __radd__ = __add__

    def __neg__(self):
        a = self._fresh()
        return Element(a._ring, {m: -c for m, c in a._t.items()}, a._d)

    def __sub__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        return self + (-other)

    def __rsub__(self, other):
        return (-self) + other

    def __mul__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        a, b = self._fresh(), other._fresh()
        R = a._ring
        T, size = R.truncate, R.coeffs.size
        deg, mmul = R.monos.degree, R.monos.mul
        bt = sorted(((deg(m), m, c) for m, c in b._t.items()), key=lambda t: t[0])
        raw: dict = {}
        get = raw.get
        for ma, ca in a._t.items():
            da = deg(ma)
            for db, mb, cb in bt:
                if da + db > T:
                    break
                p = mmul(ma, mb)
                if p is None:
                    continue
                s, m = p
                if size(ca) * size(cb) > MAX_PRODUCT:
                    raise LimitError(f"a product of coefficients with {size(ca)} and {size(cb)} "
                                     f"terms is beyond the limit; simplify the input")
                prod = ca * cb
                if s < 0:
                    prod = -prod
                old = get(m)
                raw[m] = prod if old is None else old + prod
            if len(raw) > MAX_TERMS:
                raise LimitError(f"a product grew beyond {MAX_TERMS} terms; simplify the input "
                                 f"or lower truncate")
        raw = {m: c for m, c in raw.items() if c}
        return Element(R, *R.rewriter.normalize(raw, a._d * b._d))

    __rmul__ = __mul__

    def __truediv__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        other = other._fresh()
        if not other.is_class_free():
            raise AlgebraError(f"cannot divide by {other.to_text()}: it contains classes")
        if other.is_zero:
            raise AlgebraError("division by zero")
        a = self._fresh()
        num = other._t[()]
        return a._ring._cancelled({m: c * other._d for m, c in a._t.items()}, a._d * num)

    def __rtruediv__(self, other):
        return self._ring._coerce(other) / self

    def __pow__(self, n):
        if isinstance(n, bool) or not isinstance(n, int):
            return NotImplemented
        a = self._fresh()
        R = a._ring
        if n < 0:
            return (R.one() / a) ** (-n)
        if a.is_class_free():
            if a.is_zero:
                return R.one() if n == 0 else a
            for poly in (a._t[()], a._d):
                R.coeffs.check_power_size(poly, n, MAX_TERMS)
            return R._cancelled({(): a._t[()] ** n}, a._d ** n)
        if () not in a._t and n * min(R.monos.degree(m) for m in a._t) > R.truncate:
            return R.zero()
        result, base = R.one(), a
        while n:
            if n & 1:
                result = result * base
            n >>= 1
            if n:
                base = base * base
        return result

    def __eq__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        a, b = self._fresh(), other._fresh()
        return a._d == b._d and a._t == b._t

    def __ne__(self, other):
        eq = self.__eq__(other)
        return eq if eq is NotImplemented else not eq

    # -------------------------------------------------------------- queries
    @property
    def is_zero(self) -> bool:
        return not self._fresh()._t

    def is_class_free(self) -> bool:
        return all(m == () for m in self._fresh()._t)

    def degrees(self) -> list[int]:
        a = self._fresh()
        return sorted({a._ring.monos.degree(m) for m in a._t})

    def is_homogeneous(self) -> bool:
        return len(self.degrees()) <= 1

    def part(self, k: int) -> "Element":
        a = self._fresh()
        deg = a._ring.monos.degree
        return a._ring._cancelled({m: c for m, c in a._t.items() if deg(m) == k}, a._d)

    def _lead_mono(self) -> Mono:
        return self._ring.monos.leading(self._t)

    def _sorted(self):
        return sorted(self._t.items(), key=lambda mc: self._ring.monos.key(mc[0]))

    def terms(self) -> list[tuple[tuple[tuple[str, int], ...], object]]:
        """(monomial, coefficient) in normal-form order: the monomial as
        ((generator key, exponent), ...) in printing order (base classes
        last), the coefficient a sympy expression in the ring's symbols."""
        import sympy
        a = self._fresh()
        R = a._ring
        out = []
        for m, c in a._sorted():
            s, x, y, P, Q = printing.scalar_parts(R.coeffs, c, a._d)
            coef = sympy.Integer(s) * sympy.Rational(x, y) * printing.prim_expr(P, R.symbols) \
                / printing.prim_expr(Q, R.symbols)
            out.append((R.monos.pairs(m), coef))
        return out

    def leading_term(self) -> tuple["Element", "Element"]:
        """(leading monomial, its class-free coefficient) in the ring's order."""
        a = self._fresh()
        if not a._t:
            raise AlgebraError("zero has no leading term")
        m = a._lead_mono()
        R = a._ring
        return Element(R, {m: R.coeffs.one}, R.coeffs.one), R._cancelled({(): a._t[m]}, a._d)

    def coefficient(self, monomial) -> "Element":
        """Class-free coefficient of an exact normal-form monomial (an Element or key pairs)."""
        a = self._fresh()
        R = a._ring
        if isinstance(monomial, Element):
            monomial = monomial._fresh()
            items = list(monomial._t.items())
            if len(items) != 1 or monomial._d != R.coeffs.one or items[0][1] != R.coeffs.one:
                raise AlgebraError(f"{monomial.to_text()} is not a monomial")
            m = items[0][0]
        else:
            m = R._mono_from_pairs(monomial)
            if not R.rewriter.is_normal(m):
                raise AlgebraError(f"{R.monos.text(m)} is not a monomial of the normal form")
        c = a._t.get(m)
        if c is None:
            return R.zero()
        return R._cancelled({(): c}, a._d)

    def by_group(self, group: int) -> list[tuple[tuple[tuple[str, int], ...], "Element"]]:
        """Split as sum of (monomial in ``group`` classes) * (coefficient free of them)."""
        a = self._fresh()
        R = a._ring
        gens = R.monos.gens
        collected: dict[Mono, dict] = {}
        for m, c in a._t.items():
            f = tuple((i, e) for i, e in m if gens[i].group == group)
            r = tuple((i, e) for i, e in m if gens[i].group != group)
            sign, _ = R.monos.mul(f, r)
            collected.setdefault(f, {})[r] = c if sign > 0 else -c
        return [(R.monos.pairs(f), R._cancelled(collected[f], a._d))
                for f in sorted(collected, key=R.monos.key)]

    def generator_keys(self) -> set[str]:
        a = self._fresh()
        gens = a._ring.monos.gens
        return {gens[i].key for m in a._t for i, _ in m}

    def free_symbols(self) -> set:
        a = self._fresh()
        syms = a._ring.symbols
        found = set()
        for p in list(a._t.values()) + [a._d]:
            for exps, _ in a._ring.coeffs.items(p):
                found.update(s for s, e in zip(syms, exps) if e)
        return found

    def to_scalar(self):
        """The value as a sympy expression; it must be class-free."""
        a = self._fresh()
        if not a.is_class_free():
            raise AlgebraError(f"{a.to_text()} contains classes")
        if not a._t:
            import sympy
            return sympy.Integer(0)
        return a.terms()[0][1]

    # ---------------------------------------------------------- substitute
    def substitute(self, mapping: Mapping) -> "Element":
        """Replace generators (by key) and/or symbols (sympy Symbols) simultaneously."""
        a = self._fresh()
        R, C = a._ring, a._ring.coeffs
        gen_vals: dict[int, Element] = {}
        sym_vals: dict[int, Element] = {}
        for k, v in mapping.items():
            v = R._coerce(v)._fresh()
            if isinstance(k, str):
                gen_vals[R.generator_info(k).index] = v
            elif k in C.position:
                sym_vals[C.position[k]] = v
            elif type(k).__name__ == "Symbol":
                raise AlgebraError(f"{k} is not a declared symbol")
            else:
                raise AlgebraError(f"cannot substitute for {k!r}")
        powers: dict[tuple[str, int, int], Element] = {}

        def power(kind, i, e, base):
            key = (kind, i, e)
            if key not in powers:
                powers[key] = base if e == 1 else power(kind, i, e - 1, base) * base
            return powers[key]

        def scalar(poly) -> Element:
            if not sym_vals:
                return R._cancelled({(): poly}, C.one)
            total = R.zero()
            for exps, c in C.items(poly):
                rest = [0] * len(exps)
                term = R.scalar(c)
                for j, e in enumerate(exps):
                    if e and j in sym_vals:
                        term = term * power("s", j, e, sym_vals[j])
                    else:
                        rest[j] = e
                if any(rest):
                    term = term * Element(R, {(): C.from_items({tuple(rest): Fraction(1)})}, C.one)
                total = total + term
            return total

        den = scalar(a._d)
        if not den.is_class_free() or den.is_zero:
            raise AlgebraError("the substitution makes a denominator vanish or contain classes")
        result = R.zero()
        for m, c in a._t.items():
            term = scalar(c)
            kept = []
            for i, e in m:
                if i in gen_vals:
                    term = term * power("g", i, e, gen_vals[i])
                else:
                    kept.append((i, e))
            if kept:
                term = term * Element(R, {tuple(kept): C.one}, C.one)
            result = result + term
        return result / den

    # ------------------------------------------------------------ printing
    def _printed_terms(self):
        a = self._fresh()
        C = a._ring.coeffs
        return [(m, printing.scalar_parts(C, c, a._d)) for m, c in a._sorted()]

    def to_text(self) -> str:
        """Deterministic text in the document's own expression syntax (re-readable)."""
        return printing.to_text(self._ring, self._printed_terms())

    def to_latex(self) -> str:
        return printing.to_latex(self._ring, self._printed_terms())

    def __repr__(self) -> str:
        return f"Element({self.to_text()})"

    def to_data(self) -> dict:
        """The exact value as plain JSON data, for the build cache (``serial``)."""
        a = self._fresh()
        return serial.to_data(a._ring, a._sorted(), a._d)
