"""Bundles of symbolic rank: classes carried by Chern-character components.

A bundle whose rank is a declared integer symbol N has no finite list of
Chern roots, so its classes are the components of its Chern character:
generators ch_k(V) of degree 2k (k = 1..truncate/2) for a complex bundle,
ch_2k of the complexification (degree 4k) for a real one, and ch_0 = N.
Every multiplicative class is then exact for all N at once, because for
prod_i Q(y_i) with Q(0) = 1

    log prod_i Q(y_i) = sum_k l_k P_k,   log Q(y) = sum_k l_k y^k,

where P_k = sum_i y_i^k are the power sums, which are fixed multiples of the
ch components (Newton's identities in exponential form; common practice).
So c(V) = exp(sum_k (-1)^(k-1) (k-1)! ch_k), and likewise p, td, Â, L.

Classes beyond the rank.  c_k(V) is the degree-2k part of that exponential
for every k: the elementary symmetric function e_k of the roots written in
power sums.  At a numeric rank n < k it is not an independent class but the
polynomial in ch_1..ch_k that the relations among the ch of a rank-n bundle
set to zero, so the value is always right; what cannot be formed is a class
whose degree depends on N: the Euler class (top Chern class c_N) and the
spinor bundle (rank 2^(N/2)) are refused.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import factorial

from .errors import AlgebraError
from .graded import Element, Ring


@dataclass(frozen=True)
class SymbolicRank:
    """How a bundle of symbolic rank sits in the ring: its name, whether it
    is real (rank N real) or complex (rank N complex), and the symbol N."""

    name: str
    real: bool
    symbol: object  # the ring's symbol N


def key(name: str, k: int) -> str:
    return f"ch{k}({name})"


def register(ring: Ring, b: SymbolicRank, group: int = 0) -> list[str]:
    """Register the generators ch_k(V) up to the truncation (only even k for a
    real V, whose complexification has no odd ch); return their keys."""
    keys = []
    for index in range(2 if b.real else 1, ring.truncate // 2 + 1, 2 if b.real else 1):
        k = key(b.name, index)
        ring.generator(k, 2 * index, group=group)
        keys.append(k)
    return keys


def character(ring: Ring, b: SymbolicRank, keys) -> Element:
    """ch(V) (of V tensor C for a real V): N plus the generators ``keys``."""
    total = ring.symbol(b.symbol)
    for k in keys:
        total = total + ring.gen(k)
    return total


def power_sums(ch: Element, real: bool, squares: bool) -> list[Element]:
    """[_, P_1, P_2, ...] from a Chern character.

    For the Chern roots x_i of a complex bundle, P_k = sum x_i^k = k! ch_k;
    with ``squares`` the variables are y_i = x_i^2 (Pontryagin roots), so
    P_k = (2k)! ch_2k for a complex bundle, and half of that for the
    complexification of a real one (whose roots come in pairs +-x_i).
    """
    ring = ch.ring
    scale = Fraction(1, 2) if real else Fraction(1)
    width = 4 if squares else 2
    out = [ring.zero()]
    for k in range(1, ring.truncate // width + 1):
        d = k * width // 2   # the ch component that carries P_k
        out.append(ch.part(2 * d) * (factorial(d) * scale))
    return out


def exp_nilpotent(y: Element) -> Element:
    """exp(y) for y without a degree-0 part (the series stops at the truncation)."""
    if not y.part(0).is_zero:
        raise AlgebraError("exp of a value with a degree-0 part does not truncate")
    ring = y.ring
    total, term, j = ring.one(), ring.one(), 0
    while True:
        j += 1
        term = term * y / j
        if term.is_zero:
            return total
        total = total + term


def multiplicative(logs: list[Fraction], sums: list[Element]) -> Element:
    """prod_i Q(y_i) = exp(sum_k l_k P_k), with logs[k] = l_k."""
    ring = sums[0].ring
    y = ring.zero()
    for k in range(1, min(len(logs), len(sums))):
        if logs[k]:
            y = y + sums[k] * logs[k]
    return exp_nilpotent(y)


def _log_one_plus(n: int) -> list[Fraction]:
    """log(1 + y) = sum (-1)^(k-1) y^k / k."""
    return [Fraction(0)] + [Fraction((-1) ** (k - 1), k) for k in range(1, n + 1)]


def total_chern(ch: Element) -> Element:
    """c = prod (1 + x_i) from the ch of any complex bundle or construction
    (Newton's identities)."""
    sums = power_sums(ch, real=False, squares=False)
    return multiplicative(_log_one_plus(len(sums)), sums)


def total_pontryagin(ch: Element, real: bool) -> Element:
    """p = prod (1 + x_i^2), with x_i the Chern roots (complex) or the
    Pontryagin roots (real, ch of the complexification)."""
    sums = power_sums(ch, real, squares=True)
    return multiplicative(_log_one_plus(len(sums)), sums)


def refuse(b: SymbolicRank, what: str) -> AlgebraError:
    """The error for something only a numeric rank has."""
    return AlgebraError(f"{what} needs a numeric rank, but {b.name} has symbolic rank {b.symbol}")
