"""Chern and Pontryagin classes of a bundle known only by its rank and Chern character.

Newton's identities turn the power sums of the Chern roots, s_k = k! ch_k,
into their elementary symmetric functions, the Chern classes:
k c_k = sum_{i=1..k} (-1)^(i-1) c_{k-i} s_i (Milnor and Stasheff,
"Characteristic Classes", 1974, problem 16-A).  A real bundle is known by
the Chern character of its complexification, and p_k = (-1)^k c_2k of it;
a complex bundle's Pontryagin classes are those of its underlying real
bundle, p = sum (-1)^k [c(V) c(dual V)]_4k.
"""
from __future__ import annotations

from math import factorial

from .element import Element
from .errors import AlgebraError


def chern_classes(ch: Element, rank: int) -> list[Element]:
    """[c_0 = 1, c_1, ..., c_m], m = min(rank, truncate/2), from ch (a symbolic rank: truncate/2)."""
    ring = ch.ring
    top = min(rank, ring.truncate // 2) if isinstance(rank, int) else ring.truncate // 2
    s = [None] + [ch.part(2 * k) * factorial(k) for k in range(1, top + 1)]
    c = [ring.one()]
    for k in range(1, top + 1):
        acc = ring.zero()
        for i in range(1, k + 1):
            term = c[k - i] * s[i]
            acc = acc + term if i % 2 else acc - term
        c.append(acc / k)
    return c


def _conjugate(c: list[Element]) -> list[Element]:
    return [x if k % 2 == 0 else -x for k, x in enumerate(c)]


def pontryagin_classes(ch: Element, rank: int, real: bool) -> list[Element]:
    """[p_0 = 1, p_1, ...]: real rank `rank` for a real bundle, complex rank otherwise."""
    ring = ch.ring
    if real:
        c = chern_classes(ch, rank)
        return [ring.one()] + [c[2 * k] * (-1) ** k for k in range(1, (len(c) - 1) // 2 + 1)]
    c = chern_classes(ch, rank)
    total = sum(c, ring.zero()) * sum(_conjugate(c), ring.zero())
    return [ring.one()] + [total.part(4 * k) * (-1) ** k for k in range(1, len(c))]


def euler_class(ch: Element, rank: int, real: bool) -> Element:
    """The top Chern class of a complex bundle (zero above the truncation)."""
    if real:
        raise AlgebraError("the Euler class of a real construction is not determined by its "
                           "Chern character (its sign is not); write e of a declared bundle")
    if not isinstance(rank, int):
        raise AlgebraError("the Euler class of a construction of symbolic rank N is c_N: "
                           "it has no fixed degree")
    c = chern_classes(ch, rank)
    return c[rank] if rank < len(c) else ch.ring.zero()
