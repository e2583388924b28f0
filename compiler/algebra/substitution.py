"""Substitution in ring elements: generators (by key) and symbols at once, for ``Element.substitute``."""
from __future__ import annotations

from fractions import Fraction
from typing import TYPE_CHECKING, Mapping

from . import budget
from .errors import AlgebraError

if TYPE_CHECKING:
    from .element import Element


def substitute(x: Element, mapping: Mapping) -> Element:
    """Replace generators (by key) and/or symbols (the ring's or their
    sympy Symbols) simultaneously."""
    a = x._fresh()
    R, C = a._ring, a._ring.coeffs
    gen_vals: dict[int, Element] = {}
    sym_vals: dict[int, Element] = {}
    for k, v in mapping.items():
        v = R._coerce(v)._fresh()
        if isinstance(k, str):
            gen_vals[R.generator_info(k).index] = v
        elif C.index(k) is not None:
            sym_vals[C.index(k)] = v
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
            return R._make({(): poly}, C.one)
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
                term = term * R._make({(): C.from_items({tuple(rest): Fraction(1)})}, C.one)
            total = total + term
        return total

    den = scalar(R.layout.symbols_part(a._d))  # not a._den: that unpacks every term
    if not den.is_class_free() or den.is_zero:
        raise AlgebraError("the substitution makes a denominator vanish or contain classes")
    # Terms sharing the powers of the replaced generators are summed first,
    # so each product of replacements is built and multiplied once.
    L = R.layout
    if sym_vals or any(R.monos.gens[i].degree % 2 for i in gen_vals):
        groups: dict[tuple, object] = {}
        for m, c in a._t.items():
            budget.check()
            replaced = tuple((i, e) for i, e in m if i in gen_vals)
            kept = R._make({tuple((i, e) for i, e in m if i not in gen_vals): C.one}, C.one)
            groups[replaced] = groups.get(replaced, R.zero()) + scalar(c) * kept
    else:  # split by FLINT divisions, no unpacking
        groups = {f: type(a)(R, q, L.one) for f, q in L.split(a._p, list(gen_vals))}
    result = R.zero()
    for replaced, part in groups.items():
        factor = R.one()
        for i, e in replaced:
            factor = factor * power("g", i, e, gen_vals[i])
        result = result + factor * part
    return result / den
