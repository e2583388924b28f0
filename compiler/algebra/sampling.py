"""Declared symbols and the deterministic values drawn for them.

A ``symbol`` statement gives assumptions and bounds.  Symbolic work needs
them as sympy assumptions (so ``sqrt(N**2)`` becomes ``N``); checks and
extremization that cannot be settled symbolically need exact values that
satisfy them, the same values on every build, so a report never flickers.
Points of several symbols, with the relations between them, are drawn by
``region.py``.
"""
from __future__ import annotations

import dataclasses
import hashlib
import math
import random
from dataclasses import dataclass
from fractions import Fraction
from typing import Iterable

from .lazysympy import sympy

ASSUMPTIONS = ("integer", "positive", "nonnegative", "real", "nonzero")
_OPS = (">=", ">", "<=", "<")


class _SymbolField:
    """The ``symbol`` field: a sympy Symbol, or the name it is made from on
    first read (with the assumptions the declaration gives), so declaring a
    symbol does not import sympy."""

    def __set_name__(self, owner, name):
        self.slot = "_" + name

    def __get__(self, spec, owner=None):
        if spec is None:
            raise AttributeError(self.slot)  # the field has no default
        value = spec.__dict__[self.slot]
        if isinstance(value, str):
            value = spec.__dict__[self.slot] = spec._sympy_symbol()
        return value

    def __set__(self, spec, value):
        spec.__dict__[self.slot] = value


@dataclass(frozen=True)
class SymbolSpec:
    """A declared symbol: a real number, maybe integer, in an interval."""

    symbol: sympy.Symbol = _SymbolField()
    integer: bool = False
    lower: Fraction | None = None
    upper: Fraction | None = None
    lower_strict: bool = False
    upper_strict: bool = False
    nonzero: bool = False

    @property
    def name(self) -> str:
        value = self.__dict__["_symbol"]
        return value if isinstance(value, str) else value.name

    @classmethod
    def declare(cls, name: str, assumptions: Iterable[str] = (),
                bounds: Iterable[tuple[str, Fraction]] = ()) -> "SymbolSpec":
        """Build the spec; its sympy Symbol, with matching assumptions, is made on first use.

        Raises ValueError for an unknown assumption or operator and for a
        declaration no number satisfies.
        """
        assumptions = list(assumptions)
        for word in assumptions:
            if word not in ASSUMPTIONS:
                raise ValueError(f"unknown assumption {word!r} for {name}; "
                                 f"expected one of {', '.join(ASSUMPTIONS)}")
        integer = "integer" in assumptions
        lo: Fraction | None = None
        lo_strict = False
        hi: Fraction | None = None
        hi_strict = False

        def raise_lower(value: Fraction, strict: bool):
            nonlocal lo, lo_strict
            if lo is None or value > lo or (value == lo and strict):
                lo, lo_strict = value, strict

        def cap_upper(value: Fraction, strict: bool):
            nonlocal hi, hi_strict
            if hi is None or value < hi or (value == hi and strict):
                hi, hi_strict = value, strict

        if "positive" in assumptions:
            raise_lower(Fraction(0), True)
        if "nonnegative" in assumptions:
            raise_lower(Fraction(0), False)
        for op, value in bounds:
            value = Fraction(value)
            if op not in _OPS:
                raise ValueError(f"unknown comparison {op!r} in a bound on {name}")
            if op.startswith(">"):
                raise_lower(value, op == ">")
            else:
                cap_upper(value, op == "<")
        spec = cls(name, integer, lo, hi, lo_strict, hi_strict, "nonzero" in assumptions)
        spec._require_satisfiable()
        return spec

    # -- the admissible set -------------------------------------------------

    def integer_range(self) -> tuple[int | None, int | None]:
        """The smallest and largest admissible integers (None: unbounded)."""
        first = last = None
        if self.lower is not None:
            first = math.floor(self.lower) + 1 if (
                self.lower_strict or self.lower.denominator != 1) else int(self.lower)
        if self.upper is not None:
            last = math.ceil(self.upper) - 1 if (
                self.upper_strict or self.upper.denominator != 1) else int(self.upper)
        return first, last

    def _require_satisfiable(self) -> None:
        if self.integer:
            first, last = self.integer_range()
            if first is not None and last is not None:
                if first > last or (self.nonzero and first == last == 0):
                    raise ValueError(f"no integer satisfies the declaration of "
                                     f"{self.name}: {self.describe()}")
            return
        if self.lower is not None and self.upper is not None:
            empty = self.lower > self.upper or (
                self.lower == self.upper and (self.lower_strict or self.upper_strict))
            if empty or (self.nonzero and self.lower == self.upper == 0):
                raise ValueError(f"no number satisfies the declaration of "
                                 f"{self.name}: {self.describe()}")

    def _sympy_symbol(self) -> sympy.Symbol:
        """A Symbol whose sympy assumptions say as much as the bounds allow."""
        flags: dict[str, bool] = {"real": True}
        if self.integer:
            flags["integer"] = True
        if self.lower is not None and (self.lower > 0 or (self.lower == 0 and self.lower_strict)):
            flags["positive"] = True
        elif self.lower is not None and self.lower >= 0:
            flags["nonnegative"] = True
        elif self.upper is not None and (self.upper < 0 or (self.upper == 0 and self.upper_strict)):
            flags["negative"] = True
        elif self.upper is not None and self.upper <= 0:
            flags["nonpositive"] = True
        if self.nonzero and not (flags.get("positive") or flags.get("negative")):
            flags["nonzero"] = True
        return sympy.Symbol(self.name, **flags)

    def admits(self, value) -> bool:
        """Whether a rational value satisfies every declared assumption."""
        value = Fraction(value)
        if self.integer and value.denominator != 1:
            return False
        if self.nonzero and value == 0:
            return False
        if self.lower is not None and (value < self.lower or
                                       (self.lower_strict and value == self.lower)):
            return False
        if self.upper is not None and (value > self.upper or
                                       (self.upper_strict and value == self.upper)):
            return False
        return True

    def describe(self) -> str:
        """The declaration in words, e.g. ``integer, g >= 2``."""
        parts = ["integer" if self.integer else "real"]
        x = self.name
        lo, hi = self.lower, self.upper
        if lo == 0 and hi is None:
            parts.append("positive" if self.lower_strict else "nonnegative")
        elif lo is not None and hi is not None:
            parts.append(f"{lo} {'<' if self.lower_strict else '<='} {x} "
                         f"{'<' if self.upper_strict else '<='} {hi}")
        elif lo is not None:
            parts.append(f"{x} {'>' if self.lower_strict else '>='} {lo}")
        elif hi is not None:
            parts.append(f"{x} {'<' if self.upper_strict else '<='} {hi}")
        if self.nonzero and self.admits_zero_by_bounds():
            parts.append("nonzero")
        return ", ".join(parts)

    def admits_zero_by_bounds(self) -> bool:
        """Whether 0 lies in the interval (so ``nonzero`` says something)."""
        return SymbolSpec(self.name, False, self.lower, self.upper,
                          self.lower_strict, self.upper_strict).admits(0)

    # -- drawing values -----------------------------------------------------

    def finite_values(self) -> list[int] | None:
        """All admissible values when there are only a few (bounded integers)."""
        if not self.integer:
            return None
        first, last = self.integer_range()
        if first is None or last is None or last - first > 10_000:
            return None
        return [v for v in range(first, last + 1) if self.admits(v)]

    def draw(self, rng: random.Random) -> Fraction:
        """One admissible value, small or moderate in size."""
        for _ in range(1000):
            value = self._draw_once(rng)
            if self.admits(value):
                return value
        raise ValueError(f"could not draw a value for {self.name}: {self.describe()}")

    def _draw_once(self, rng: random.Random) -> Fraction:
        if self.integer:
            first, last = self.integer_range()
            if first is not None and last is not None:
                return Fraction(rng.randint(first, last))
            step = _magnitude_int(rng)
            if first is not None:
                return Fraction(first + step)
            if last is not None:
                return Fraction(last - step)
            return Fraction(step * rng.choice((1, -1)))
        lo, hi = self.lower, self.upper
        if lo is not None and hi is not None:
            if lo == hi:
                return lo
            # A fraction strictly inside, sometimes an end point when allowed.
            if rng.random() < 0.05:
                return rng.choice((lo, hi))
            d = rng.randint(2, 12)
            return lo + (hi - lo) * Fraction(rng.randint(1, d - 1), d)
        offset = _magnitude_fraction(rng)
        if lo is not None:
            return lo + offset
        if hi is not None:
            return hi - offset
        return offset * rng.choice((1, -1))


def _magnitude_int(rng: random.Random) -> int:
    """A nonnegative integer: mostly small, sometimes moderate."""
    return rng.choice((rng.randint(0, 3), rng.randint(0, 10), rng.randint(0, 40)))


def _magnitude_fraction(rng: random.Random) -> Fraction:
    """A positive rational: small fractions, small integers, moderate values."""
    kind = rng.random()
    if kind < 0.35:
        return Fraction(rng.randint(1, 9), rng.randint(1, 9))
    if kind < 0.7:
        return Fraction(rng.randint(1, 12))
    return Fraction(rng.randint(1, 400), rng.randint(1, 7))


def rng_for(seed: str) -> random.Random:
    """A random generator fixed by a string (document path and line)."""
    digest = hashlib.sha256(seed.encode("utf-8")).digest()
    return random.Random(int.from_bytes(digest[:16], "big"))


def evaluate(expr: sympy.Expr, point: dict, digits: int = 50):
    """``expr`` at a point: exact substitution first, then ``digits`` digits.

    Substituting exactly before evaluating avoids the cancellation errors of
    evaluating a large expression with floats in it.
    """
    exact = expr.xreplace(point)
    return exact.evalf(digits)


def describe_point(point: dict) -> str:
    """``N = 3, g = 2`` in the order of the symbols' names."""
    return ", ".join(f"{s} = {v}" for s, v in sorted(point.items(), key=lambda kv: kv[0].name))


def spelled(expr: sympy.Expr) -> str:
    """An exact value in a message, with ``^`` for powers as in every other
    message (sympy's own spelling has ``**``)."""
    return sympy.sstr(expr).replace("**", "^")
