"""The ring's rules as a reduced Gröbner basis, degree limits, and reduction modulo relations.

Rules (e^2 -> p_n, fiber relations) are kept as a reduced Gröbner basis in
the block order of ``monomials`` so that normal forms are unique however the
rules were added; degree limits per group (a fiber class of degree above the
fiber's dimension vanishes) are applied with them by ``kernel``.  Gröbner
polynomials here are dicts ``{monomial: Frac}``.
"""
from __future__ import annotations

from . import budget
from .errors import AlgebraError
from .kernel import minimal_beyond
from .monomials import Mono


class Rewriter:
    """Rules and limits of one ring, and Buchberger's algorithm in its order."""

    def __init__(self, monos, coeffs, truncate: int):
        self.monos = monos
        self.coeffs = coeffs
        self.truncate = truncate
        self.rules: list[tuple[Mono, dict, object]] = []   # (lhs, rhs terms, rhs den)
        self.limits: dict[int, int] = {}
        self._version = 0
        self._packed: tuple = (None, None)

    # ------------------------------------------------------------ rules
    def set_rules(self, polys: list[dict]) -> None:
        """Replace the rules by the reduced Gröbner basis of ``polys`` (fractions)."""
        basis = self.groebner(polys)
        self.rules = []
        for g in basis:
            lead = self.monos.leading(g)
            rhs = {m: -c for m, c in g.items() if m != lead}
            terms, den = self.coeffs.frac_parts(rhs)
            self.rules.append((lead, terms, den))
        self._version += 1

    def limit(self, group: int, degree: int) -> None:
        old = self.limits.get(group)
        self.limits[group] = degree if old is None else min(old, degree)
        self._version += 1

    def rule_polys(self) -> list[dict]:
        """The current rules as fraction polynomials lhs - rhs."""
        C = self.coeffs
        out = []
        for lhs, terms, den in self.rules:
            poly = {lhs: C.frac(C.one)}
            for m, c in terms.items():
                poly[m] = poly.get(m, C.frac(C.zero)) - C.frac(c, den)
            out.append({m: c for m, c in poly.items() if c})
        return out

    # ------------------------------------------------------ normal form
    def is_normal(self, m: Mono) -> bool:
        """No rule applies to m, it is within the limits and the truncation,
        and no odd class appears squared."""
        monos = self.monos
        if monos.degree(m) > self.truncate:
            return False
        if any(e > 1 and monos.gens[i].degree % 2 for i, e in m):
            return False
        if any(monos.div(m, lhs) is not None for lhs, _, _ in self.rules):
            return False
        return all(monos.group_degree(m, g) <= lim for g, lim in self.limits.items())

    def packed(self, layout):
        """(rules as (lhs, rhs, den), limit monomials) in ``layout``'s context, cached."""
        key = (layout.version, self._version)
        if self._packed[0] != key:
            rules = [(layout.mono(lhs), layout.pack(terms), layout.embed(den))
                     for lhs, terms, den in self.rules]
            limits = []
            for group, limit in sorted(self.limits.items()):
                degrees = {g.index: g.degree for g in self.monos.gens if g.group == group}
                limits.extend(layout.mono(m) for m in minimal_beyond(degrees, limit))
            self._packed = (key, (rules, limits))
        return self._packed[1]

    # ------------------------------------------------------------ Gröbner
    def reduce(self, f: dict, basis: list[dict]) -> dict:
        """Full reduction of f by monic polynomials, dropping degrees above truncate."""
        monos, zero = self.monos, self.coeffs.frac(self.coeffs.zero)
        f = dict(f)
        leads = [(monos.leading(g), g) for g in basis]
        out: dict = {}
        while f:
            budget.check()
            m = monos.leading(f)
            c = f.pop(m)
            for lead, g in leads:
                q = monos.div(m, lead)
                if q is not None:
                    sign, _ = monos.mul(lead, q)
                    factor = c if sign > 0 else -c
                    for mg, cg in g.items():
                        if mg == lead:
                            continue
                        p = monos.mul(mg, q)
                        if p is None:
                            continue
                        s, mm = p
                        v = f.get(mm, zero) - (factor * cg if s > 0 else -factor * cg)
                        if v:
                            f[mm] = v
                        else:
                            f.pop(mm, None)
                    break
            else:
                out[m] = c
        return out

    def groebner(self, polys: list[dict]) -> list[dict]:
        """Buchberger's algorithm with degree truncation (relations are homogeneous)."""
        monos = self.monos
        lead, deg, lcm_of, div = monos.leading, monos.degree, monos.lcm, monos.div
        if any(monos.has_odd(m) for f in polys for m in f):
            raise AlgebraError("relations among odd-degree classes are not supported")
        basis: list[dict] = []

        def monic(f):
            lc = f[lead(f)]
            return {m: c / lc for m, c in f.items()}

        pairs: list[tuple[int, int]] = []
        for f in polys:
            if not f:
                continue
            h = self.reduce(f, basis)
            if h:
                basis.append(monic(h))
                pairs.extend((i, len(basis) - 1) for i in range(len(basis) - 1))
        zero = self.coeffs.frac(self.coeffs.zero)
        while pairs:
            budget.check()
            pairs.sort(key=lambda ij: deg(lcm_of(lead(basis[ij[0]]), lead(basis[ij[1]]))))
            i, j = pairs.pop(0)
            li, lj = lead(basis[i]), lead(basis[j])
            lcm = lcm_of(li, lj)
            if deg(lcm) > self.truncate or deg(lcm) == deg(li) + deg(lj):
                continue  # beyond truncation, or coprime leading monomials (Buchberger's criterion)
            s = self._shift(basis[i], div(lcm, li))
            for m, c in self._shift(basis[j], div(lcm, lj)).items():
                v = s.get(m, zero) - c
                if v:
                    s[m] = v
                else:
                    s.pop(m, None)
            h = self.reduce(s, basis)
            if h:
                basis.append(monic(h))
                pairs.extend((k, len(basis) - 1) for k in range(len(basis) - 1))
        # Minimal, then reduced basis.
        minimal = []
        for k, g in enumerate(basis):
            lg = lead(g)
            if any(div(lg, lead(h)) is not None and (lead(h) != lg or k2 < k)
                   for k2, h in enumerate(basis) if k2 != k):
                continue
            minimal.append(g)
        reduced = []
        for k, g in enumerate(minimal):
            lg = lead(g)
            others = [h for k2, h in enumerate(minimal) if k2 != k]
            tail = self.reduce({m: c for m, c in g.items() if m != lg}, others)
            tail[lg] = self.coeffs.frac(self.coeffs.one)
            reduced.append(tail)
        if any(lead(g) == () for g in reduced):
            raise AlgebraError("the relations are inconsistent: they imply 1 = 0")
        reduced.sort(key=lambda g: monos.key(lead(g)))
        return reduced

    def _shift(self, f: dict, q: Mono) -> dict:
        out = {}
        for m, c in f.items():
            p = self.monos.mul(m, q)
            if p is not None and self.monos.degree(p[1]) <= self.truncate:
                out[p[1]] = c if p[0] > 0 else -c
        return out
