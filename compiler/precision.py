"""Known precision: the form degree up to which each value is exact.

As a power series carries its O(x^n), every value carries ``exact_to``: its
components of degree at most ``exact_to`` are exact, the ones above are
unknown, because ``truncate`` dropped something they depend on.  ``None``
means exact in every degree.  Arithmetic propagates it (``product``,
``power``, ``integrated``, ...); a statement that reads a degree above it
gets the message of ``beyond``, which names the ``truncate`` that would make
the value exact there, instead of a silent zero.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Optional

from .algebra.graded import Element

Precision = Optional[int]


@dataclass(frozen=True)
class Known:
    """A value with the degree up to which it is exact (``None``: everywhere)."""

    value: object
    exact_to: Precision = None


def degrees(value) -> list[int]:
    """The form degrees in which a value is (known to be) nonzero, ascending."""
    if isinstance(value, Element):
        return value.degrees()
    return [] if value == 0 else [0]


def smallest(*precisions: Precision) -> Precision:
    known = [p for p in precisions if p is not None]
    return min(known) if known else None


def _lowest(k: Known) -> Optional[int]:
    """The lowest degree in which ``k`` may be nonzero (None: it is exactly 0)."""
    found = degrees(k.value)
    return smallest(found[0] if found else None, None if k.exact_to is None else k.exact_to + 1)


def _shifted(p: Precision, by: Optional[int]) -> Precision:
    return None if p is None or by is None else p + by


def _dropped(a, b, truncate: int) -> bool:
    """Whether the ring's truncation may have dropped part of ``a * b``."""
    da, db = degrees(a), degrees(b)
    return bool(da and db) and da[-1] + db[-1] > truncate


def product(a: Known, b: Known, truncate: int) -> Precision:
    """A*B is exact up to min(a + low(B), b + low(A)), and never beyond
    ``truncate`` once the ring dropped a part of degree above it."""
    return smallest(_shifted(a.exact_to, _lowest(b)), _shifted(b.exact_to, _lowest(a)),
                    truncate if _dropped(a.value, b.value, truncate) else None)


def quotient(a: Known, b: Known) -> Precision:
    """A / B for a class-free B: 1/B is exact up to B's precision, from degree 0."""
    return smallest(a.exact_to, _shifted(b.exact_to, _lowest(a)))


def power(a: Known, k: int, truncate: int) -> Precision:
    """A^k (k >= 0): the unknown part of A times A^(k-1)."""
    if k == 0:
        return None
    found = degrees(a.value)
    cap = truncate if found and k * found[-1] > truncate else None
    low = _lowest(a)
    return smallest(_shifted(a.exact_to, None if low is None else (k - 1) * low), cap)


def integrated(p: Precision, dimension: int) -> Precision:
    """Integration over a fiber of dimension d lowers every degree by d."""
    return None if p is None else p - dimension


def substituted(target: Known, degree: int, rhs: Known) -> Precision:
    """A class of ``degree`` replaced by ``rhs``: the unknown part of ``rhs``
    enters each term that contained the class, from the target's lowest degree."""
    return smallest(target.exact_to, _shifted(rhs.exact_to, _subtract(_lowest(target), degree)))


def _subtract(low: Optional[int], degree: int) -> Optional[int]:
    return None if low is None else low - degree


def beyond(k: Known, degree: int, truncate: int, what: str) -> str:
    """The error for reading ``degree`` of a value ('' when it is exact there)."""
    p = k.exact_to
    if p is None or degree <= p:
        return ""
    needed = truncate + degree - p
    needed += needed % 2
    return (f"{what} reads degree {degree} of a value that is exact only up to degree {p} "
            f"(truncate: {truncate} dropped the rest); truncate: {needed} would make it exact there")


def whole(k: Known, truncate: int, what: str) -> str:
    """The error for reading a whole value: a nonzero number is read in degree 0,
    anything else in every degree up to ``truncate``."""
    return beyond(k, 0 if degrees(k.value) == [0] else truncate, truncate, what)


def prose_read(shown, truncate: int, what: str) -> str:
    """The error for showing a printed value (a ``ValueRecord``) in prose."""
    if shown.unknown_from is None:
        return ""
    degree = 0 if shown.degrees == [0] else truncate
    return beyond(Known(None, shown.unknown_from - 1), degree, truncate, what)


def unknown_above(p: Precision, truncate: int) -> Optional[int]:
    """The degree from which a value is unknown, if that is within ``truncate``."""
    return None if p is None or p >= truncate else p + 1
