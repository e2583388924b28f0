"""The graded ring of characteristic classes: Ring and Element, always in normal form.

An ``Element`` is a sparse map from class monomials (``monomials``) to
coefficients that are polynomials in the document's symbols sharing ONE
common denominator per element (``coefficients``).  Every element is kept in
normal form: degrees above ``truncate`` are dropped as they arise, the ring's
rewrite rules and fiber-degree limits are applied eagerly (``rewriting``), so
equality is exact comparison of the maps.  Sympy expressions appear only at
the edges (input of scalars, ``terms()`` for callers that want them); the
symbols are sympy Symbols or any keys with a ``name`` and a ``sympy()``
method (the engine's, so that a build need not import sympy).

Sympy-free queries: ``monomials()``, ``as_monomial()``, ``as_symbol()``,
``rational()`` and ``fractions()`` (coefficients as FLINT quotients).

Term API, for printers and callers: ``Element.terms()`` lists
``(monomial, coefficient)`` in normal-form order, the monomial as
``((generator key, exponent), ...)`` in printing order (base classes last) and
the coefficient a sympy expression in the symbols; ``Ring.generator_info(key)``
gives the registered ``Generator`` (key, degree, group).  The algebra
carries keys, not notation: how a class looks is the renderers' business.
"""
from __future__ import annotations

from fractions import Fraction
from typing import Iterable, Sequence

from . import serial
from .coefficients import Coefficients
from .element import Element
from .errors import AlgebraError
from .kernel import Layout
from .lazysympy import is_sympy, sympy
from .monomials import Generator, Mono, Monomials
from .rewriting import Rewriter


class Ring:
    """Generators, rules and caches shared by all elements of one document."""

    def __init__(self, symbols: Sequence, truncate: int):
        self.symbols = tuple(symbols)
        if len(set(self.symbols)) != len(self.symbols):
            raise AlgebraError("symbols must be distinct")
        self.truncate = int(truncate)
        if self.truncate < 0:
            raise AlgebraError("truncate must be non-negative")
        self.coeffs = Coefficients(self.symbols)
        self.monos = Monomials()
        self.rewriter = Rewriter(self.monos, self.coeffs, self.truncate)
        self.layout = Layout(self.coeffs, self.monos, self.truncate)
        self._epoch = 0

    # ----------------------------------------------------------- generators
    def generator(self, key: str, degree: int, *, group: int = 0) -> "Element":
        """Register (or look up) a class generator and return it as an element.

        ``key`` identifies the class (terms() and the text report it, so it
        is in the document syntax), ``group`` 0 is the base and 1, 2, ... are fibers.
        """
        old = self.monos.by_key.get(key)
        if old is not None:
            if old.degree != degree or old.group != group:
                raise AlgebraError(f"class {key} was registered with degree {old.degree} "
                                   f"in group {old.group}, not degree {degree} in group {group}")
            return self.gen(key)
        if isinstance(degree, bool) or not isinstance(degree, int) or degree <= 0:
            raise AlgebraError(f"class {key} needs a positive integer degree, got {degree!r}")
        if isinstance(group, bool) or not isinstance(group, int) or group < 0:
            raise AlgebraError(f"group must be a non-negative integer, got {group!r}")
        self.monos.add(key, degree, group)
        self.layout.add_generator()
        self._epoch += 1
        return self.gen(key)

    def gen(self, key: str) -> "Element":
        """An already registered generator as an element."""
        return self._make({((self.generator_info(key).index, 1),): self.coeffs.one}, self.coeffs.one)

    def generator_info(self, key: str) -> Generator:
        try:
            return self.monos.by_key[key]
        except KeyError:
            raise AlgebraError(f"unknown class {key}") from None

    def generators(self, group: int | None = None) -> list[Generator]:
        return [g for g in self.monos.gens if group is None or g.group == group]

    # -------------------------------------------------------------- scalars
    def zero(self) -> "Element":
        return Element(self, self.layout.zero, self.layout.one)

    def one(self) -> "Element":
        return self.scalar(1)

    def scalar(self, value) -> "Element":
        """An exact rational (int, Fraction, sympy Rational) or a sympy
        expression rational in the symbols."""
        if not isinstance(value, (int, Fraction)) and _is_sympy_expr(value):
            return self.from_scalar_expr(value)
        q = self.coeffs.rational(value)
        if not q:
            return self.zero()
        return Element(self, self.layout.ctx.constant(q), self.layout.one)

    def symbol(self, sym) -> "Element":
        pos = self.coeffs.index(sym)
        if pos is None:
            raise AlgebraError(f"{sym} is not a declared symbol")
        return Element(self, self.layout.ctx.gen(pos), self.layout.one)

    def from_scalar_expr(self, expr) -> "Element":
        """Convert a sympy expression that is a rational function of the symbols."""
        if isinstance(expr, (int, Fraction)):
            return self.scalar(expr)
        num, den = self.coeffs.from_expr(expr)
        if not num:
            return self.zero()
        return self._make({(): num}, den)

    def from_data(self, data: dict) -> "Element":
        """An element from ``Element.to_data`` output; ValueError/KeyError if
        it does not fit this ring (the cache then recomputes)."""
        return self._make(*serial.from_data(self, data))

    def monomial(self, pairs: Iterable[tuple[str, int]]) -> "Element":
        """The monomial given by (generator key, exponent) pairs; it must be in normal form."""
        m = self._mono_from_pairs(pairs)
        if not self.rewriter.is_normal(m):
            raise AlgebraError(f"{self.monos.text(m)} is not a monomial of the normal form")
        return Element(self, self.layout.mono(m), self.layout.one)

    def monomial_text(self, pairs: Iterable[tuple[str, int]]) -> str:
        """A monomial as written, in or out of normal form, for messages."""
        return self.monos.text(self._mono_from_pairs(pairs))

    def is_normal_monomial(self, pairs: Iterable[tuple[str, int]]) -> bool:
        return self.rewriter.is_normal(self._mono_from_pairs(pairs))

    def _mono_from_pairs(self, pairs) -> Mono:
        exps: dict[int, int] = {}
        for key, e in pairs:
            gen = self.generator_info(key)
            if isinstance(e, bool) or not isinstance(e, int) or e < 0:
                raise AlgebraError(f"exponent of {key} must be a non-negative integer")
            exps[gen.index] = exps.get(gen.index, 0) + e
        return tuple(sorted((i, e) for i, e in exps.items() if e))

    # ---------------------------------------------------------------- rules
    def add_rule(self, monomial: "Element", replacement: "Element") -> None:
        """Rewrite ``monomial`` as ``replacement`` in every normal form from now on.

        The rule set is kept as a reduced Gröbner basis so normal forms stay
        unique however rules were added.
        """
        monomial, replacement = monomial._fresh(), self._coerce(replacement)._fresh()
        C, monos = self.coeffs, self.monos
        items = list(monomial._t.items())
        if len(items) != 1 or monomial._den != C.one or items[0][1] != C.one or not items[0][0]:
            raise AlgebraError("the left side of a rule must be a single class monomial with coefficient 1")
        lhs = items[0][0]
        deg = monos.degree(lhs)
        if any(monos.degree(m) != deg for m in replacement._t):
            raise AlgebraError(f"rule {monos.text(lhs)} -> {replacement.to_text()} is not homogeneous")
        new = {lhs: C.frac(C.one)}
        for m, c in replacement._t.items():
            new[m] = new.get(m, C.frac(C.zero)) - C.frac(c, replacement._den)
        self.rewriter.set_rules(self.rewriter.rule_polys() + [{m: c for m, c in new.items() if c}])
        self._epoch += 1

    def vanish_above(self, group: int, degree: int) -> None:
        """Monomials whose degree in the classes of ``group`` exceeds ``degree`` are zero."""
        self.rewriter.limit(group, degree)
        self._epoch += 1

    # -------------------------------------------------------------- Gröbner
    def groebner(self, relations: Sequence["Element"]) -> list["Element"]:
        """Reduced Gröbner basis of the relations (together with the ring's rules)."""
        basis = self.rewriter.groebner(self._relation_polys(relations))
        out: list[Element] = []
        for g in basis:
            el = self._make(*self.coeffs.frac_parts(g))
            if el.is_zero:
                continue
            el = el / el.leading_term()[1]
            if all(el != o for o in out):
                out.append(el)
        out.sort(key=lambda el: self.monos.key(el._lead_mono()))
        return out

    def reduce(self, x: "Element", basis: Sequence["Element"]) -> "Element":
        """Normal form of ``x`` modulo the ideal of ``basis``: unique, order-independent."""
        x = self._coerce(x)._fresh()
        gb = self.rewriter.groebner(self._relation_polys(basis))
        raw = {m: self.coeffs.frac(c, x._den) for m, c in x._t.items()}
        return self._make(*self.coeffs.frac_parts(self.rewriter.reduce(raw, gb)))

    def _relation_polys(self, relations) -> list[dict]:
        polys = self.rewriter.rule_polys()
        for rel in relations:
            rel = self._coerce(rel)._fresh()
            if not rel.is_homogeneous():
                raise AlgebraError(f"relation {rel.to_text()} = 0 is not homogeneous "
                                   f"(degrees {rel.degrees()})")
            if rel.is_zero:
                continue
            polys.append({m: self.coeffs.frac(c, rel._den) for m, c in rel._t.items()})
        return polys

    # ------------------------------------------------------------- internal
    def _make(self, raw: dict, den) -> "Element":
        """The normal form of {monomial: polynomial in the symbols} over ``den``."""
        deg, T = self.monos.degree, self.truncate
        packed = self.layout.pack({m: c for m, c in raw.items() if c and deg(m) <= T})
        return self._normal(packed, self.layout.embed(den))

    def _normal(self, p, d) -> "Element":
        """The normal form of p/d, both in the layout's current context."""
        rules, limits = self.rewriter.packed(self.layout)
        return Element(self, *self.layout.normalize(p, d, rules, limits))

    def _renew(self, p, d) -> "Element":
        """An element built before the latest generator or rule, brought up to date."""
        return self._normal(self.layout.move(p), self.layout.move(d))

    def _coerce(self, x) -> "Element":
        if isinstance(x, Element):
            if x._ring is not self:
                raise AlgebraError("elements of different rings cannot be combined")
            return x
        return self.scalar(x)


def _is_sympy_expr(value) -> bool:
    """True for a sympy expression that is not a plain Rational, without importing sympy."""
    return is_sympy(value) and isinstance(value, sympy.Expr) and not isinstance(value, sympy.Rational)
