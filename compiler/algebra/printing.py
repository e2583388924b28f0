"""The normal-form text of ring elements, written from the normal-form terms.

Each coefficient num/den is printed as sign * a/b * P/Q with P and Q
primitive integer polynomials with positive leading terms, so the text is
deterministic and re-readable by the document's expression syntax.
"""
from __future__ import annotations

from fractions import Fraction
from math import gcd, lcm

from .lazysympy import sympy


def poly_order(items):
    """(exponents, coefficient) pairs, highest total degree first, then lexicographic."""
    return sorted(items, key=lambda t: (-sum(t[0]), tuple(-e for e in t[0])))


def _primitive(items):
    """poly = content * P with P integral, coprime coefficients, positive leading term."""
    items = poly_order(items)
    den = 1
    for _, c in items:
        den = lcm(den, c.denominator)
    num = 0
    for _, c in items:
        num = gcd(num, c.numerator * (den // c.denominator))
    content = Fraction(num, den)
    if items[0][1] < 0:
        content = -content
    return content, [(exps, int(c / content)) for exps, c in items]


def scalar_parts(coeffs, num, den):
    """(sign, a, b, P, Q): num/den = sign * a/b * P/Q, P and Q primitive with positive lead."""
    g = coeffs.gcd(num, den)
    if not coeffs.is_constant(g):
        num, den = coeffs.exquo(num, g), coeffs.exquo(den, g)
    cn, pn = _primitive(coeffs.items(num))
    cd, pd = _primitive(coeffs.items(den))
    r = cn / cd
    return (-1 if r < 0 else 1), abs(r).numerator, abs(r).denominator, pn, pd


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


def is_one(prim) -> bool:
    return len(prim) == 1 and not any(prim[0][0]) and prim[0][1] == 1


def _scalar_text(a, b, P, Q, symbols, alone: bool = False) -> str:
    """Text of a/b*P/Q; ``alone`` (the whole value, positive) needs no parentheses."""
    if is_one(P):
        text = str(a)
    else:
        p = _prim_text(P, symbols)
        if len(P) > 1 and not (alone and a == 1 and b == 1 and is_one(Q)):
            p = f"({p})"
        text = p if a == 1 else f"{a}*{p}"
    if is_one(Q):
        return text if b == 1 else f"{text}/{b}"
    q = _prim_text(Q, symbols)
    if b == 1:
        return f"{text}/{q}" if _is_atom(Q) else f"{text}/({q})"
    return f"{text}/({b}*{q if len(Q) == 1 else '(' + q + ')'})"


def prim_expr(prim, symbols):
    """A primitive polynomial as a sympy expression (for ``Element.terms``),
    in ``symbols`` (sympy Symbols)."""
    return sympy.Add(*[sympy.Integer(c) * sympy.Mul(*[s ** e for s, e in zip(symbols, exps)])
                       for exps, c in prim])


def to_text(ring, items) -> str:
    """``items``: [(monomial, scalar_parts)] in normal-form order."""
    out = []
    for m, (s, x, y, P, Q) in items:
        coef = _scalar_text(x, y, P, Q, ring.symbols, alone=len(items) == 1 and s > 0 and not m)
        if not m:
            body = coef
        elif coef == "1":
            body = ring.monos.text(m)
        else:
            body = f"{coef}*{ring.monos.text(m)}"
        out.append(("-" if s < 0 else "") + body if not out else (" - " if s < 0 else " + ") + body)
    return "".join(out) if out else "0"

