"""The admissible region of the declared symbols: bounds plus linear relations.

A ``symbol`` declaration may relate a symbol to earlier ones (``Nf > Nc``,
``0 < q < p``, ``Nc < Nf < 3*Nc``).  The region holds every declaration
(:class:`SymbolSpec`) and every relation as ``expr > 0`` or ``expr >= 0``
with ``expr`` linear in the symbols.  Sample points are drawn inside it (each
symbol in declaration order, its interval narrowed by the relations at the
values already drawn), a point outside it says which relation it breaks, and
the sign oracle (``signs.py``) reads the same relations.
"""
from __future__ import annotations

import dataclasses
import itertools
import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable, Sequence

from .lazysympy import sympy

from .sampling import SymbolSpec, rng_for, spelled

_FLIP = {">": "<", ">=": "<=", "<": ">", "<=": ">="}


@dataclass(frozen=True)
class Relation:
    """``expr > 0`` (strict) or ``expr >= 0``, linear in the declared symbols.

    ``text`` is the relation as the author wrote it, for messages.  For
    integer symbols and integer coefficients a strict relation is also kept
    as ``expr - 1 >= 0`` (``Nf > Nc`` is ``Nf - Nc >= 1``): see ``tight``.
    """

    expr: sympy.Expr
    strict: bool
    text: str

    @property
    def symbols(self) -> set:
        return self.expr.free_symbols

    def tight(self) -> tuple[sympy.Expr, bool]:
        """The same relation, with integer strictness folded into the constant."""
        poly = sympy.Poly(self.expr, *sorted(self.symbols, key=str)) if self.symbols else None
        integral = poly is not None and all(s.is_integer for s in self.symbols) and \
            all(c.is_integer for c in poly.coeffs())
        if self.strict and integral:
            return self.expr - 1, False
        return self.expr, self.strict

    def holds_at(self, point: dict) -> bool:
        value = self.expr.xreplace(point)
        return bool(value > 0) if self.strict else bool(value >= 0)


@dataclass(frozen=True)
class Region:
    """Declared symbols (in declaration order) and the relations between them."""

    specs: tuple[SymbolSpec, ...]
    relations: tuple[Relation, ...] = ()

    @property
    def symbols(self) -> list[sympy.Symbol]:
        return [s.symbol for s in self.specs]

    def spec(self, symbol) -> SymbolSpec | None:
        return next((s for s in self.specs if s.symbol == symbol), None)

    def restrict(self, symbols: Iterable[sympy.Symbol]) -> "Region":
        """The part of the region that speaks about ``symbols``: their specs,
        and every symbol and relation linked to them through relations."""
        wanted = set(symbols) & set(self.symbols)
        while True:
            linked = [r for r in self.relations if r.symbols & wanted]
            grown = wanted.union(*(r.symbols for r in linked))
            if grown == wanted:
                break
            wanted = grown
        return Region(tuple(s for s in self.specs if s.symbol in wanted),
                      tuple(r for r in self.relations if r.symbols <= wanted))

    def violations(self, point: dict) -> list[str]:
        """What a point breaks: declarations first, then relations, in words.

        A point that leaves some symbols free is judged only on the
        declarations and relations whose symbols it fixes."""
        broken = []
        for spec in self.specs:
            value = point.get(spec.symbol)
            if value is not None and not spec.admits(Fraction(str(value))):
                broken.append(f"{spec.name} = {value} breaks {spec.name}: {spec.describe()}")
        for rel in self.relations:
            if rel.symbols <= set(point) and not rel.holds_at(point):
                at = ", ".join(f"{s} = {point[s]}" for s in sorted(rel.symbols, key=str))
                broken.append(f"{at} breaks {rel.text}")
        return broken

    # -- bounds read from the relations ---------------------------------------

    def bounds_on(self, symbol) -> tuple[list, list]:
        """Lower and upper bounds ``(expr, strict)`` on ``symbol`` in terms of
        earlier symbols only: its declared ones and those of the relations
        in which it is the latest symbol."""
        order = {s: i for i, s in enumerate(self.symbols)}
        spec = self.spec(symbol)
        lowers, uppers = [], []
        if spec is not None and spec.lower is not None:
            lowers.append((_rational(spec.lower), spec.lower_strict))
        if spec is not None and spec.upper is not None:
            uppers.append((_rational(spec.upper), spec.upper_strict))
        for rel in self.relations:
            if max(rel.symbols, key=order.get) != symbol:
                continue
            expr, strict = rel.tight()
            c = expr.coeff(symbol)
            bound = sympy.expand(-(expr - c * symbol) / c)
            (lowers if c > 0 else uppers).append((bound, strict))
        return lowers, uppers

    def narrowed(self, spec: SymbolSpec, point: dict) -> SymbolSpec | None:
        """``spec`` with its bounds tightened by the relations at the values of
        the earlier symbols in ``point``; None when no value is left."""
        lowers, uppers = self.bounds_on(spec.symbol)
        declared = []
        for bounds, op in ((lowers, ">"), (uppers, "<")):
            for expr, strict in bounds:
                value = expr.xreplace(point)
                declared.append((op if strict else op + "=", Fraction(str(value))))
        if not declared:
            return spec
        words = ["integer"] if spec.integer else []
        words += ["nonzero"] if spec.nonzero else []
        try:
            narrow = SymbolSpec.declare(spec.name, words, declared)
        except ValueError:
            return None
        return dataclasses.replace(narrow, symbol=spec.symbol)

    def fixing(self, point: dict) -> "Region":
        """The region of the symbols ``point`` leaves free: the relations
        evaluated there, those left with one symbol folded into its bounds
        (``Nf = 5`` leaves ``Nc < 5 < 3*Nc``).  ValueError if nothing is left."""
        specs = {s.symbol: s for s in self.specs if s.symbol not in point}
        relations, bounds = [], {}
        for rel in self.relations:
            expr = rel.expr.xreplace(point)
            if len(expr.free_symbols) > 1:
                relations.append(dataclasses.replace(rel, expr=expr))
            elif expr.free_symbols:
                (symbol,) = expr.free_symbols
                c = expr.coeff(symbol)
                op = (">" if c > 0 else "<") + ("" if rel.strict else "=")
                bounds.setdefault(symbol, []).append((op, Fraction(str(-(expr - c * symbol) / c))))
        for symbol, extra in bounds.items():
            spec = specs[symbol]
            own = [(">" if spec.lower_strict else ">=", spec.lower)] if spec.lower is not None else []
            own += [("<" if spec.upper_strict else "<=", spec.upper)] if spec.upper is not None else []
            words = ["integer"] * spec.integer + ["nonzero"] * spec.nonzero
            narrow = SymbolSpec.declare(spec.name, words, own + extra)
            specs[symbol] = dataclasses.replace(narrow, symbol=symbol)
        return Region(tuple(specs.values()), tuple(relations))

    # -- sample points ---------------------------------------------------------

    def is_enumerated(self, count: int) -> bool:
        """Whether the declarations admit at most ``count`` points, so sampling
        lists them all (relations only remove points from that list)."""
        finite = [s.finite_values() for s in self.specs]
        return bool(self.specs) and all(f is not None for f in finite) and \
            math.prod(len(f) for f in finite) <= count

    def sample(self, count: int, seed: str) -> list[dict[sympy.Symbol, sympy.Rational]]:
        """``count`` distinct exact points of the region, fixed by ``seed``.

        When the declarations admit fewer than ``count`` points (bounded
        integers) every one inside the region is returned, which is then an
        exhaustive test; with no symbols the single empty point is returned.
        """
        if not self.specs:
            return [{}]
        if self.is_enumerated(count):
            points = ({s.symbol: sympy.Integer(v) for s, v in zip(self.specs, combo)}
                      for combo in itertools.product(*(s.finite_values() for s in self.specs)))
            return [p for p in points if not self.violations(p)]
        rng = rng_for(seed)
        seen: set[tuple] = set()
        points = []
        for _ in range(count * 200):
            point = self._draw(rng)
            if point is None:
                continue
            key = tuple(point.values())
            if key in seen:
                continue
            seen.add(key)
            points.append(point)
            if len(points) == count:
                break
        return points

    def _draw(self, rng) -> dict | None:
        point: dict = {}
        for spec in self.specs:
            narrow = self.narrowed(spec, point) if self.relations else spec
            if narrow is None:
                return None   # the earlier values leave no room: draw again
            value = narrow.draw(rng)
            point[spec.symbol] = sympy.Rational(value.numerator, value.denominator)
        return point


def _rational(x: Fraction) -> sympy.Rational:
    return sympy.Rational(x.numerator, x.denominator)


def build_region(declarations: Iterable[tuple[str, Sequence[str], Sequence[tuple[str, Fraction]],
                                              Sequence[tuple[sympy.Expr, str, sympy.Expr]]]]
                 ) -> Region:
    """The region of a document's ``symbol`` declarations, in order.

    Each declaration is ``(name, assumptions, bounds, relations)``:
    ``assumptions`` and ``bounds`` as for :meth:`SymbolSpec.declare` (bounds
    compare the symbol with a rational literal), and ``relations`` a list of
    ``(lhs, op, rhs)`` with ``op`` one of ``> >= < <=`` and both sides sympy
    expressions linear in this symbol and earlier ones, with rational
    coefficients; a symbol in them is matched by name, so plain
    ``sympy.Symbol(name)`` will do.  ``symbol Nc < Nf < 3*Nc`` gives two
    relations, ``(Nc, "<", Nf)`` and ``(Nf, "<", 3*Nc)``.  A relation that
    mentions only this symbol is folded into its bounds.

    Raises ValueError, with a message for the author, for anything no point
    satisfies that is visible per symbol, a later or unknown symbol, a
    nonlinear relation or an unknown operator.
    """
    specs: list[SymbolSpec] = []
    relations: list[Relation] = []
    for name, assumptions, bounds, rels in declarations:
        by_name = {s.name: s.symbol for s in specs}
        bounds = list(bounds)
        pending = []
        for lhs, op, rhs in rels:
            text = f"{spelled(lhs)} {op} {spelled(rhs)}"
            if op not in _FLIP:
                raise ValueError(f"unknown comparison {op!r} in {text}")
            expr = sympy.expand(lhs - rhs if op.startswith(">") else rhs - lhs)
            names = {s.name for s in expr.free_symbols}
            unknown = names - set(by_name) - {name}
            if unknown:
                raise ValueError(f"{text} in the declaration of {name} uses "
                                 f"{', '.join(sorted(unknown))}, which is not declared before it")
            if not expr.free_symbols:
                raise ValueError(f"{text} in the declaration of {name} names no symbol")
            poly = sympy.Poly(expr, *sorted(expr.free_symbols, key=str))
            if poly.total_degree() > 1 or not all(c.is_Rational for c in poly.coeffs()):
                raise ValueError(f"{text} in the declaration of {name} is not linear "
                                 f"with rational coefficients")
            if names == {name}:   # x > 2*1 is a bound: x op value
                c = poly.coeffs()[0]
                value = -poly.as_expr().subs({s: 0 for s in expr.free_symbols}) / c
                strict = op in (">", "<")
                bounds.append(((">" if c > 0 else "<") + ("" if strict else "="),
                               Fraction(str(value))))
                continue
            pending.append((expr, op in (">", "<"), text))
        spec = SymbolSpec.declare(name, assumptions, bounds)
        specs.append(spec)
        by_name[name] = spec.symbol
        for expr, strict, text in pending:
            expr = expr.xreplace({s: by_name[s.name] for s in expr.free_symbols})
            relations.append(Relation(expr, strict, text))
    return Region(tuple(specs), tuple(relations))


def variable_domain(v, interval, spec):
    """(lo, lo_strict, hi, hi_strict) of a variable of extremization, from its
    range and its declaration; ValueError for an empty range."""
    lo = hi = None
    lo_strict = hi_strict = False
    if spec is not None:
        lo, lo_strict, hi, hi_strict = spec.lower, spec.lower_strict, spec.upper, spec.upper_strict
    if interval is not None:
        a, b = (None if x is None else Fraction(str(x)) for x in interval)
        if a is not None and b is not None and a >= b:
            raise ValueError(f"the range ({a}, {b}) for {v} is empty")
        if a is not None and (lo is None or a >= lo):
            lo, lo_strict = a, True
        if b is not None and (hi is None or b <= hi):
            hi, hi_strict = b, True
    to_sympy = (lambda x: None if x is None else _rational(x))
    return to_sympy(lo), lo_strict, to_sympy(hi), hi_strict
