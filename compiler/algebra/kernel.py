"""The ring's kernel: a whole element as one FLINT polynomial over symbols and classes.

Measured (bench/bench_ring.py), one ``flint.fmpq_mpoly`` per element over the
symbols and the class generators together is within a small factor of bare
FLINT on a cube, where a map monomial -> FLINT coefficient costs tens of
times more in Python loops.  Variables, in lexicographic order: the symbols
(``s0``...), then ``t``, then the generators (``g0``...).  Each generator is
stored times ``t`` to its form degree, so the exponent of ``t`` is a term's
form degree and every normal-form step is a C-level operation:

- truncation: the remainder on division by t^(truncate+1);
- a rule lhs -> rhs/den (a monic monomial lhs, from the reduced Gröbner
  basis): q, r = divmod(P, lhs), then P = r*den + q*rhs over D*den, repeated
  until no lhs divides a term (the rhs is smaller in the block order);
- a degree limit on a fiber group: the remainder on division by each
  minimal monomial beyond the limit.

The denominator lives in the same context and involves symbols only; it is
kept cancelled and with leading coefficient 1 in the symbols' lex order.
Odd-degree classes anticommute, which a commutative product cannot see: a
product of two elements that both contain odd classes goes term by term.
One FLINT call cannot be interrupted; ``MAX_PRODUCT`` and ``MAX_TERMS``
(``element``) bound it, and the loops around the calls poll ``budget``.
"""
from __future__ import annotations

import flint

from . import budget
from .monomials import Mono


class Layout:
    """The FLINT context of one ring, grown as generators are registered."""

    def __init__(self, coeffs, monos, truncate: int):
        self.coeffs = coeffs
        self.monos = monos
        self.truncate = truncate
        self.nsym = len(coeffs.symbols)
        self.version = 0
        self._build(coeffs.ctx.append_gens("t"))

    def _build(self, ctx) -> None:
        self.ctx = ctx
        self.one = ctx.constant(1)
        self.zero = ctx.constant(0)
        self.t = ctx.gen(self.nsym)
        self._symbols = ctx.gens()[:self.nsym]
        self.cut = self.t ** (self.truncate + 1)
        self._mono: dict[Mono, object] = {}
        self._odd = [self.nsym + 1 + g.index for g in self.monos.gens if g.degree % 2]

    def add_generator(self) -> None:
        """A new generator was registered: one more variable (elements move lazily)."""
        self._build(self.ctx.append_gens(f"g{len(self.monos.gens) - 1}"))
        self.version += 1

    # ---------------------------------------------------------- conversions
    def mono(self, m: Mono):
        """The monomial times t^degree, as a polynomial."""
        p = self._mono.get(m)
        if p is None:
            exps = [0] * self.ctx.nvars()
            exps[self.nsym] = self.monos.degree(m)
            for i, e in m:
                exps[self.nsym + 1 + i] = e
            p = self._mono[m] = self.ctx.term(exp_vec=tuple(exps))
        return p

    def embed(self, poly):
        """A polynomial in the symbols (``coefficients``) into this context."""
        if poly.is_constant():
            return self.ctx.constant(poly.leading_coefficient()) if poly else self.zero
        return poly.compose(*self._symbols, ctx=self.ctx)

    def symbols_part(self, poly):
        """A class-free polynomial of this context back in the symbols' context."""
        if poly.is_constant():
            return self.coeffs.ctx.constant(poly.leading_coefficient()) if poly else self.coeffs.zero
        return poly.project_to_context(self.coeffs.ctx)

    def move(self, poly):
        """A polynomial of an older (smaller) context into the current one."""
        return poly if poly.context() is self.ctx else poly.project_to_context(self.ctx)

    def pack(self, terms: dict):
        """{monomial: polynomial in the symbols} -> one polynomial of this context."""
        total = self.zero
        for m, c in terms.items():
            total += self.embed(c) * self.mono(m)
        return total

    def unpack(self, P) -> dict:
        """One polynomial -> {monomial: polynomial in the symbols}."""
        ns, off = self.nsym, self.nsym + 1
        groups: dict = {}
        for exps, c in zip(P.monoms(), P.coeffs()):
            groups.setdefault(exps[off:], {})[exps[:ns]] = c
        ctx = self.coeffs.ctx
        return {tuple((i, int(e)) for i, e in enumerate(key) if e): ctx.from_dict(d)
                for key, d in groups.items()}

    # -------------------------------------------------------------- queries
    def top_degree(self, P) -> int:
        return int(P.degrees()[self.nsym]) if P else -1

    def has_odd(self, P) -> bool:
        if not self._odd or not P:
            return False
        degrees = P.degrees()
        return any(degrees[i] > 0 for i in self._odd)

    def degree_parts(self, P) -> list[tuple[int, object]]:
        """(form degree, component) pairs, highest degree first, nonzero only."""
        out = []
        rest = P
        for k in range(self.top_degree(P), -1, -1):
            if not rest:
                break
            q, rest = divmod(rest, self.t ** k)
            if q:
                out.append((k, q * self.t ** k))
        return out

    def variable_degrees(self, P) -> tuple[list[int], list[int]]:
        """(symbol positions, generator indices) that occur in P."""
        if not P:
            return [], []
        degrees = P.degrees()
        syms = [i for i in range(self.nsym) if degrees[i] > 0]
        gens = [i for i in range(len(self.monos.gens)) if degrees[self.nsym + 1 + i] > 0]
        return syms, gens

    # ---------------------------------------------------------- normal form
    def normalize(self, P, D, rules, limits):
        """Truncate, rewrite by ``rules`` [(lhs, rhs, den)], drop ``limits``
        monomials, cancel; all in this context."""
        if P and self.top_degree(P) > self.truncate:
            P = P % self.cut
        changed = bool(rules)
        while changed and P:
            budget.check()
            changed = False
            for lhs, rhs, den in rules:
                q, r = divmod(P, lhs)
                if q:
                    P, D, changed = r * den + q * rhs, D * den, True
        for m in limits:
            if P:
                P = P % m
        return self.cancel(P, D)

    def cancel(self, P, D):
        """Make gcd(D, P) = 1 and D's leading coefficient 1 (D = 1 when constant)."""
        one = self.one
        if not P:
            return self.zero, one
        if D == one:
            return P, one
        if not D.is_constant():
            g = P.gcd(D)
            if not g.is_constant():
                P, D = P / g, D / g
        c = D.leading_coefficient()
        if D.is_constant():
            return P / c, one
        if c != 1:
            P, D = P / c, D / c
        return P, D

    def product_signed(self, a: dict, b: dict) -> dict:
        """Term-by-term product of unpacked elements with the signs of odd
        classes (the commutative FLINT product cannot see them); truncated."""
        monos, T, zero = self.monos, self.truncate, self.coeffs.zero
        raw: dict = {}
        for ma, ca in a.items():
            budget.check()
            for mb, cb in b.items():
                p = monos.mul(ma, mb)
                if p is None or monos.degree(p[1]) > T:
                    continue
                s, m = p
                raw[m] = raw.get(m, zero) + (ca * cb if s > 0 else -(ca * cb))
        return raw


def minimal_beyond(degrees: dict[int, int], limit: int) -> list[Mono]:
    """Minimal monomials in the given generators ({index: degree}) of degree above ``limit``."""
    gens = sorted(degrees)
    out = []

    def walk(k: int, chosen: list, total: int):
        if total > limit:
            if all(total - degrees[i] <= limit for i, _ in chosen):
                out.append(tuple(chosen))
            return
        if k == len(gens):
            return
        i = gens[k]
        e = 0
        while True:
            walk(k + 1, chosen + ([(i, e)] if e else []), total + e * degrees[i])
            if total + e * degrees[i] > limit:
                break
            e += 1
    walk(0, [], 0)
    return out
