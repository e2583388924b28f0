"""Trace identities: tr_rho F^k in the independent Casimir invariants of the group.

tr_rho F^k is an invariant polynomial on the Lie algebra, so it is fixed by
its values on a Cartan subalgebra, where it is the power sum of the weights:
sum over weights w (with multiplicity) of (w, x)^k.  Writing it in the
group's independent Casimir invariants (traces in a base representation and,
for SO(2n), the Pfaffian) is then linear algebra over QQ: both sides are
evaluated exactly at more generic integer points x than there are unknowns,
and the overdetermined system must have exactly one solution.  Nothing is
copied from a table; numeric ranks use the weight systems of weights.py,
symbolic ranks the Adams operations of adams.py.
"""
from __future__ import annotations

import random
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache

from compiler.algebra import adams
from compiler.algebra.groups import (
    CLASSICAL, Group, Normalisation, Rep, casimir_degrees, dimension, omega, representation)
from compiler.algebra.weights import MAX_WEIGHTS, GroupError, RootSystem, weight_system

MAX_DEGREE = 12          # highest k of tr F^k
MAX_POWER = 12           # highest symmetric or antisymmetric power at symbolic rank
EXTRA_POINTS = 4         # evaluation points beyond the number of unknowns, as a check


@dataclass(frozen=True, order=True)
class Invariant:
    """A basis invariant: tr_rep F^degree (kind "tr") or the Pfaffian of SO(2n) (kind "pf").

    On the Cartan subalgebra the Pfaffian is prod_i x_i, x_i = (e_i, x) for the vector
    weights e_i, the same roots in which tr_vector F^2 = 2 sum x_i^2.  It is oriented so
    that tr_{spinor+} F^n - tr_{spinor-} F^n = n! pf, as in
    ch(S+) - ch(S-) = prod_i (e^{x_i/2} - e^{-x_i/2}).
    """

    degree: int
    kind: str
    rep: str


# ---------------------------------------------------------------- traces at numeric rank

@lru_cache(maxsize=None)
def _points(rank: int, count: int) -> tuple[tuple[int, ...], ...]:
    """Deterministic integer points x = sum c_i alpha_i^vee, so that (w, x) = w . c."""
    rng = random.Random(1000 * rank + count)
    return tuple(tuple(rng.randint(-30, 30) for _ in range(rank)) for _ in range(count))


@lru_cache(maxsize=512)
def _power_sums(rs: RootSystem, labels: tuple[int, ...], count: int) -> tuple[tuple[int, ...], ...]:
    """For each point, the power sums sum_w m_w (w . c)^k for k = 0 .. MAX_DEGREE."""
    system = [([(i, a) for i, a in enumerate(w) if a], m) for w, m in weight_system(rs, labels)]
    out = []
    for c in _points(rs.rank, count):
        values: dict[int, int] = {}
        for w, m in system:
            v = sum(a * c[i] for i, a in w)
            values[v] = values.get(v, 0) + m
        out.append(tuple(sum(m * v ** k for v, m in values.items()) for k in range(MAX_DEGREE + 1)))
    return tuple(out)


def _rep_sums(g: Group, rep: Rep, count: int) -> list[list[int]]:
    sums = [_power_sums(g.roots, labels, count) for labels in rep.summands]
    return [[sum(s[p][k] for s in sums) for k in range(MAX_DEGREE + 1)] for p in range(count)]


def _pfaffian(g: Group, count: int) -> list[int]:
    """prod_i (e_i, x) over the vector weights e_1 = omega_1, e_{i+1} = e_i - alpha_i of SO(2n)."""
    rs = g.roots
    e, out = list(omega(rs.rank, 0)), []
    vectors = [tuple(e)]
    for i in range(rs.rank - 1):
        e = [a - b for a, b in zip(e, rs.cartan[i])]
        vectors.append(tuple(e))
    for c in _points(rs.rank, count):
        value = 1
        for v in vectors:
            value *= sum(a * b for a, b in zip(v, c))
        out.append(value)
    return out


def _generator_values(g: Group, gen: Invariant, count: int) -> list[int]:
    if gen.kind == "pf":
        return _pfaffian(g, count)
    return [row[gen.degree] for row in _rep_sums(g, representation(g, gen.rep), count)]


def _monomials(generators, degree: int, start: int = 0):
    if degree == 0:
        yield ()
        return
    for i in range(start, len(generators)):
        if generators[i].degree <= degree:
            for rest in _monomials(generators, degree - generators[i].degree, i):
                yield (generators[i],) + rest


def _solve(columns: list[list[int]], rhs: list[int]) -> list[Fraction] | None:
    """The unique x with sum_j x_j columns[j] = rhs, None if the columns are dependent.
    An inconsistent system means the basis does not span: a bug, so ArithmeticError."""
    n = len(columns)
    rows = [[Fraction(col[p]) for col in columns] + [Fraction(rhs[p])] for p in range(len(rhs))]
    for j in range(n):
        pivot = next((r for r in range(j, len(rows)) if rows[r][j] != 0), None)
        if pivot is None:
            return None
        rows[j], rows[pivot] = rows[pivot], rows[j]
        rows[j] = [x / rows[j][j] for x in rows[j]]
        for r in range(len(rows)):
            if r != j and rows[r][j] != 0:
                f = rows[r][j]
                rows[r] = [a - f * b for a, b in zip(rows[r], rows[j])]
    if any(row[n] != 0 for row in rows[n:]):
        raise ArithmeticError("trace identity: the invariant basis does not span")
    return [rows[j][n] for j in range(n)]


def _product_values(g: Group, mono, count: int) -> list[int]:
    out = [1] * count
    for gen in mono:
        out = [a * b for a, b in zip(out, _generator_values(g, gen, count))]
    return out


def _classical_generators(g: Group) -> list[Invariant]:
    series, r = g.series
    degrees = {"A": range(2, r + 2), "B": range(2, 2 * r + 1, 2),
               "C": range(2, 2 * r + 1, 2), "D": range(2, 2 * r - 1, 2)}[series]
    gens = [Invariant(d, "tr", g.base) for d in degrees if d <= MAX_DEGREE]
    if series == "D" and r <= MAX_DEGREE:
        gens.append(Invariant(r, "pf", "vector"))
    return sorted(gens)


@lru_cache(maxsize=None)
def invariant_basis(g: Group) -> tuple[Invariant, ...]:
    """The independent Casimir invariants up to MAX_DEGREE.  Classical groups: traces in the
    fundamental (vector for SO) and the Pfaffian of SO(2n); exceptional groups: for each
    Casimir degree the adjoint trace, or the smallest representation's if the adjoint one
    depends on the lower invariants."""
    if g.family in CLASSICAL:
        return tuple(_classical_generators(g))
    gens: list[Invariant] = []
    for d in (d for d in casimir_degrees(g) if d <= MAX_DEGREE):
        lower = list(_monomials(gens, d))
        count = len(lower) + 1 + EXTRA_POINTS
        for rep in ("adjoint", "fundamental"):
            candidate = Invariant(d, "tr", rep)
            columns = [_product_values(g, m, count) for m in lower] + [_generator_values(g, candidate, count)]
            if _solve(columns, [0] * count) is not None:
                gens.append(candidate)
                break
        else:
            raise ArithmeticError(f"no trace gives the degree-{d} Casimir of {g}")
    return tuple(gens)


@lru_cache(maxsize=1024)
def _traces(g: Group, rep: Rep, degree: int) -> tuple:
    basis = list(_monomials(list(invariant_basis(g)), degree))
    count = len(basis) + EXTRA_POINTS
    columns = [_product_values(g, mono, count) for mono in basis]
    rhs = [row[degree] for row in _rep_sums(g, rep, count)]
    solution = _solve(columns, rhs)
    if solution is None:
        raise ArithmeticError(f"degenerate evaluation points for {g}")
    return tuple((mono, c) for mono, c in zip(basis, solution) if c)


def traces(g: Group, rep: Rep, degree: int) -> dict[tuple[Invariant, ...], Fraction]:
    """tr_rep F^degree as {monomial in invariant_basis(g): coefficient}; zero terms omitted."""
    _check_degree(degree)
    dim = dimension(g, rep)
    if dim > MAX_WEIGHTS:
        raise GroupError(f"this representation of {g} has dimension {dim}, above the limit of "
                         f"{MAX_WEIGHTS} weights for a weight system; choose a smaller representation")
    return dict(_traces(g, rep, degree))


def _check_degree(degree: int) -> None:
    if not 0 <= degree <= MAX_DEGREE:
        raise GroupError(f"traces are computed up to F^{MAX_DEGREE}; tr F^{degree} is beyond that")


# ---------------------------------------------------------------- symbolic rank

# index of the base representation with long roots of length squared 2
_BASE_INDEX = {"SU": Fraction(1), "SO": Fraction(2), "Sp": Fraction(1)}


def _symbolic_key(g: Group, name: str) -> str:
    if g.family not in CLASSICAL:
        raise GroupError(f"{g} has a fixed rank; symbolic ranks exist for SU(N), SO(N) and Sp(N)")
    if name == "fundamental" and g.family == "SO":
        name = "vector"
    if (g.family, name) not in adams.BUILDERS:
        known = sorted(n for f, n in adams.BUILDERS if f == g.family)
        raise GroupError(f"'{name}' of {g} needs a numeric rank; at symbolic rank the names are "
                         f"{', '.join(known)}")
    return name


def symbolic_traces(g: Group, name: str, degree: int, power: int | None = None):
    """tr_rho F^degree of SU(N), SO(N) or Sp(N) (N = g.n, usually None) as {monomial in base
    traces: coefficients in ascending powers of N}.  Valid where tr F^2 .. tr F^degree are
    independent (N >= degree for SU(N)); at smaller N use `traces`."""
    _check_degree(degree)
    if power is not None and not 1 <= power <= MAX_POWER:
        raise GroupError(f"{name} {power}: at symbolic rank the power must be from 1 to {MAX_POWER}")
    return dict(_symbolic(g.family, g.base, _symbolic_key(g, name), 2 if power is None else power, degree))


@lru_cache(maxsize=1024)
def _symbolic(family: str, base: str, name: str, power: int, degree: int) -> tuple:
    raw = adams.rank_traces(family, name, power, degree)
    return tuple((tuple(Invariant(d, "tr", base) for d in mono), coeffs) for mono, coeffs in raw.items())


def symbolic_normalisation(g: Group) -> Normalisation:
    """As `normalisation`, with adjoint_ratio and dual_coxeter as coefficients in powers of N."""
    _symbolic_key(g, "adjoint")
    ratio = symbolic_traces(g, "adjoint", 2)[(Invariant(2, "tr", g.base),)]
    base = _BASE_INDEX[g.family]
    return Normalisation(g.base, base, ratio, tuple(c * base / 2 for c in ratio))


def npoly_value(coeffs, n) -> Fraction:
    """Evaluate coefficients in ascending powers of N at N = n."""
    return sum((c * Fraction(n) ** i for i, c in enumerate(coeffs)), Fraction(0))
