"""Root systems of the simple Lie algebras and weight systems of their irreducible representations.

Everything is computed from the Dynkin diagram: the Cartan matrix from the
nodes' root lengths and the edges, the positive roots by root strings, the
dimension by Weyl's formula, and the multiplicities of the weights by
Freudenthal's recursion over the dominant weights.  Weights are tuples of
Dynkin labels (components in the basis of fundamental weights); roots are
also kept in the basis of simple roots.  The invariant form is normalised so
that long roots have length squared 2; all arithmetic is exact.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from math import lcm

# Weight systems with more weights (counted with multiplicity) are refused.
MAX_WEIGHTS = 100_000


class GroupError(Exception):
    """A group or representation that cannot be formed or computed, with a suggestion."""


@dataclass(frozen=True)
class Diagram:
    """A Dynkin diagram: squared root length of each node and the edges between nodes."""

    lengths: tuple[Fraction, ...]
    edges: tuple[tuple[int, int], ...]


def _chain(lengths) -> Diagram:
    edges = tuple((i, i + 1) for i in range(len(lengths) - 1))
    return Diagram(tuple(Fraction(x) for x in lengths), edges)


def _d_type(rank: int) -> Diagram:
    # a chain of rank-1 nodes, the last node hangs on the third from the end
    chain = _chain([2] * (rank - 1))
    return Diagram(chain.lengths + (Fraction(2),), chain.edges + ((rank - 3, rank - 1),))


def _e_type(rank: int) -> Diagram:
    # Bourbaki order: 1-3-4-5-...-rank is the long chain, node 2 hangs on node 4.
    chain = [0] + list(range(2, rank))
    edges = tuple(zip(chain, chain[1:])) + ((1, 3),)
    return Diagram((Fraction(2),) * rank, edges)


# Bourbaki numbering, nodes counted from 0 here.
DIAGRAMS = {
    "A": lambda n: _chain([2] * n),
    "B": lambda n: _chain([2] * (n - 1) + [1]),
    "C": lambda n: _chain([1] * (n - 1) + [2]),
    "D": _d_type,
    "G": lambda n: _chain([Fraction(2, 3), 2]) if n == 2 else None,
    "F": lambda n: _chain([2, 2, 1, 1]) if n == 4 else None,
    "E": lambda n: _e_type(n) if n in (6, 7, 8) else None,
}


def _form(diagram: Diagram) -> list[list[Fraction]]:
    """(alpha_i, alpha_j): the bond multiplicity is the ratio of the squared lengths."""
    r = len(diagram.lengths)
    form = [[Fraction(0)] * r for _ in range(r)]
    for i, length in enumerate(diagram.lengths):
        form[i][i] = length
    for i, j in diagram.edges:
        short = min(diagram.lengths[i], diagram.lengths[j])
        bonds = max(diagram.lengths[i], diagram.lengths[j]) / short
        form[i][j] = form[j][i] = -bonds * short / 2
    return form


def _invert(matrix) -> list[list[Fraction]]:
    n = len(matrix)
    rows = [[Fraction(x) for x in row] + [Fraction(int(i == j)) for j in range(n)]
            for i, row in enumerate(matrix)]
    for col in range(n):
        pivot = next(r for r in range(col, n) if rows[r][col] != 0)
        rows[col], rows[pivot] = rows[pivot], rows[col]
        lead = rows[col][col]
        rows[col] = [x / lead for x in rows[col]]
        for r in range(n):
            if r != col and rows[r][col] != 0:
                f = rows[r][col]
                rows[r] = [a - f * b for a, b in zip(rows[r], rows[col])]
    return [row[n:] for row in rows]


class RootSystem:
    """Cartan matrix, invariant form and positive roots of one simple Lie algebra."""

    def __init__(self, series: str, rank: int):
        diagram = DIAGRAMS[series](rank)
        self.name = f"{series}{rank}"
        form = _form(diagram)
        self.rank = rank
        # cartan[i][j] = 2 (alpha_i, alpha_j) / (alpha_j, alpha_j): row i is alpha_i in Dynkin labels
        self.cartan = tuple(tuple(int(2 * form[i][j] / form[j][j]) for j in range(rank))
                            for i in range(rank))
        # nonzero entries of each row: a simple reflection moves only the node and its neighbours
        self.sparse_rows = tuple(tuple((j, x) for j, x in enumerate(row) if x) for row in self.cartan)
        half = [form[i][i] / 2 for i in range(rank)]
        # (omega_i, omega_j) = (A^-1)_ij |alpha_j|^2 / 2
        inverse = _invert(self.cartan)
        self.metric = tuple(tuple(inverse[i][j] * half[j] for j in range(rank)) for i in range(rank))
        # integer copies of the form scaled by `scale`, for the hot loops
        self.scale = lcm(*(x.denominator for x in half))
        self.half = tuple(int(h * self.scale) for h in half)
        self.positive = self._positive_roots()      # in the simple-root basis
        self.positive_labels = tuple(self.labels_of_root(a) for a in self.positive)

    def _positive_roots(self) -> tuple[tuple[int, ...], ...]:
        r = self.rank
        simple = [tuple(int(i == j) for j in range(r)) for i in range(r)]
        found, layer = set(simple), simple
        while layer:
            nxt = set()
            for beta in layer:
                labels = self.labels_of_root(beta)
                for i in range(r):
                    down, p = list(beta), 0
                    while True:
                        down[i] -= 1
                        if tuple(down) not in found:
                            break
                        p += 1
                    if p - labels[i] > 0:
                        up = list(beta)
                        up[i] += 1
                        nxt.add(tuple(up))
            found |= nxt
            layer = sorted(nxt)
        return tuple(sorted(found, key=lambda a: (sum(a), a)))

    def labels_of_root(self, a) -> tuple[int, ...]:
        labels = [0] * self.rank
        for i, coefficient in enumerate(a):
            if coefficient:
                for j, x in self.sparse_rows[i]:
                    labels[j] += coefficient * x
        return tuple(labels)

    def reflect(self, weight, i: int) -> tuple[int, ...]:
        """The simple reflection s_i: weight - weight_i alpha_i."""
        w, x = list(weight), weight[i]
        for j, a in self.sparse_rows[i]:
            w[j] -= x * a
        return tuple(w)

    def pair(self, weight, root) -> int:
        """scale * (weight, root), weight in Dynkin labels, root in the simple-root basis."""
        return sum(w * a * h for w, a, h in zip(weight, root, self.half))

    def inner(self, mu, nu) -> Fraction:
        """(mu, nu) for two weights in Dynkin labels."""
        return sum((mu[i] * self.metric[i][j] * nu[j]
                    for i in range(self.rank) for j in range(self.rank)), Fraction(0))

    def highest_root(self) -> tuple[int, ...]:
        return self.positive_labels[-1]

    def reflect_to_dominant(self, weight) -> tuple[int, ...]:
        w = tuple(weight)
        while True:
            i = next((i for i, x in enumerate(w) if x < 0), None)
            if i is None:
                return w
            w = self.reflect(w, i)

    def exponents(self) -> tuple[int, ...]:
        """The exponents, from the numbers of positive roots of each height (Kostant)."""
        heights = [sum(a) for a in self.positive]
        count = [heights.count(h) for h in range(max(heights) + 2)]
        return tuple(m for m in range(1, len(count) - 1) for _ in range(count[m] - count[m + 1]))


@lru_cache(maxsize=None)
def root_system(series: str, rank: int) -> RootSystem:
    return RootSystem(series, rank)


def dimension(rs: RootSystem, labels) -> int:
    """Weyl's dimension formula: product over positive roots of (lambda+rho, a)/(rho, a)."""
    result = Fraction(1)
    rho = (1,) * rs.rank
    shifted = tuple(x + 1 for x in labels)
    for a in rs.positive:
        result *= Fraction(rs.pair(shifted, a), rs.pair(rho, a))
    return int(result)


def casimir(rs: RootSystem, labels) -> Fraction:
    """(lambda, lambda + 2 rho): the quadratic Casimir, 2 h^vee on the adjoint."""
    return rs.inner(labels, tuple(x + 2 for x in labels))


def _check_size(rs: RootSystem, labels) -> None:
    dim = dimension(rs, labels)
    if dim > MAX_WEIGHTS:
        raise GroupError(
            f"the representation {list(labels)} of the Lie algebra {rs.name} has dimension {dim}, "
            f"above the limit of {MAX_WEIGHTS} weights for a weight system; choose a smaller one")


@lru_cache(maxsize=256)
def dominant_weights(rs: RootSystem, labels: tuple[int, ...]) -> dict[tuple[int, ...], int]:
    """Multiplicity of every dominant weight of the irreducible representation (Freudenthal)."""
    _check_size(rs, labels)
    r = rs.rank
    depth = {labels: (0,) * r}                 # lambda - mu in the simple-root basis
    layer = [labels]
    while layer:
        nxt = []
        for mu in layer:
            for a, step in zip(rs.positive, rs.positive_labels):
                nu = tuple(m - x for m, x in zip(mu, step))
                if min(nu) >= 0 and nu not in depth:
                    depth[nu] = tuple(c + x for c, x in zip(depth[mu], a))
                    nxt.append(nu)
        layer = nxt
    order = sorted(depth, key=lambda mu: sum(depth[mu]))
    two_rho_plus = tuple(x + 2 for x in labels)
    mult = {labels: 1}
    norms = [rs.pair(step, a) for a, step in zip(rs.positive, rs.positive_labels)]
    for mu in order[1:]:
        # (lambda+rho)^2 - (mu+rho)^2 = (lambda - mu, lambda + mu + 2 rho)
        gap = sum(c * h * (x + m) for c, h, x, m in zip(depth[mu], rs.half, two_rho_plus, mu))
        total = 0
        for a, step, norm in zip(rs.positive, rs.positive_labels, norms):
            base = rs.pair(mu, a)
            k, nu = 1, mu
            while True:
                nu = tuple(x + s for x, s in zip(nu, step))
                m = mult.get(rs.reflect_to_dominant(nu))
                if not m:
                    break
                total += m * (base + k * norm)
                k += 1
        value, rest = divmod(2 * total, gap)
        if rest:
            raise ArithmeticError(f"Freudenthal's recursion gave a fraction at {mu}")
        mult[mu] = value
    return mult


def orbit(rs: RootSystem, dominant: tuple[int, ...]) -> set[tuple[int, ...]]:
    """The Weyl orbit of a dominant weight, by simple reflections of positive labels."""
    seen, layer = {dominant}, [dominant]
    while layer:
        nxt = []
        for w in layer:
            for i, x in enumerate(w):
                if x > 0:
                    v = rs.reflect(w, i)
                    if v not in seen:
                        seen.add(v)
                        nxt.append(v)
        layer = nxt
    return seen


@lru_cache(maxsize=64)
def weight_system(rs: RootSystem, labels: tuple[int, ...]) -> tuple[tuple[tuple[int, ...], int], ...]:
    """Every weight of the irreducible representation with its multiplicity."""
    return tuple((w, m) for mu, m in dominant_weights(rs, labels).items() if m
                 for w in sorted(orbit(rs, mu)))
