"""The graded ring of characteristic classes, kept in one exact normal form.

An ``Element`` is a sparse map from monomials in class generators to
coefficients that are rational functions of the document's symbols.  The
coefficients are held as sparse polynomials over QQ (sympy's ``PolyElement``)
sharing ONE common denominator per element: measured, this is several times
faster than a fraction field per coefficient and orders of magnitude faster
than expanding sympy expression trees.  Sympy expressions appear only at the
edges (input of scalars, printing).

Every element is kept in normal form: degrees above ``truncate`` are dropped
as they arise, the ring's rewrite rules (e^2 -> p_n, fiber relations) are
applied eagerly, and fiber-degree limits are enforced.  Equality is therefore
exact comparison of the maps.

Monomial order (spec, "Classes, normal form, truncation"): a block order with
the fiber groups first (group 1, 2, ... in that order) and the base classes
(group 0) last; within a block graded (by form degree) reverse lexicographic,
later-declared generators larger.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Mapping, Sequence

import sympy
from sympy import QQ
from sympy.polys.fields import FracField

from .. import notation
from . import budget


class AlgebraError(ValueError):
    """A user-level problem in the algebra (the engine adds the location)."""


class NotRational(AlgebraError):
    """A scalar that is not a rational function of the declared symbols."""


class LimitError(AlgebraError):
    """A computation grew beyond the term cap; fail fast instead of hanging."""


MAX_TERMS = 20_000
#: Largest product of coefficient sizes multiplied in one step (term pairs).
MAX_PRODUCT = 20_000_000


def _check_power_size(poly, n: int) -> None:
    """Refuse a power of a coefficient polynomial that would have more than
    MAX_TERMS terms, before sympy spends minutes building it.  The bound is
    the number of monomials of that degree in the variables present."""
    if n < 2 or len(poly) < 2:
        return
    present = sum(1 for i in range(poly.ring.ngens) if any(m[i] for m in poly.keys()))
    degree = max(sum(m) for m in poly.keys())
    bound = min(math.comb(n * degree + present, present), math.comb(len(poly) + n - 1, n))
    if bound > MAX_TERMS:
        raise LimitError(f"a power of a {len(poly)}-term polynomial to the {n} would have up to "
                         f"{bound} terms (the limit is {MAX_TERMS})")


#: Digits of the numerator or denominator of any number in a value, as for the
#: lexer's number literals: a power is refused before it is computed if its
#: numbers would grow past this, and a value past it cannot be shown.
MAX_DIGITS = 4000
_BITS_PER_DIGIT = math.log2(10)


def _bits(c) -> int:
    """Bits of the larger of a rational's numerator and denominator."""
    return max(c.numerator.bit_length(), c.denominator.bit_length())


def _check_digits(polys, n: int = 1) -> None:
    """Refuse numbers past MAX_DIGITS: those of ``polys``, or (with ``n``) the ones
    their n-th power certainly holds, the leading coefficients' n-th powers
    (a number of b bits is at least 2^(b-1))."""
    coefficients = (c for p in polys for c in p.values()) if n == 1 else (p.LC for p in polys)
    bits = n * max((_bits(c) - 1 for c in coefficients), default=0)
    if bits >= MAX_DIGITS * _BITS_PER_DIGIT:
        what = "a number in the value is" if n == 1 else f"the power to the {n} would hold a number"
        raise LimitError(f"{what} about {int(bits / _BITS_PER_DIGIT)} digits long "
                         f"(the limit is {MAX_DIGITS} digits)")


# A monomial: ((generator index, exponent), ...) sorted by index, exponents > 0.
Mono = tuple


@dataclass(frozen=True)
class Generator:
    index: int
    key: str
    degree: int
    text: str
    latex: str
    group: int


def _to_qq(value):
    if isinstance(value, bool):
        raise AlgebraError(f"not a number: {value!r}")
    if isinstance(value, int):
        return QQ(value)
    if isinstance(value, Fraction):
        return QQ(value.numerator, value.denominator)
    if isinstance(value, sympy.Rational):
        return QQ(int(value.p), int(value.q))
    raise AlgebraError(f"not an exact rational number: {value!r}")


class Ring:
    """Generators, rules and caches shared by all elements of one document."""

    def __init__(self, symbols: Sequence[sympy.Symbol], truncate: int):
        self.symbols = tuple(symbols)
        if len(set(self.symbols)) != len(self.symbols):
            raise AlgebraError("symbols must be distinct")
        self.truncate = int(truncate)
        if self.truncate < 0:
            raise AlgebraError("truncate must be non-negative")
        self._field = FracField(self.symbols, QQ)
        self._poly = self._field.ring
        self._pone = self._poly.one
        self._pzero = self._poly.zero
        self._sym_pos = {s: i for i, s in enumerate(self.symbols)}
        self._gens: list[Generator] = []
        self._by_key: dict[str, Generator] = {}
        self._block_pos: list[int] = []      # generator index -> position in its group
        self._group_size: dict[int, int] = {}
        self._group_rank: dict[int, int] = {0: 0}   # group -> position in block order
        self._group_order: list[int] = [0]
        self._rules: list[tuple[Mono, dict, object]] = []   # (lhs, rhs terms, rhs den)
        self._limits: dict[int, int] = {}
        self._epoch = 0
        self._deg: dict[Mono, int] = {(): 0}
        self._key: dict[Mono, tuple] = {}
        self._mul: dict[tuple[Mono, Mono], object] = {}
        self._nf: dict[Mono, object] = {}

    # ----------------------------------------------------------- generators
    def generator(self, key: str, degree: int, *, text: str, latex: str, group: int = 0) -> "Element":
        """Register (or look up) a class generator and return it as an element."""
        old = self._by_key.get(key)
        if old is not None:
            if old.degree != degree or old.group != group:
                raise AlgebraError(f"class {key} was registered with degree {old.degree} "
                                   f"in group {old.group}, not degree {degree} in group {group}")
            return self._make({((old.index, 1),): self._pone}, self._pone)
        if isinstance(degree, bool) or not isinstance(degree, int) or degree <= 0:
            raise AlgebraError(f"class {key} needs a positive integer degree, got {degree!r}")
        if isinstance(group, bool) or not isinstance(group, int) or group < 0:
            raise AlgebraError(f"group must be a non-negative integer, got {group!r}")
        gen = Generator(len(self._gens), key, degree, text, latex, group)
        self._gens.append(gen)
        self._by_key[key] = gen
        self._block_pos.append(self._group_size.get(group, 0))
        self._group_size[group] = self._group_size.get(group, 0) + 1
        if group not in self._group_rank:
            self._group_order = sorted(set(self._group_order) - {0} | {group}) + [0]
            self._group_rank = {g: i for i, g in enumerate(self._group_order)}
            self._key.clear()
        return self._make({((gen.index, 1),): self._pone}, self._pone)

    def gen(self, key: str) -> "Element":
        """An already registered generator as an element."""
        return self._make({((self.generator_info(key).index, 1),): self._pone}, self._pone)

    def generator_info(self, key: str) -> Generator:
        try:
            return self._by_key[key]
        except KeyError:
            raise AlgebraError(f"unknown class {key}") from None

    def generators(self, group: int | None = None) -> list[Generator]:
        return [g for g in self._gens if group is None or g.group == group]

    def has_generator(self, key: str) -> bool:
        return key in self._by_key

    # -------------------------------------------------------------- scalars
    def zero(self) -> "Element":
        return Element(self, {}, self._pone)

    def one(self) -> "Element":
        return self.scalar(1)

    def scalar(self, value) -> "Element":
        if isinstance(value, sympy.Expr) and not isinstance(value, sympy.Rational):
            return self.from_scalar_expr(value)
        q = _to_qq(value)
        if not q:
            return self.zero()
        return Element(self, {(): self._poly.ground_new(q)}, self._pone)

    def symbol(self, sym: sympy.Symbol) -> "Element":
        pos = self._sym_pos.get(sym)
        if pos is None:
            raise AlgebraError(f"{sym} is not a declared symbol")
        return Element(self, {(): self._poly.gens[pos]}, self._pone)

    def from_scalar_expr(self, expr: sympy.Expr) -> "Element":
        """Convert a sympy expression that is a rational function of the symbols."""
        if isinstance(expr, (int, Fraction)):
            return self.scalar(expr)
        if not isinstance(expr, sympy.Expr) or expr.has(sympy.Float):
            raise NotRational(f"not an exact rational function of the declared symbols: {expr}")
        try:
            frac = self._field.from_expr(expr)
        except (ValueError, TypeError, sympy.PolynomialError, sympy.CoercionFailed):
            raise NotRational(f"not a rational function of the declared symbols: {expr}") from None
        if not frac.numer:
            return self.zero()
        return self._make({(): frac.numer}, frac.denom)

    def from_data(self, data: dict) -> "Element":
        """An element from ``Element.to_data`` output; ValueError/KeyError if
        it does not fit this ring (the cache then recomputes)."""
        position = {sym.name: i for i, sym in enumerate(self.symbols)}

        def poly(items):
            out = {}
            for powers, coefficient in items:
                exps = [0] * len(self.symbols)
                for name, e in powers.items():
                    exps[position[name]] = int(e)
                num, _, den = str(coefficient).partition("/")
                out[tuple(exps)] = QQ(int(num), int(den or 1))
            return self._poly.from_dict(out) if out else self._pzero
        terms = {}
        for pairs, coefficient in data["terms"]:
            m = tuple(sorted((self._by_key[key].index, int(e)) for key, e in pairs))
            terms[m] = poly(coefficient)
        den = poly(data["den"])
        if not den:
            raise ValueError("zero denominator")
        return self._make(terms, den)

    def monomial(self, pairs: Iterable[tuple[str, int]]) -> "Element":
        """The monomial given by (generator key, exponent) pairs; it must be in normal form."""
        m = self._mono_from_pairs(pairs)
        if not self._is_normal(m):
            raise AlgebraError(f"{self._mono_text(m)} is not a monomial of the normal form")
        return Element(self, {m: self._pone}, self._pone)

    def monomial_text(self, pairs: Iterable[tuple[str, int]]) -> str:
        """A monomial as written, in or out of normal form, for messages."""
        return self._mono_text(self._mono_from_pairs(pairs))

    def is_normal_monomial(self, pairs: Iterable[tuple[str, int]]) -> bool:
        return self._is_normal(self._mono_from_pairs(pairs))

    def _mono_from_pairs(self, pairs) -> Mono:
        exps: dict[int, int] = {}
        for key, e in pairs:
            gen = self.generator_info(key)
            if isinstance(e, bool) or not isinstance(e, int) or e < 0:
                raise AlgebraError(f"exponent of {key} must be a non-negative integer")
            exps[gen.index] = exps.get(gen.index, 0) + e
        return tuple(sorted((i, e) for i, e in exps.items() if e))

    def _is_normal(self, m: Mono) -> bool:
        if self._mdeg(m) > self.truncate:
            return False
        if any(e > 1 and self._gens[i].degree % 2 for i, e in m):
            return False
        return self._nf_mono(m) is None

    # ---------------------------------------------------------------- rules
    def add_rule(self, monomial: "Element", replacement: "Element") -> None:
        """Rewrite ``monomial`` as ``replacement`` in every normal form from now on.

        The rule set is kept as a reduced Gröbner basis so normal forms stay
        unique however rules were added.
        """
        monomial, replacement = monomial._fresh(), self._coerce(replacement)._fresh()
        items = list(monomial._t.items())
        if len(items) != 1 or monomial._d != self._pone or items[0][1] != self._pone or not items[0][0]:
            raise AlgebraError("the left side of a rule must be a single class monomial with coefficient 1")
        lhs = items[0][0]
        deg = self._mdeg(lhs)
        if any(self._mdeg(m) != deg for m in replacement._t):
            raise AlgebraError(f"rule {self._mono_text(lhs)} -> {replacement.to_text()} is not homogeneous")
        polys = [self._raw_rule(l, t, d) for l, t, d in self._rules]
        new = {lhs: self._field.one}
        for m, c in replacement._t.items():
            new[m] = new.get(m, self._field.zero) - self._field.new(c, replacement._d)
        polys.append({m: c for m, c in new.items() if c})
        basis = self._groebner_raw(polys)
        self._rules = []
        for g in basis:
            lead = self._leading(g)
            rhs = {m: -c for m, c in g.items() if m != lead}
            terms, den = self._from_frac_terms(rhs)
            self._rules.append((lead, terms, den))
        self._bump()

    def vanish_above(self, group: int, degree: int) -> None:
        """Monomials whose degree in the classes of ``group`` exceeds ``degree`` are zero."""
        old = self._limits.get(group)
        self._limits[group] = degree if old is None else min(old, degree)
        self._bump()

    def _bump(self):
        self._epoch += 1
        self._nf.clear()

    def _raw_rule(self, lhs, terms, den) -> dict:
        poly = {lhs: self._field.one}
        for m, c in terms.items():
            poly[m] = poly.get(m, self._field.zero) - self._field.new(c, den)
        return {m: c for m, c in poly.items() if c}

    # -------------------------------------------------------------- Gröbner
    def groebner(self, relations: Sequence["Element"]) -> list["Element"]:
        """Reduced Gröbner basis of the relations (together with the ring's rules)."""
        basis = self._groebner_raw(self._relation_polys(relations))
        out: list[Element] = []
        for g in basis:
            el = self._make(*self._from_frac_terms(g))
            if el.is_zero:
                continue
            el = el / el.leading_term()[1]
            if all(el != o for o in out):
                out.append(el)
        out.sort(key=lambda el: self._mkey(el._lead_mono()))
        return out

    def reduce(self, x: "Element", basis: Sequence["Element"]) -> "Element":
        """Normal form of ``x`` modulo the ideal of ``basis``: unique, order-independent."""
        x = self._coerce(x)._fresh()
        gb = self._groebner_raw(self._relation_polys(basis))
        raw = {m: self._field.new(c, x._d) for m, c in x._t.items()}
        return self._make(*self._from_frac_terms(self._reduce_raw(raw, gb)))

    def _relation_polys(self, relations) -> list[dict]:
        polys = [self._raw_rule(l, t, d) for l, t, d in self._rules]
        for rel in relations:
            rel = self._coerce(rel)._fresh()
            if not rel.is_homogeneous():
                raise AlgebraError(f"relation {rel.to_text()} = 0 is not homogeneous "
                                   f"(degrees {rel.degrees()})")
            if rel.is_zero:
                continue
            polys.append({m: self._field.new(c, rel._d) for m, c in rel._t.items()})
        return polys

    def _leading(self, poly: dict) -> Mono:
        return min(poly, key=self._mkey)

    def _reduce_raw(self, f: dict, basis: list[dict]) -> dict:
        """Full reduction of f by monic polynomials, dropping degrees above truncate."""
        f = dict(f)
        leads = [(self._leading(g), g) for g in basis]
        out: dict = {}
        while f:
            m = self._leading(f)
            c = f.pop(m)
            for lead, g in leads:
                q = self._mdiv(m, lead)
                if q is not None:
                    sign, _ = self._mmul(lead, q)
                    factor = c if sign > 0 else -c
                    for mg, cg in g.items():
                        if mg == lead:
                            continue
                        p = self._mmul(mg, q)
                        if p is None:
                            continue
                        s, mm = p
                        v = f.get(mm, self._field.zero) - (factor * cg if s > 0 else -factor * cg)
                        if v:
                            f[mm] = v
                        else:
                            f.pop(mm, None)
                    break
            else:
                out[m] = c
        return out

    def _groebner_raw(self, polys: list[dict]) -> list[dict]:
        """Buchberger's algorithm with degree truncation (relations are homogeneous)."""
        for f in polys:
            for m in f:
                if any(self._gens[i].degree % 2 for i, _ in m):
                    raise AlgebraError("relations among odd-degree classes are not supported")
        basis: list[dict] = []

        def monic(f):
            lc = f[self._leading(f)]
            return {m: c / lc for m, c in f.items()}

        pending = [f for f in polys if f]
        pairs: list[tuple[int, int]] = []
        for f in pending:
            h = self._reduce_raw(f, basis)
            if h:
                basis.append(monic(h))
                pairs.extend((i, len(basis) - 1) for i in range(len(basis) - 1))
        while pairs:
            pairs.sort(key=lambda ij: self._mdeg(self._mlcm(self._leading(basis[ij[0]]),
                                                            self._leading(basis[ij[1]]))))
            i, j = pairs.pop(0)
            if basis[i] is None or basis[j] is None:
                continue
            li, lj = self._leading(basis[i]), self._leading(basis[j])
            lcm = self._mlcm(li, lj)
            if self._mdeg(lcm) > self.truncate or self._mdeg(lcm) == self._mdeg(li) + self._mdeg(lj):
                continue  # beyond truncation, or coprime leading monomials (Buchberger's criterion)
            s = self._shift(basis[i], self._mdiv(lcm, li))
            for m, c in self._shift(basis[j], self._mdiv(lcm, lj)).items():
                v = s.get(m, self._field.zero) - c
                if v:
                    s[m] = v
                else:
                    s.pop(m, None)
            h = self._reduce_raw(s, [b for b in basis if b is not None])
            if h:
                basis.append(monic(h))
                pairs.extend((k, len(basis) - 1) for k in range(len(basis) - 1) if basis[k] is not None)
        basis = [b for b in basis if b is not None]
        # Minimal, then reduced basis.
        minimal = []
        for k, g in enumerate(basis):
            lg = self._leading(g)
            if any(self._mdiv(lg, self._leading(h)) is not None and (self._leading(h) != lg or k2 < k)
                   for k2, h in enumerate(basis) if k2 != k):
                continue
            minimal.append(g)
        reduced = []
        for k, g in enumerate(minimal):
            lead = self._leading(g)
            others = [h for k2, h in enumerate(minimal) if k2 != k]
            tail = self._reduce_raw({m: c for m, c in g.items() if m != lead}, others)
            tail[lead] = self._field.one
            reduced.append(tail)
        if any(self._leading(g) == () for g in reduced):
            raise AlgebraError("the relations are inconsistent: they imply 1 = 0")
        reduced.sort(key=lambda g: self._mkey(self._leading(g)))
        return reduced

    def _shift(self, f: dict, q: Mono) -> dict:
        out = {}
        for m, c in f.items():
            p = self._mmul(m, q)
            if p is not None and self._mdeg(p[1]) <= self.truncate:
                out[p[1]] = c if p[0] > 0 else -c
        return out

    def _from_frac_terms(self, terms: dict):
        """Dict of field coefficients -> (numerator terms, common denominator)."""
        den = self._pone
        for c in terms.values():
            d = c.denom
            if d != den:
                den = den * d.exquo(den.gcd(d))
        out = {}
        for m, c in terms.items():
            if c:
                out[m] = c.numer * den.exquo(c.denom)
        return out, den

    # ------------------------------------------------------------ monomials
    def _mdeg(self, m: Mono) -> int:
        d = self._deg.get(m)
        if d is None:
            gens = self._gens
            d = sum(e * gens[i].degree for i, e in m)
            self._deg[m] = d
        return d

    def _mkey(self, m: Mono) -> tuple:
        """Sort key: ascending key = descending monomial order."""
        k = self._key.get(m)
        if k is None:
            blocks: dict[int, list] = {}
            for i, e in m:
                blocks.setdefault(self._gens[i].group, []).append((i, e))
            parts = []
            for grp in self._group_order:
                items = blocks.get(grp)
                if not items:
                    parts.append((0,))
                    continue
                vec = [0] * (self._block_pos[items[-1][0]] + 1)
                deg = 0
                for i, e in items:
                    vec[self._block_pos[i]] = e
                    deg += e * self._gens[i].degree
                parts.append((-deg, *vec))
            k = tuple(parts)
            self._key[m] = k
        return k

    def _mmul(self, a: Mono, b: Mono):
        """(sign, a*b), or None when an odd class would be squared."""
        if not a:
            return (1, b)
        if not b:
            return (1, a)
        r = self._mul.get((a, b), False)
        if r is not False:
            return r
        exps = dict(a)
        for i, e in b:
            exps[i] = exps.get(i, 0) + e
        gens = self._gens
        result = None
        if not any(e > 1 and gens[i].degree % 2 for i, e in exps.items()):
            odd_a = [i for i, _ in a if gens[i].degree % 2]
            inversions = sum(1 for j, _ in b if gens[j].degree % 2 for i in odd_a if i > j)
            result = (-1 if inversions % 2 else 1, tuple(sorted(exps.items())))
        self._mul[(a, b)] = result
        return result

    @staticmethod
    def _mdiv(m: Mono, d: Mono):
        """m / d as a monomial, or None if d does not divide m."""
        em = dict(m)
        for i, e in d:
            if em.get(i, 0) < e:
                return None
            em[i] -= e
        return tuple(sorted((i, e) for i, e in em.items() if e))

    @staticmethod
    def _mlcm(a: Mono, b: Mono) -> Mono:
        em = dict(a)
        for i, e in b:
            em[i] = max(em.get(i, 0), e)
        return tuple(sorted(em.items()))

    def _group_degree(self, m: Mono, group: int) -> int:
        return sum(e * self._gens[i].degree for i, e in m if self._gens[i].group == group)

    def _nf_mono(self, m: Mono):
        """None if m is in normal form, else (terms, den) of its normal form."""
        if m in self._nf:
            return self._nf[m]
        result = None
        for lhs, rterms, rden in self._rules:
            q = self._mdiv(m, lhs)
            if q is None:
                continue
            sign, _ = self._mmul(lhs, q)
            raw: dict = {}
            for mr, c in rterms.items():
                p = self._mmul(mr, q)
                if p is None:
                    continue
                s, mm = p
                v = raw.get(mm, self._pzero) + (c if s * sign > 0 else -c)
                if v:
                    raw[mm] = v
                else:
                    raw.pop(mm, None)
            result = self._normalize(raw, rden)
            break
        else:
            if any(self._group_degree(m, g) > lim for g, lim in self._limits.items()):
                result = ({}, self._pone)
        self._nf[m] = result
        return result

    def _normalize(self, raw: dict, den):
        """Apply rules and limits to a truncated raw term map; returns cancelled (terms, den)."""
        if self._rules or self._limits:
            out: dict = {}
            extra = []
            for m, c in raw.items():
                r = self._nf_mono(m)
                if r is None:
                    out[m] = out.get(m, self._pzero) + c
                elif r[0]:
                    extra.append((c, r))
            if extra:
                lcm = self._pone
                for _, (_, d) in extra:
                    if d != lcm:
                        lcm = lcm * d.exquo(lcm.gcd(d))
                if lcm != self._pone:
                    out = {m: c * lcm for m, c in out.items()}
                    den = den * lcm
                for c, (rt, d) in extra:
                    scale = c if d == lcm else c * lcm.exquo(d)
                    for mm, cc in rt.items():
                        out[mm] = out.get(mm, self._pzero) + scale * cc
            raw = {m: c for m, c in out.items() if c}
        return self._cancel(raw, den)

    def _cancel(self, terms: dict, den):
        """Make gcd(den, numerators) = 1 and den monic (1 when constant)."""
        one = self._pone
        if not terms:
            return {}, one
        if den == one:
            return terms, one
        if den.is_ground:
            c = den.LC
            return {m: n.quo_ground(c) for m, n in terms.items()}, one
        g = den
        for n in terms.values():
            g = g.gcd(n)
            if g.is_ground:
                break
        if not g.is_ground:
            den = den.exquo(g)
            terms = {m: n.exquo(g) for m, n in terms.items()}
        c = den.LC
        if den.is_ground:
            return {m: n.quo_ground(c) for m, n in terms.items()}, one
        if c != 1:
            den = den.quo_ground(c)
            terms = {m: n.quo_ground(c) for m, n in terms.items()}
        return terms, den

    def _make(self, raw: dict, den) -> "Element":
        T = self.truncate
        raw = {m: c for m, c in raw.items() if c and self._mdeg(m) <= T}
        terms, den = self._normalize(raw, den)
        return Element(self, terms, den)

    def _coerce(self, x) -> "Element":
        if isinstance(x, Element):
            if x._ring is not self:
                raise AlgebraError("elements of different rings cannot be combined")
            return x
        return self.scalar(x)

    # ------------------------------------------------------------- printing
    def _factor_order(self, m: Mono) -> list[tuple[int, int]]:
        return sorted(m, key=lambda ie: (self._group_rank[self._gens[ie[0]].group], ie[0]))

    def _mono_text(self, m: Mono) -> str:
        parts = []
        for i, e in self._factor_order(m):
            t = self._gens[i].text
            parts.append(t if e == 1 else f"{t}^{e}")
        return "*".join(parts) if parts else "1"

    def _mono_latex(self, m: Mono) -> str:
        parts = []
        for i, e in self._factor_order(m):
            t = self._gens[i].latex
            parts.append(t if e == 1 else f"{{{t}}}^{{{e}}}")
        return " ".join(parts)

    def _mono_expr(self, m: Mono) -> sympy.Expr:
        return sympy.Mul(*[sympy.Symbol(self._gens[i].text) ** e for i, e in m])


# ------------------------------------------------------- scalar printing
def _poly_order(poly):
    """Terms of a sympy PolyElement, highest total degree first, then lexicographic."""
    return sorted(poly.items(), key=lambda t: (-sum(t[0]), tuple(-e for e in t[0])))


def _primitive(poly):
    """poly = content * P with P integral, coprime coefficients, positive leading term."""
    from math import gcd, lcm
    items = _poly_order(poly)
    den = 1
    for _, c in items:
        den = lcm(den, int(c.denominator))
    num = 0
    for _, c in items:
        num = gcd(num, int(c.numerator * (den // c.denominator)))
    content = Fraction(num, den)
    if items[0][1] < 0:
        content = -content
    prim = [(exps, int(Fraction(int(c.numerator), int(c.denominator)) / content)) for exps, c in items]
    return content, prim


def _prim_text(prim, symbols) -> str:
    out = []
    for k, (exps, c) in enumerate(prim):
        factors = [s.name if e == 1 else f"{s.name}^{e}" for s, e in zip(symbols, exps) if e]
        mag = abs(c)
        body = "*".join(([str(mag)] if mag != 1 or not factors else []) + factors)
        if k == 0:
            out.append(("-" if c < 0 else "") + body)
        else:
            out.append((" - " if c < 0 else " + ") + body)
    return "".join(out)


def _is_atom(prim) -> bool:
    """A single symbol power or integer: safe after '/' without parentheses."""
    if len(prim) != 1:
        return False
    exps, c = prim[0]
    return (abs(c) == 1 and sum(1 for e in exps if e) <= 1) or not any(exps)


def _scalar_parts(num, den):
    """(sign, a, b, P, Q): num/den = sign * a/b * P/Q, P and Q primitive with positive lead."""
    g = num.gcd(den)
    if not g.is_ground:
        num, den = num.exquo(g), den.exquo(g)
    cn, pn = _primitive(num)
    cd, pd = _primitive(den)
    r = cn / cd
    return (-1 if r < 0 else 1), abs(r).numerator, abs(r).denominator, pn, pd


def _is_one(prim) -> bool:
    return len(prim) == 1 and not any(prim[0][0]) and prim[0][1] == 1


def _scalar_text(a, b, P, Q, symbols, alone: bool = False) -> str:
    """Text of a/b*P/Q; ``alone`` (the whole value, positive) needs no parentheses."""
    if _is_one(P):
        text = str(a)
    else:
        p = _prim_text(P, symbols)
        if len(P) > 1 and not (alone and a == 1 and b == 1 and _is_one(Q)):
            p = f"({p})"
        text = p if a == 1 else f"{a}*{p}"
    if _is_one(Q):
        return text if b == 1 else f"{text}/{b}"
    q = _prim_text(Q, symbols)
    if b == 1:
        return f"{text}/{q}" if _is_atom(Q) else f"{text}/({q})"
    return f"{text}/({b}*{q if len(Q) == 1 else '(' + q + ')'})"


def _prim_expr(prim, symbols) -> sympy.Expr:
    return sympy.Add(*[sympy.Integer(c) * sympy.Mul(*[s ** e for s, e in zip(symbols, exps)])
                       for exps, c in prim])


def _scalar_latex(a, b, P, Q, symbols) -> str:
    def factor(n, prim):
        if _is_one(prim):
            return str(n)
        body = notation.latex(_prim_expr(prim, symbols))
        if len(prim) > 1 and n != 1:
            body = rf"\left({body}\right)"
        return body if n == 1 else f"{n} {body}"
    top = factor(a, P)
    if b == 1 and _is_one(Q):
        return top
    return rf"\frac{{{top}}}{{{factor(b, Q)}}}"


class Element:
    """An immutable element of a Ring, always in normal form."""

    __slots__ = ("_ring", "_t", "_d", "_epoch")
    __hash__ = None  # type: ignore[assignment]

    def __init__(self, ring: Ring, terms: dict, den):
        self._ring = ring
        self._t = terms
        self._d = den
        self._epoch = ring._epoch

    @property
    def ring(self) -> Ring:
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
        R = a._ring
        if a._d == b._d:  # the common case: no rescaling
            fa = fb = R._pone
        else:
            g = a._d.gcd(b._d)
            fa, fb = b._d.exquo(g), a._d.exquo(g)
        terms = dict(a._t) if fa == R._pone else {m: c * fa for m, c in a._t.items()}
        for m, c in b._t.items():
            v = terms.get(m, R._pzero) + (c if fb == R._pone else c * fb)
            if v:
                terms[m] = v
            else:
                terms.pop(m, None)
        return Element(R, *R._cancel(terms, a._d * fa))

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
        T = R.truncate
        deg, mmul = R._mdeg, R._mmul
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
                if len(ca) * len(cb) > MAX_PRODUCT:
                    raise LimitError(f"a product of coefficients with {len(ca)} and {len(cb)} "
                                     f"terms is beyond the limit; simplify the input")
                prod = ca * cb
                if s < 0:
                    prod = -prod
                old = get(m)
                raw[m] = prod if old is None else old + prod
            if len(raw) > MAX_TERMS:
                raise LimitError(f"a product grew beyond {MAX_TERMS} terms (the term limit); "
                                 f"simplify the input or lower truncate")
            budget.check()
        raw = {m: c for m, c in raw.items() if c}
        return Element(R, *R._normalize(raw, a._d * b._d))

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
        R = a._ring
        num = other._t[()]
        terms = {m: c * other._d for m, c in a._t.items()}
        return Element(R, *R._cancel(terms, a._d * num))

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
                _check_power_size(poly, n)
                _check_digits([poly], n)
            return Element(R, *R._cancel({(): a._t[()] ** n}, a._d ** n))
        if () not in a._t and n * min(R._mdeg(m) for m in a._t) > R.truncate:
            return R.zero()
        if () in a._t and a._d == R._pone:  # then a^n's constant term is exactly its n-th power
            _check_digits([a._t[()]], n)
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
        return sorted({a._ring._mdeg(m) for m in a._t})

    def is_homogeneous(self) -> bool:
        return len(self.degrees()) <= 1

    def part(self, k: int) -> "Element":
        a = self._fresh()
        R = a._ring
        return Element(R, *R._cancel({m: c for m, c in a._t.items() if R._mdeg(m) == k}, a._d))

    def _lead_mono(self) -> Mono:
        return min(self._t, key=self._ring._mkey)

    def _sorted(self):
        return sorted(self._t.items(), key=lambda mc: self._ring._mkey(mc[0]))

    def _pairs(self, m: Mono) -> tuple:
        gens = self._ring._gens
        return tuple((gens[i].key, e) for i, e in self._ring._factor_order(m))

    def terms(self) -> list[tuple[tuple[tuple[str, int], ...], sympy.Expr]]:
        """(monomial as (generator key, exponent) pairs, coefficient) in normal-form order."""
        a = self._fresh()
        out = []
        for m, c in a._sorted():
            s, x, y, P, Q = _scalar_parts(c, a._d)
            coef = sympy.Integer(s) * sympy.Rational(x, y) * _prim_expr(P, a._ring.symbols) \
                / _prim_expr(Q, a._ring.symbols)
            out.append((a._pairs(m), coef))
        return out

    def leading_term(self) -> tuple["Element", "Element"]:
        """(leading monomial, its class-free coefficient) in the ring's order."""
        a = self._fresh()
        if not a._t:
            raise AlgebraError("zero has no leading term")
        m = a._lead_mono()
        R = a._ring
        return Element(R, {m: R._pone}, R._pone), Element(R, *R._cancel({(): a._t[m]}, a._d))

    def coefficient(self, monomial) -> "Element":
        """Class-free coefficient of an exact normal-form monomial (an Element or key pairs)."""
        a = self._fresh()
        R = a._ring
        if isinstance(monomial, Element):
            monomial = monomial._fresh()
            items = list(monomial._t.items())
            if len(items) != 1 or monomial._d != R._pone or items[0][1] != R._pone:
                raise AlgebraError(f"{monomial.to_text()} is not a monomial")
            m = items[0][0]
        else:
            m = R._mono_from_pairs(monomial)
            if not R._is_normal(m):
                raise AlgebraError(f"{R._mono_text(m)} is not a monomial of the normal form")
        c = a._t.get(m)
        if c is None:
            return R.zero()
        return Element(R, *R._cancel({(): c}, a._d))

    def by_group(self, group: int) -> list[tuple[tuple[tuple[str, int], ...], "Element"]]:
        """Split as sum of (monomial in ``group`` classes) * (coefficient free of them)."""
        a = self._fresh()
        R = a._ring
        gens = R._gens
        collected: dict[Mono, dict] = {}
        for m, c in a._t.items():
            f = tuple((i, e) for i, e in m if gens[i].group == group)
            r = tuple((i, e) for i, e in m if gens[i].group != group)
            sign, _ = R._mmul(f, r)
            bucket = collected.setdefault(f, {})
            bucket[r] = c if sign > 0 else -c
        out = []
        for f in sorted(collected, key=R._mkey):
            out.append((a._pairs(f), Element(R, *R._cancel(collected[f], a._d))))
        return out

    def group_degrees(self, group: int) -> list[int]:
        """Sorted degrees in the classes of ``group`` over all terms."""
        a = self._fresh()
        return sorted({a._ring._group_degree(m, group) for m in a._t})

    def generator_keys(self) -> set[str]:
        a = self._fresh()
        gens = a._ring._gens
        return {gens[i].key for m in a._t for i, _ in m}

    def free_symbols(self) -> set[sympy.Symbol]:
        a = self._fresh()
        syms = a._ring.symbols
        found = set()
        for p in list(a._t.values()) + [a._d]:
            for exps in p:
                found.update(s for s, e in zip(syms, exps) if e)
        return found

    def to_scalar(self) -> sympy.Expr:
        a = self._fresh()
        if not a.is_class_free():
            raise AlgebraError(f"{a.to_text()} contains classes")
        if not a._t:
            return sympy.Integer(0)
        return a.terms()[0][1]

    def to_expr(self) -> sympy.Expr:
        """A sympy expression with each generator as a Symbol named by its text (printing only)."""
        a = self._fresh()
        return sympy.Add(*[coef * a._ring._mono_expr(a._ring._mono_from_pairs(pairs))
                           for pairs, coef in a.terms()])

    # ---------------------------------------------------------- substitute
    def substitute(self, mapping: Mapping) -> "Element":
        """Replace generators (by key) and/or symbols simultaneously."""
        a = self._fresh()
        R = a._ring
        gen_vals: dict[int, Element] = {}
        sym_vals: dict[int, Element] = {}
        for k, v in mapping.items():
            v = R._coerce(v)._fresh()
            if isinstance(k, str):
                gen_vals[R.generator_info(k).index] = v
            elif isinstance(k, sympy.Symbol):
                if k not in R._sym_pos:
                    raise AlgebraError(f"{k} is not a declared symbol")
                sym_vals[R._sym_pos[k]] = v
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
                return Element(R, *R._cancel({(): poly}, R._pone))
            total = R.zero()
            for exps, c in poly.items():
                rest = [0] * len(exps)
                term = R.scalar(Fraction(int(c.numerator), int(c.denominator)))
                for j, e in enumerate(exps):
                    if e and j in sym_vals:
                        term = term * power("s", j, e, sym_vals[j])
                    else:
                        rest[j] = e
                if any(rest):
                    term = term * Element(R, {(): R._poly({tuple(rest): QQ(1)})}, R._pone)
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
                term = term * Element(R, {tuple(kept): R._pone}, R._pone)
            result = result + term
        return result / den

    # ------------------------------------------------------------ printing
    def _signed_terms(self):
        a = self._fresh()
        _check_digits([*a._t.values(), a._d])
        for m, c in a._sorted():
            yield m, _scalar_parts(c, a._d)

    def to_text(self) -> str:
        """Deterministic text in the document's own expression syntax (re-readable)."""
        R = self._ring
        out = []
        items = list(self._signed_terms())
        for m, (s, x, y, P, Q) in items:
            coef = _scalar_text(x, y, P, Q, R.symbols, alone=len(items) == 1 and s > 0 and not m)
            if not m:
                body = coef
            elif coef == "1":
                body = R._mono_text(m)
            else:
                body = f"{coef}*{R._mono_text(m)}"
            out.append(("-" if s < 0 else "") + body if not out else (" - " if s < 0 else " + ") + body)
        return "".join(out) if out else "0"

    def to_latex(self) -> str:
        R = self._ring
        out = []
        items = list(self._signed_terms())
        for m, (s, x, y, P, Q) in items:
            coef = _scalar_latex(x, y, P, Q, R.symbols)
            if not m:
                bare_sum = len(P) > 1 and x == 1 and y == 1 and _is_one(Q)
                lone = len(items) == 1 and s > 0
                body = rf"\left({coef}\right)" if bare_sum and not lone else coef
            elif coef == "1":
                body = R._mono_latex(m)
            else:
                if len(P) > 1 and y == 1 and _is_one(Q) and x == 1:
                    coef = rf"\left({coef}\right)"
                body = f"{coef} {R._mono_latex(m)}"
            out.append(("-" if s < 0 else "") + body if not out else (" - " if s < 0 else " + ") + body)
        return "".join(out) if out else "0"

    def __repr__(self) -> str:
        return f"Element({self.to_text()})"

    # ------------------------------------------------------------ exact data
    def to_data(self) -> dict:
        """The exact value as plain JSON data (generator keys, symbol names,
        rational strings), for the build cache: reading it back runs no code
        and no arithmetic beyond building the dictionaries."""
        a = self._fresh()
        names = [sym.name for sym in a._ring.symbols]
        gens = a._ring._gens

        def poly(p):
            return [[{names[i]: e for i, e in enumerate(exps) if e}, str(c)]
                    for exps, c in sorted(p.items())]
        return {"den": poly(a._d),
                "terms": [[[[gens[i].key, e] for i, e in m], poly(c)] for m, c in a._sorted()]}

