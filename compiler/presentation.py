"""The display form of a computed value, as a presentation tree.

The normal form (``Element.to_text``) is made for comparing; a reader wants
what a paper prints: class monomials collected, the factor common to every
coefficient pulled out in front, each coefficient a factored rational
function, an overall sign pulled out when that saves minus signs, and
radicals kept whole.  ``(g-1)(8N^3-3N-5)/24`` rather than the expanded sum.
The tree (plain lists, see ``compiler.results``) is what the printers read;
its text form is in the document syntax and reads back to the same value.
Class polynomials are factored on FLINT straight from the ring's
coefficients (sympy only spells the small factors), so a large value costs
little; class-free values with radicals go through sympy's ``factor``.
"""
from __future__ import annotations

from fractions import Fraction
from functools import lru_cache
from math import gcd, lcm

import flint

from .algebra import printing
from .algebra.graded import Element
from .algebra.lazysympy import sympy
from .spelling import Spelling, opposite, product, shorter_negated

#: Class-free sympy values with more operations than this are left as they
#: are: sympy's factor costs more on them than a reader gains from it.
FACTOR_LIMIT = 400
#: Class polynomials with more terms than this are shown term by term as
#: the normal form gives them (nobody reads a thousand factored
#: coefficients, and factoring them all would dominate the build).
COLLECT_LIMIT = 60


def _negative(expr) -> bool:
    return expr.could_extract_minus_sign()


def _sum(expr, order) -> list:
    """An Add as a tree, its terms in a fixed order; a sum is written as the
    negative of its opposite when that needs fewer minus signs."""
    terms = [_node(t, order) for t in order(expr)]
    if shorter_negated([t[0] == "neg" for t in terms]):
        return ["neg", ["add", *opposite(terms)]]
    return ["add", *terms]


def _power(base, exp, order) -> list:
    if exp == sympy.Rational(1, 2):
        return ["sqrt", _node(base, order)]
    if isinstance(exp, sympy.Rational) and exp.q == 2:
        return ["pow", ["sqrt", _node(base, order)], int(exp.p)]
    if isinstance(exp, sympy.Rational) and exp.q > 2:  # a Cardano root: base^(p/q) = root(base, q)^p
        root = ["root", _node(base, order), int(exp.q)]
        return root if exp.p == 1 else ["pow", root, int(exp.p)]
    return ["pow", _node(base, order), int(exp)]


def _mul(expr, order) -> list:
    """num/den with the number first; a negative factor's sign goes out front."""
    coeff, rest = expr.as_coeff_mul()
    sign = coeff < 0
    coeff = abs(coeff)
    num, den = [], []
    for f in sorted(rest, key=lambda f: sympy.default_sort_key(f.as_base_exp()[0])):
        base, exp = f.as_base_exp()
        target = den if exp.is_negative else num
        exp = -exp if exp.is_negative else exp
        if isinstance(base, sympy.Add) and exp.is_integer and _negative(base):
            tree = _sum(base, order)  # written with its sign outside: (1 - z) is -(z - 1)
            tree = ["add", *opposite(tree[1:])] if tree[0] == "add" else tree[1]
            sign ^= bool(exp % 2)
            target.append(tree if exp == 1 else ["pow", tree, int(exp)])
            continue
        target.append(_node(base, order) if exp == 1 else _power(base, exp, order))
    if coeff.p != 1 or not num:
        num.insert(0, ["int", int(coeff.p)])
    if coeff.q != 1:
        den.insert(0, ["int", int(coeff.q)])
    tree = product(num)
    if den:
        tree = ["div", tree, product(den)]
    return ["neg", tree] if sign else tree


def _node(expr, order) -> list:
    """A sympy expression as a tree, keeping the shape it already has."""
    if isinstance(expr, sympy.Integer):
        return ["neg", ["int", -int(expr)]] if expr < 0 else ["int", int(expr)]
    if isinstance(expr, sympy.Rational):
        tree = ["div", ["int", abs(int(expr.p))], ["int", int(expr.q)]]
        return ["neg", tree] if expr < 0 else tree
    if isinstance(expr, sympy.Symbol):
        return ["sym", expr.name]
    if isinstance(expr, sympy.Add):
        return _sum(expr, order)
    if isinstance(expr, sympy.Mul):
        return _mul(expr, order)
    if isinstance(expr, sympy.Pow):
        if expr.exp.is_negative:
            return _mul(expr, order)
        return _power(expr.base, expr.exp, order)
    if isinstance(expr, sympy.Abs):  # |x| has no spelling of its own in the syntax
        return ["sqrt", ["pow", _node(expr.args[0], order), 2]]
    raise ValueError(f"no display form for {type(expr).__name__}")


def _ordered(expr) -> list:
    return list(expr.as_ordered_terms())


@lru_cache(maxsize=4096)  # the same value is shown by its step, by show and in prose
def _factored(expr):
    if sympy.count_ops(expr) > FACTOR_LIMIT:
        return expr
    return _radicals_gathered(sympy.factor(expr))


def _radicals_gathered(expr):
    """Each factor that is a sum with square roots, as A + B sqrt(D) with A, B factored."""
    roots = sorted({p for p in expr.atoms(sympy.Pow) if p.exp.is_Rational and p.exp.q == 2},
                   key=sympy.default_sort_key)
    if not roots:
        return expr
    factors = []
    for f in sympy.Mul.make_args(expr):
        base, exp = f.as_base_exp()
        if isinstance(base, sympy.Add) and base.has(*roots):
            base = sympy.collect(base, roots, func=sympy.factor)
        factors.append(sympy.Pow(base, exp) if exp != 1 else base)
    return sympy.Mul(*factors)


def _basic(expr):
    return expr if isinstance(expr, sympy.Basic) else sympy.Integer(expr)


def scalar_tree(expr) -> list:
    """A class-free value in display form."""
    return _node(_factored(_basic(expr)), _ordered)


def _poly_expr(coeffs, poly):
    """A FLINT polynomial of ``coeffs`` as a sympy sum."""
    return sympy.Add(*[sympy.Rational(c.numerator, c.denominator) * sympy.Mul(
        *[s ** e for s, e in zip(coeffs.sympy_symbols(), exps) if e]) for exps, c in coeffs.items(poly)])


def _content(coeffs, poly) -> Fraction:
    """The positive rational that leaves coprime integer coefficients."""
    values = [c for _, c in coeffs.items(poly)]
    den = lcm(*(c.denominator for c in values))
    return Fraction(gcd(*(c.numerator * (den // c.denominator) for c in values)), den)


def _fraction_tree(spelling: Spelling, coeffs, num, den) -> list:
    """num/den (FLINT polynomials) factored on FLINT, shown as ``sympy.factor``
    writes it: a rational times integer primitive factors, each with a
    positive leading coefficient (see ``spelling``)."""
    coeff, factors = Fraction(1), []
    for poly, sign in ((num, 1), (den, -1)):
        content, parts = poly.factor()
        coeff *= Fraction(int(content.p), int(content.q)) ** sign
        for f, e in parts:
            terms = coeffs.items(f)
            scale = _content(coeffs, f) * (-1 if spelling.leading(terms) < 0 else 1)
            coeff *= scale ** (int(e) * sign)
            factors.append(([(exps, c / scale) for exps, c in terms], int(e) * sign))
    return spelling.factored_tree(coeff, factors)


def _quotient_negative(spelling: Spelling, coeffs, num, den) -> bool:
    """Whether num/den, written as ``sympy.cancel`` writes it, shows a minus
    sign (sympy spells it when the denominator has symbols)."""
    if den.is_constant():
        return spelling.negative([(exps, c / _number(den)) for exps, c in coeffs.items(num)])
    return _negative(_quotient_expr(coeffs, num, den))


def _quotient_expr(coeffs, num, den):
    """num/den as ``sympy.cancel`` writes it."""
    return sympy.cancel(_poly_expr(coeffs, num) / _poly_expr(coeffs, den))


def _q(value: Fraction):
    return flint.fmpq(value.numerator, value.denominator)


def _number(poly) -> Fraction:
    c = poly.coeffs()[0]
    return Fraction(int(c.p), int(c.q))


def _primitive(coeffs, poly):
    return poly * _q(1 / _content(coeffs, poly))


def _common(coeffs, fractions: list):
    """The factor every coefficient shares, as (numerator, denominator): gcd
    of the numerators over lcm of the denominators, integer contents
    included (the sign is chosen by the caller)."""
    top = bottom = None
    whole = Fraction(0)
    for _, num, den in fractions:
        c = _content(coeffs, num) / _content(coeffs, den)
        whole = Fraction(gcd(whole.numerator, c.numerator), lcm(whole.denominator, c.denominator))
        n, d = _primitive(coeffs, num), _primitive(coeffs, den)
        top = n if top is None else _primitive(coeffs, top.gcd(n))
        bottom = d if bottom is None else _primitive(coeffs, coeffs.lcm(bottom, d))
    return top * _q(whole), bottom


def _reduced(coeffs, num, den):
    g = num.gcd(den)
    return coeffs.exquo(num, g), coeffs.exquo(den, g)


def _parts_tree(coeffs, num, den) -> list:
    """num/den term by term as the normal form writes it: sign, a/b, P/Q
    with P and Q primitive (no sympy: this is the path for huge values)."""
    s, a, b, P, Q = printing.scalar_parts(coeffs, num, den)
    top = [] if a == 1 and not printing.is_one(P) else [["int", a]]
    top += [] if printing.is_one(P) else [_prim_tree(P, coeffs.symbols)]
    bottom = ([] if b == 1 else [["int", b]]) + ([] if printing.is_one(Q) else [_prim_tree(Q, coeffs.symbols)])
    tree = product(top)
    tree = ["div", tree, product(bottom)] if bottom else tree
    return ["neg", tree] if s < 0 else tree


def _prim_tree(prim, symbols) -> list:
    terms = []
    for exps, c in prim:
        factors = [["sym", s.name] if e == 1 else ["pow", ["sym", s.name], e]
                   for s, e in zip(symbols, exps) if e]
        if abs(c) != 1 or not factors:
            factors.insert(0, ["int", abs(c)])
        term = product(factors)
        terms.append(["neg", term] if c < 0 else term)
    return terms[0] if len(terms) == 1 else ["add", *terms]


def _monomial(ring, pairs) -> list:
    factors = [["cls", key] if e == 1 else
               ["pow", ["cls", key], e] for key, e in pairs]
    return product(factors)


def _term(coef_tree: list, mono: list) -> list:
    """coefficient × monomial, with the coefficient's sign outside."""
    if coef_tree[0] == "neg":
        return ["neg", _term(coef_tree[1], mono)]
    if coef_tree == ["int", 1]:
        return mono
    factors = coef_tree[1:] if coef_tree[0] == "mul" else [coef_tree]
    return ["mul", *factors, mono]


def element_tree(value: Element) -> list:
    """A class polynomial: monomials in normal-form order, common factor out."""
    fractions = value.fractions()
    if not fractions:
        return ["int", 0]
    ring, coeffs = value.ring, value.ring.coeffs
    spelling = Spelling(s.name for s in coeffs.symbols)
    if len(fractions) == 1 and not fractions[0][0]:
        return _fraction_tree(spelling, coeffs, *fractions[0][1:])
    if len(fractions) > COLLECT_LIMIT:
        return ["add", *(_term(_parts_tree(coeffs, num, den), _monomial(ring, pairs)) if pairs
                         else _parts_tree(coeffs, num, den) for pairs, num, den in fractions)]
    top, bottom = _common(coeffs, fractions)
    quotients = [_reduced(coeffs, num * bottom, den * top) for _, num, den in fractions]
    if shorter_negated([_quotient_negative(spelling, coeffs, *q) for q in quotients]):
        top, quotients = -top, [(-n, d) for n, d in quotients]
    body = []
    for (pairs, _, _), (num, den) in zip(fractions, quotients):
        coef_tree = _fraction_tree(spelling, coeffs, num, den)
        body.append(_term(coef_tree, _monomial(ring, pairs)) if pairs else coef_tree)
    tree = body[0] if len(body) == 1 else ["add", *body]
    if top == bottom:
        return tree
    return _term(_fraction_tree(spelling, coeffs, top, bottom), tree)


def _expanded(expr) -> list:
    """The terms of a multiplied-out class-free value."""
    return [_node(t, _ordered) for t in _ordered(sympy.expand(_basic(expr)))]


def _collected(expr, symbol) -> list:
    """A class-free value as a sum over the powers of ``symbol``, highest
    first, each coefficient factored; a denominator free of ``symbol`` goes
    into the coefficients.  Raises ValueError when the value is not a
    polynomial in ``symbol`` over such a denominator."""
    num, den = sympy.cancel(_basic(expr)).as_numer_denom()
    if not num.is_polynomial(symbol) or not den.is_polynomial(symbol):
        raise ValueError(f"it is not a rational function of {symbol.name}")
    inner = den.has(symbol)
    poly = sympy.Poly(num, symbol)
    terms = []
    for (k,), coef in zip(poly.monoms(), poly.coeffs()):
        tree = scalar_tree(coef if inner else coef / den)
        power = ["sym", symbol.name] if k == 1 else ["pow", ["sym", symbol.name], k]
        terms.append(tree if k == 0 else _term(tree, power))
    tree = terms[0] if len(terms) == 1 else ["add", *terms]
    return ["div", tree, scalar_tree(den)] if inner else tree


def _in_form(value, coefficient, distribute: bool) -> list:
    """``value`` with each coefficient drawn by ``coefficient`` (a list of
    terms), the monomials in normal-form order and nothing pulled out; with
    ``distribute`` each term of a coefficient takes the monomial itself."""
    if not isinstance(value, Element):
        terms = coefficient(value)
    else:
        terms = []
        for pairs, coef in value.terms():
            body = coefficient(coef)
            if not pairs:
                terms += body
            elif len(body) == 1 or distribute:
                terms += [_term(t, _monomial(value.ring, pairs)) for t in body]
            else:
                terms.append(["mul", ["add", *body], _monomial(value.ring, pairs)])
    if not terms:
        return ["int", 0]
    return terms[0] if len(terms) == 1 else ["add", *terms]


def display_tree(value, form: str = "factored", symbol=None) -> list:
    """Any computed value (class polynomial or class-free) in display form,
    or in the form an author asked for: ``expanded`` (multiplied out), or
    ``collected`` in the sympy symbol ``symbol``."""
    if form == "expanded":
        return _in_form(value, _expanded, True)
    if form == "collected":
        return _in_form(value, lambda c: _sum_terms(_collected(c, symbol)), False)
    if isinstance(value, Element):
        return element_tree(value)
    return scalar_tree(value)


def _sum_terms(tree: list) -> list:
    return list(tree[1:]) if tree[0] == "add" else [tree]
