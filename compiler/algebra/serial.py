"""Exact ring values as plain JSON data (generator keys, symbol names, rational strings).

For the build cache: reading data back runs no code and no arithmetic beyond
building the dictionaries.
"""
from __future__ import annotations

from fractions import Fraction


def to_data(ring, terms, den) -> dict:
    """``terms``: [(monomial, numerator)] in normal-form order over ``den``."""
    names = [sym.name for sym in ring.symbols]
    gens = ring.monos.gens

    def poly(p):
        return [[{names[i]: e for i, e in enumerate(exps) if e}, str(c)]
                for exps, c in sorted(ring.coeffs.items(p))]
    return {"den": poly(den), "terms": [[[[gens[i].key, e] for i, e in m], poly(c)] for m, c in terms]}


def from_data(ring, data: dict):
    """(terms, den) from ``to_data`` output; ValueError/KeyError if it does
    not fit this ring (the cache then recomputes)."""
    position = {sym.name: i for i, sym in enumerate(ring.symbols)}

    def poly(items):
        out = {}
        for powers, coefficient in items:
            exps = [0] * len(ring.symbols)
            for name, e in powers.items():
                exps[position[name]] = int(e)
            num, _, den = str(coefficient).partition("/")
            out[tuple(exps)] = Fraction(int(num), int(den or 1))
        return ring.coeffs.from_items(out)
    by_key = ring.monos.by_key
    terms = {}
    for pairs, coefficient in data["terms"]:
        m = tuple(sorted((by_key[key].index, int(e)) for key, e in pairs))
        terms[m] = poly(coefficient)
    den = poly(data["den"])
    if not den:
        raise ValueError("zero denominator")
    return terms, den
