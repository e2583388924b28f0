"""Multiplicative genera (Â, L, Todd, spinor character) and Chern characters.

A multiplicative sequence is computed once per power series and truncation
as exact polynomials in the elementary symmetric functions sigma_k of the
formal roots (log of the series, power sums by Newton's identities, then
exp), and then evaluated at a bundle's classes.  For Â, L and the spinor
character the variables are z_i = x_i^2 and sigma_k = p_k; for Todd they are
the Chern roots and sigma_k = c_k (Hirzebruch, "Topological Methods in
Algebraic Geometry", 1966, §1).

Bundle constructions (sums, tensor products, duals, exterior and symmetric
powers) are carried as ``BundleValue``: a rank together with a Chern
character, so they nest.  Exterior and symmetric powers come from Adams
operations through Newton's identities.  A real bundle inside a
construction is complexified.

Spinor convention: for a real bundle of rank 2m or 2m+1,
ch(S(B)) = prod_{i=1..m} 2 cosh(x_i/2), of rank 2^m; for even rank this is
S+ + S-, for odd rank the irreducible spinor bundle; S+ and S- are its halves
with ch(S+) - ch(S-) = prod 2 sinh(x_i/2), e = prod x_i fixing the orientation.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from math import comb, factorial

from . import budget, symbolic_rank
from .bundles import COMPLEX, BundleTable
from .graded import AlgebraError, Element

MAX_POWER = 100  # largest k in sym(V, k): Newton's recursion costs O(k^2) products
#: Term pairs those k^2/2 products may multiply, estimated before they start
#: (about two seconds of work): a large k on a large Chern character is refused.
MAX_POWER_PAIRS = 200_000_000


# ------------------------------------------------------------ power series
def _series_div(num: list[Fraction], den: list[Fraction]) -> list[Fraction]:
    out: list[Fraction] = []
    for k in range(len(num)):
        out.append((num[k] - sum(out[j] * den[k - j] for j in range(k))) / den[0])
    return out


def _series(name: str, n: int) -> list[Fraction]:
    """Coefficients q_0..q_n of the characteristic power series."""
    if name == "Ahat":   # (sqrt z / 2) / sinh(sqrt z / 2)
        return _series_div([Fraction(1)] + [Fraction(0)] * n,
                           [Fraction(1, 4 ** k * factorial(2 * k + 1)) for k in range(n + 1)])
    if name == "L":      # sqrt z / tanh(sqrt z)
        return _series_div([Fraction(1, factorial(2 * k)) for k in range(n + 1)],
                           [Fraction(1, factorial(2 * k + 1)) for k in range(n + 1)])
    if name == "sinh":   # sinh(sqrt z / 2) / (sqrt z / 2)
        return [Fraction(1, 4 ** k * factorial(2 * k + 1)) for k in range(n + 1)]
    if name == "spinor":  # 2 cosh(sqrt z / 2)
        return [Fraction(2, 4 ** k * factorial(2 * k)) for k in range(n + 1)]
    if name == "todd":   # x / (1 - exp(-x))
        return _series_div([Fraction(1)] + [Fraction(0)] * n,
                           [Fraction((-1) ** k, factorial(k + 1)) for k in range(n + 1)])
    raise AlgebraError(f"unknown characteristic series {name}")


# Polynomials in sigma_1..sigma_n: dict exponent tuple -> Fraction; weight of sigma_k is k.
def _weight(exps) -> int:
    return sum((k + 1) * e for k, e in enumerate(exps))


def _pmul(a: dict, b: dict, n: int) -> dict:
    out: dict = {}
    for ea, ca in a.items():
        wa = _weight(ea)
        for eb, cb in b.items():
            if wa + _weight(eb) > n:
                continue
            e = tuple(x + y for x, y in zip(ea, eb))
            out[e] = out.get(e, 0) + ca * cb
    return {e: c for e, c in out.items() if c}


def _padd(a: dict, b: dict, scale=1) -> dict:
    out = dict(a)
    for e, c in b.items():
        out[e] = out.get(e, 0) + scale * c
    return {e: c for e, c in out.items() if c}


def _sigma(k: int, n: int) -> dict:
    return {tuple(1 if j == k - 1 else 0 for j in range(n)): Fraction(1)}


def _power_sums(n: int) -> list[dict]:
    """s_1..s_n in terms of sigma (Newton's identities); s[0] is unused."""
    s: list[dict] = [{}]
    for k in range(1, n + 1):
        acc = _padd({}, _sigma(k, n), (-1) ** (k - 1) * k)
        for i in range(1, k):
            acc = _padd(acc, _pmul(_sigma(i, n), s[k - i], n), (-1) ** (i - 1))
        s.append(acc)
    return s


@lru_cache(maxsize=None)
def log_coefficients(series: str, n: int) -> tuple[Fraction, tuple[Fraction, ...]]:
    """(q_0, [0, l_1, ..., l_n]) with log(Q(y)/q_0) = sum_k l_k y^k."""
    q = _series(series, n)
    q0 = q[0]
    qt = [c / q0 for c in q]
    log = [Fraction(0)] * (n + 1)    # k l_k = k q_k - sum j l_j q_{k-j}
    for k in range(1, n + 1):
        log[k] = (k * qt[k] - sum(j * log[j] * qt[k - j] for j in range(1, k))) / k
    return q0, tuple(log)


@lru_cache(maxsize=None)
def multiplicative_sequence(series: str, n: int) -> tuple[Fraction, tuple[dict, ...]]:
    """(q_0, [K_0, ..., K_n]): prod_i Q(z_i) = q_0^m * sum_j K_j(sigma) for m roots."""
    q0, log = log_coefficients(series, n)
    s = _power_sums(n)
    # exp of y = sum_k log_k s_k, one weight at a time: with y_k = log_k s_k of
    # weight k, the weight-w part of exp(y) is (1/w) sum_k k y_k K_{w-k}, which
    # multiplies homogeneous parts only (far cheaper than the powers of y).
    parts = [{tuple([0] * n): Fraction(1)}]
    for w in range(1, n + 1):
        budget.check()
        part: dict = {}
        for k in range(1, w + 1):
            scale = log[k] * Fraction(k, w)
            for e, c in _pmul(s[k], parts[w - k], n).items():
                part[e] = part.get(e, 0) + scale * c
        parts.append({e: c for e, c in part.items() if c})
    return q0, tuple(parts)


def _evaluate(poly_parts, sigmas: list[Element], one: Element) -> Element:
    """Evaluate sum of the K_j at sigma_k = sigmas[k-1] (sigma beyond the list is 0)."""
    powers: dict[tuple[int, int], Element] = {}

    def power(k, e):
        if (k, e) not in powers:
            powers[(k, e)] = sigmas[k] if e == 1 else power(k, e - 1) * sigmas[k]
        return powers[(k, e)]

    total = one.ring.zero()
    for part in poly_parts:
        budget.check()
        for exps, c in part.items():
            if any(e and k >= len(sigmas) for k, e in enumerate(exps)):
                continue
            term = one * c
            for k, e in enumerate(exps):
                if e:
                    term = term * power(k, e)
            total = total + term
    return total


def _genus(table: BundleTable, series: str, sigmas: list[Element], step: int) -> Element:
    ring = table.ring
    q0, parts = multiplicative_sequence(series, ring.truncate // step)
    return _evaluate(parts, sigmas, ring.one()) * q0 ** len(sigmas)


def _genus_of(table: BundleTable, series: str, name: str, squares: bool) -> Element:
    """The genus of a declared bundle: through its classes, or through its ch
    components when its rank is symbolic (Q(0) = 1 for every series here)."""
    if table.is_symbolic(name):
        sums = symbolic_rank.power_sums(table.character(name), table.kind(name) != COMPLEX, squares)
        return symbolic_rank.multiplicative(log_coefficients(series, len(sums))[1], sums)
    if squares:
        return _genus(table, series, table.pontryagin_classes(name), 4)
    return _genus(table, series, table.chern_classes(name), 2)


# ------------------------------------------------------------------ genera
def ahat(table: BundleTable, name: str) -> Element:
    """Â-genus of a real bundle (a complex one counts as its underlying real bundle)."""
    return _genus_of(table, "Ahat", name, squares=True)


def hirzebruch_l(table: BundleTable, name: str) -> Element:
    """Hirzebruch L-genus of a real bundle."""
    return _genus_of(table, "L", name, squares=True)


def todd(table: BundleTable, name: str) -> Element:
    """Todd class of a complex bundle."""
    if table.kind(name) != COMPLEX:
        raise AlgebraError(f"td({name}) does not exist: {name} is a real bundle")
    return _genus_of(table, "todd", name, squares=False)


def _newton_power_sums(sigmas: list[Element], n: int, one: Element) -> list[Element]:
    """Power sums s_1..s_n of the roots from their elementary symmetric functions."""
    zero = one.ring.zero()
    sig = lambda k: sigmas[k - 1] if k <= len(sigmas) else zero  # noqa: E731
    s = [zero]
    for k in range(1, n + 1):
        acc = sig(k) * ((-1) ** (k - 1) * k)
        for i in range(1, min(k - 1, len(sigmas)) + 1):
            acc = acc + sig(i) * s[k - i] * (-1) ** (i - 1)
        s.append(acc)
    return s


# --------------------------------------------------------- bundle values
@dataclass(frozen=True)
class BundleValue:
    """A (complex) bundle built by constructions, known through rank and Chern
    character; the rank is None when it is symbolic (ch_0 then carries it)."""

    rank: int | None
    ch: Element

    @classmethod
    def of(cls, table: BundleTable, name: str) -> "BundleValue":
        """A declared bundle; a real one is complexified."""
        ring = table.ring
        one = ring.one()
        if table.is_symbolic(name):
            return cls(None, table.character(name))
        if table.kind(name) == COMPLEX:
            rank = table.rank(name)
            s = _newton_power_sums(table.chern_classes(name), ring.truncate // 2, one)
            ch = one * rank
            for k in range(1, len(s)):
                ch = ch + s[k] / factorial(k)
            return cls(rank, ch)
        rank = table.real_rank(name)
        # Roots of the complexification are +-x_i (and 0): ch = r + 2 sum_k P_k(x^2)/(2k)!.
        s = _newton_power_sums(table.pontryagin_classes(name), ring.truncate // 4, one)
        ch = one * rank
        for k in range(1, len(s)):
            ch = ch + s[k] * Fraction(2, factorial(2 * k))
        return cls(rank, ch)

    @classmethod
    def spinor(cls, table: BundleTable, name: str) -> "BundleValue":
        """The Dirac spinor bundle S(B): ch = prod over roots of 2 cosh(x_i/2)."""
        if table.is_symbolic(name):
            raise symbolic_rank.refuse(table.get(name).symbolic, f"S({name}), of rank 2^(N/2),")
        sigmas = table.pontryagin_classes(name)
        return cls(2 ** len(sigmas), _genus(table, "spinor", sigmas, 4))

    @classmethod
    def chiral(cls, table: BundleTable, name: str, sign: int) -> "BundleValue":
        """S+ (sign 1) or S- (sign -1) of a bundle of even real rank:
        ch(S+) - ch(S-) = prod 2 sinh(x_i/2) = e(B) prod sinh(x_i/2)/(x_i/2)."""
        if table.real_rank(name) % 2:
            raise AlgebraError(f"S+ and S- need a bundle of even rank; {name} has rank "
                               f"{table.real_rank(name)} (use S({name}))")
        full = cls.spinor(table, name)
        odd = table.euler(name) * _genus(table, "sinh", table.pontryagin_classes(name), 4)
        return cls(full.rank // 2, (full.ch + odd * sign) / 2)

    def __add__(self, other: "BundleValue") -> "BundleValue":
        return BundleValue(_known(self.rank, other.rank, int.__add__), self.ch + other.ch)

    def __mul__(self, other: "BundleValue") -> "BundleValue":
        return BundleValue(_known(self.rank, other.rank, int.__mul__), self.ch * other.ch)

    def _graded_scale(self, factor) -> Element:
        """Multiply the degree-2k part of ch by factor(k)."""
        out = self.ch.ring.zero()
        for d in self.ch.degrees():
            if d % 2:
                raise AlgebraError("a Chern character has only even degrees")
            out = out + self.ch.part(d) * factor(d // 2)
        return out

    def dual(self) -> "BundleValue":
        return BundleValue(self.rank, self._graded_scale(lambda k: (-1) ** k))

    def adams(self, j: int) -> Element:
        """ch of the Adams operation psi^j."""
        return self._graded_scale(lambda k: j ** k)

    def wedge(self, k: int) -> "BundleValue":
        return self._power(k, alternating=True)

    def sym(self, k: int) -> "BundleValue":
        return self._power(k, alternating=False)

    def _power(self, k: int, alternating: bool) -> "BundleValue":
        """Newton's identities: k L^k = sum_j (+-1)^(j-1) psi^j L^(k-j)."""
        what = "wedge" if alternating else "sym"
        if isinstance(k, bool) or not isinstance(k, int) or k < 0:
            raise AlgebraError(f"{what}(V, k) needs a non-negative integer k, got {k!r}")
        one = self.ch.ring.one()
        if alternating and self.rank is not None and k > self.rank:
            return BundleValue(0, one.ring.zero())
        if k > MAX_POWER:
            raise AlgebraError(f"{what}(V, {k}): k is limited to {MAX_POWER}")
        pairs = k * (k + 1) // 2 * len(self.ch.monomials()) ** 2
        if pairs > MAX_POWER_PAIRS:
            raise AlgebraError(f"{what}(V, {k}) would multiply about {pairs} term pairs (the limit "
                               f"is {MAX_POWER_PAIRS}); lower k or truncate")
        psi = [None] + [self.adams(j) for j in range(1, k + 1)]
        powers = [one]
        for m in range(1, k + 1):
            acc = one.ring.zero()
            for j in range(1, m + 1):
                term = psi[j] * powers[m - j]
                acc = acc - term if alternating and j % 2 == 0 else acc + term
            powers.append(acc / m)
        if self.rank is None:
            return BundleValue(None, powers[k])
        rank = comb(self.rank, k) if alternating else comb(self.rank + k - 1, k)
        return BundleValue(rank, powers[k])


def _known(a: int | None, b: int | None, op) -> int | None:
    """A rank from two ranks, None (symbolic) if either is."""
    return None if a is None or b is None else op(a, b)


def chern_character(table: BundleTable, name: str) -> Element:
    """ch of a complex bundle, or of the complexification of a real one."""
    return BundleValue.of(table, name).ch
