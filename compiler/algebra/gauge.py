"""Gauge bundles of a simple group: classes are the group's independent invariants.

A gauge bundle carries one ring generator for each basis invariant of its
group (traces.invariant_basis) of form degree up to the truncation: the
trace of the k-th power of the normalised curvature F = iF_A/2pi in the
trace in force, of form degree 2k, and for SO(2n) the Pfaffian.  The trace in
force is tr = (index / index of the base representation) tr_base, where
`index` is the Dynkin index the author chose (long roots of length squared
2: 1 for the fundamental of SU(n), 2 for the vector of SO(n) and for
Tr_adj/30 of E8).  Traces and Chern characters of a representation are
written in these generators through traces.traces (weight systems) or, at
symbolic rank, traces.symbolic_traces (Adams operations), never from a table.
An invariant not in the base representation (E6's odd Casimirs, in the 27)
is kept as the plain trace in its representation.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from math import factorial

from .element import Element
from .graded import Ring
from .groups import CLASSICAL, Group, dimension, index, representation
from .traces import MAX_DEGREE, Invariant, invariant_basis, symbolic_traces, traces
from .weights import GroupError


@dataclass(frozen=True)
class GaugeBundle:
    """A declared gauge bundle; `rank` is the rank symbol as a ring element at symbolic rank."""

    name: str
    group: Group
    trace_index: Fraction
    base_index: Fraction
    rank: Element | None
    keys: tuple[tuple[Invariant, str], ...]
    curvature: Fraction = Fraction(1)

    @property
    def scale(self) -> Fraction:
        """tr = scale * tr_base."""
        return self.trace_index / self.base_index

    def describe(self) -> str:
        base = self.group.base
        how = f"tr_{base}" if self.scale == 1 else f"{_fraction(self.scale)} tr_{base}"
        group = str(self.group) if self.rank is None else f"{self.group.family}({self.rank.to_text()})"
        factor = "" if self.curvature == 1 else f"{_fraction(self.curvature)} "
        return (f"{self.name}: gauge bundle of {group}; tr = {how} (Dynkin index "
                f"{_fraction(self.trace_index)}), ch = tr exp({factor}F) with {factor}F = i F_A / 2 pi")


def _fraction(x: Fraction) -> str:
    return str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}"


def _base_index(g: Group) -> Fraction:
    if g.n is None and g.family in CLASSICAL:
        return {"SU": Fraction(1), "SO": Fraction(2), "Sp": Fraction(1)}[g.family]
    return index(g, representation(g, g.base))


def _symbolic_basis(g: Group, top: int) -> tuple[Invariant, ...]:
    step = 1 if g.family == "SU" else 2
    return tuple(Invariant(k, "tr", g.base) for k in range(2, top + 1, step))


def text_of(name: str, g: Group, inv: Invariant) -> str:
    """The generator's key, in the document syntax (it reads back with the parser)."""
    if inv.kind == "pf":
        return f"pf({name})"
    if inv.rep == g.base:
        return f"tr({name}, {inv.degree})"
    return f"tr({name}, {inv.rep}, {inv.degree})"


def declare(ring: Ring, name: str, g: Group, trace_index: Fraction | None,
            rank: Element | None = None, curvature: Fraction | None = None) -> GaugeBundle:
    """Register the generators of a gauge bundle of g in the ring; the classes are traces of
    F, with ch = tr exp(curvature F)."""
    base_index = _base_index(g)
    if trace_index is None:
        trace_index = base_index
    if trace_index <= 0:
        raise GroupError(f"the trace index must be positive, not {_fraction(Fraction(trace_index))}; "
                         f"the {g.base} trace of {g} has index {_fraction(base_index)}")
    if ring.truncate > 2 * MAX_DEGREE:
        raise GroupError(f"traces are computed up to F^{MAX_DEGREE} (form degree {2 * MAX_DEGREE}); "
                         f"a gauge bundle needs truncate <= {2 * MAX_DEGREE}, not {ring.truncate}")
    top = ring.truncate // 2
    symbolic = g.n is None and g.family in CLASSICAL
    basis = _symbolic_basis(g, top) if symbolic else invariant_basis(g)
    keys = []
    for inv in basis:
        if inv.degree > top:
            continue
        text = text_of(name, g, inv)
        ring.generator(text, 2 * inv.degree)
        keys.append((inv, text))
    if curvature is not None and curvature == 0:
        raise GroupError("the curvature factor must not be zero")
    return GaugeBundle(name, g, Fraction(trace_index), base_index, rank, tuple(keys),
                       Fraction(1 if curvature is None else curvature))


def _invariant(ring: Ring, bundle: GaugeBundle, inv: Invariant) -> Element:
    """A basis invariant in the ring: the base traces carry 1/scale (tr_base = tr / scale)."""
    key = dict(bundle.keys)[inv]
    gen = ring.gen(key)
    return gen / bundle.scale if inv.kind == "tr" and inv.rep == bundle.group.base else gen


def _rank_polynomial(ring: Ring, bundle: GaugeBundle, coeffs) -> Element:
    total = ring.zero()
    for power, c in enumerate(coeffs):
        if c:
            total = total + bundle.rank ** power * c
    return total


def _raw_traces(bundle: GaugeBundle, rep, degree: int) -> dict:
    g = bundle.group
    name, power = rep
    if g.n is None and g.family in CLASSICAL:
        return symbolic_traces(g, name, degree, power)
    return traces(g, representation(g, name, power), degree)


def trace(ring: Ring, bundle: GaugeBundle, rep, degree: int) -> Element:
    """tr_rep F^degree; rep is (trade name or Dynkin labels, power or None).  Zero above the truncation."""
    if degree < 0:
        raise GroupError(f"tr F^{degree}: the power must be non-negative")
    if degree == 0:
        return dim(ring, bundle, rep)
    if 2 * degree > ring.truncate:
        _raw_traces(bundle, rep, min(degree, MAX_DEGREE))  # the representation must still exist
        return ring.zero()
    total = ring.zero()
    for mono, c in _raw_traces(bundle, rep, degree).items():
        term = ring.one()
        for inv in mono:
            term = term * _invariant(ring, bundle, inv)
        coefficient = _rank_polynomial(ring, bundle, c) if bundle.rank is not None else ring.scalar(c)
        total = total + term * coefficient
    return total


def dim(ring: Ring, bundle: GaugeBundle, rep) -> Element:
    g = bundle.group
    if bundle.rank is not None:
        raw = _raw_traces(bundle, rep, 0)
        return _rank_polynomial(ring, bundle, raw.get((), ()))
    name, power = rep
    return ring.scalar(dimension(g, representation(g, name, power)))


def trace_in_force(ring: Ring, bundle: GaugeBundle, degree: int) -> Element:
    """tr F^degree in the trace in force: scale * tr_base F^degree."""
    return trace(ring, bundle, (bundle.group.base, None), degree) * bundle.scale


def character(ring: Ring, bundle: GaugeBundle, rep) -> Element:
    """ch_rep = sum_k c^k tr_rep F^k / k! up to the truncation, c the curvature factor."""
    total = dim(ring, bundle, rep)
    for k in range(1, ring.truncate // 2 + 1):
        total = total + trace(ring, bundle, rep, k) * (bundle.curvature ** k / factorial(k))
    return total


def pfaffian(ring: Ring, bundle: GaugeBundle) -> Element:
    """Pf(F) of SO(2n): the Euler class of the vector bundle."""
    g = bundle.group
    for inv, key in bundle.keys:
        if inv.kind == "pf":
            return ring.gen(key)
    if g.family != "SO" or g.n is None or g.n % 2:
        raise GroupError(f"the Pfaffian belongs to SO(2n) of numeric rank, not to {g}")
    return ring.zero()  # of form degree n, above the truncation
