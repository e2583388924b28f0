"""Simple groups: dimensions, indices, dual Coxeter numbers and trace identities, each against a source."""
from __future__ import annotations

from fractions import Fraction as Q

import pytest

from compiler.algebra.groups import (
    Group, Rep, casimir_degrees, dimension, dual_coxeter, group, index, normalisation,
    quadratic_casimir, representation)
from compiler.algebra.traces import (
    MAX_DEGREE, Invariant, invariant_basis, npoly_value, symbolic_normalisation, symbolic_traces, traces)
from compiler.algebra.weights import MAX_WEIGHTS, GroupError, dominant_weights, weight_system


def tr(k, rep="fundamental"):
    return Invariant(k, "tr", rep)


def mono(*degrees, rep="fundamental"):
    return tuple(sorted(tr(d, rep) for d in degrees))


def rep_traces(g: Group, name, k, power=None):
    return traces(g, representation(g, name, power), k)


EXCEPTIONAL = ["G2", "F4", "E6", "E7", "E8"]


# ---------------------------------------------------------------- dimensions and indices

# Slansky, "Group theory for unified model building", Phys. Rep. 79 (1981) 1, tables of
# irreducible representations (dimension and index, fundamental of SU(n) having index 1);
# from memory.  Labels in Bourbaki numbering.
SLANSKY = [
    ("G2", (0, 1), 14, 8), ("G2", (1, 0), 7, 2), ("G2", (2, 0), 27, 18),
    ("F4", (1, 0, 0, 0), 52, 18), ("F4", (0, 0, 0, 1), 26, 6),
    ("E6", (0, 1, 0, 0, 0, 0), 78, 24), ("E6", (1, 0, 0, 0, 0, 0), 27, 6),
    ("E6", (1, 0, 0, 0, 0, 1), 650, 300),
    ("E7", (1, 0, 0, 0, 0, 0, 0), 133, 36), ("E7", (0, 0, 0, 0, 0, 0, 1), 56, 12),
    ("E7", (0, 1, 0, 0, 0, 0, 0), 912, 360),
    ("E8", (0, 0, 0, 0, 0, 0, 0, 1), 248, 60), ("E8", (1, 0, 0, 0, 0, 0, 0, 0), 3875, 1500),
]


@pytest.mark.parametrize("family, labels, dim, idx", SLANSKY)
def test_exceptional_dimensions_and_indices(family, labels, dim, idx):
    g = group(family)
    rep = representation(g, labels)
    assert dimension(g, rep) == dim
    assert index(g, rep) == idx


def test_weyl_dimension_equals_freudenthal_weight_count():
    # the Weyl dimension formula and Freudenthal's multiplicities are independent computations
    cases = [(group("SU", 4), (1, 1, 0)), (group("SO", 9), (1, 0, 0, 1)), (group("Sp", 3), (1, 1, 0)),
             (group("SO", 10), (0, 1, 0, 0, 1)), (group("G2"), (1, 1)), (group("F4"), (0, 0, 1, 0)),
             (group("E6"), (0, 0, 1, 0, 0, 0)), (group("E7"), (0, 0, 0, 0, 0, 1, 0)),
             (group("E8"), (1, 0, 0, 0, 0, 0, 0, 0))]
    for g, labels in cases:
        count = sum(m for _, m in weight_system(g.roots, labels))
        assert count == dimension(g, representation(g, labels)), (g, labels)


def test_freudenthal_multiplicities():
    # zero weight of the adjoint has multiplicity = rank (common practice, no source);
    # 3875 of E8 = one orbit of 2160 + 7 x the 240 roots + 35 x the zero weight (Slansky 1981, from memory)
    assert dominant_weights(group("SU", 3).roots, (1, 1))[(0, 0)] == 2
    mult = dominant_weights(group("E8").roots, (1, 0, 0, 0, 0, 0, 0, 0))
    assert mult == {(1, 0, 0, 0, 0, 0, 0, 0): 1, (0, 0, 0, 0, 0, 0, 0, 1): 7, (0,) * 8: 35}


@pytest.mark.parametrize("family, n, names", [
    # dim of the antisymmetric and symmetric squares N(N-1)/2, N(N+1)/2 (common practice, no source)
    ("SU", 7, {"fundamental": 7, "antifundamental": 7, "adjoint": 48, "antisymmetric": 21,
               "symmetric": 28}),
    # Green, Schwarz and Witten, Superstring Theory vol. 2 (1987): 496 of SO(32), 128 of SO(16)
    ("SO", 32, {"vector": 32, "adjoint": 496}),
    ("SO", 16, {"spinor+": 128, "spinor-": 128, "spinor": 256, "adjoint": 120}),
    # Slansky (1981), from memory: SO(10) 16, 54; SO(9) 16
    ("SO", 10, {"spinor+": 16, "symmetric": 54, "adjoint": 45}),
    ("SO", 9, {"spinor": 16, "vector": 9, "symmetric": 44}),
    # Sp(3): 6, 21 = adjoint, 14 = traceless antisymmetric (Slansky 1981, from memory)
    ("Sp", 3, {"fundamental": 6, "adjoint": 21, "antisymmetric": 14}),
])
def test_classical_dimensions(family, n, names):
    g = group(family, n)
    for name, dim in names.items():
        assert dimension(g, representation(g, name)) == dim, name


def test_quadratic_casimir_of_the_fundamental():
    # C_2(fund) = (N^2 - 1)/(2N) with tr(T^a T^b) = delta/2 (common practice, no source); twice that
    # with long roots of length squared 2, where the adjoint has C_2 = 2N
    for n in (2, 3, 7):
        g = group("SU", n)
        assert quadratic_casimir(g, representation(g, "fundamental").summands[0]) == Q(n * n - 1, n)
        assert quadratic_casimir(g, representation(g, "adjoint").summands[0]) == 2 * n


def test_antisymmetric_powers_of_so_even():
    # wedge^k of the vector of SO(2r): irreducible below r, self-dual plus anti-self-dual at k = r
    # (common practice, no source)
    g = group("SO", 10)
    dims = [dimension(g, representation(g, "antisymmetric", k)) for k in range(1, 6)]
    assert dims == [10, 45, 120, 210, 252]
    assert len(representation(g, "antisymmetric", 5).summands) == 2


# Kac, Infinite dimensional Lie algebras, 3rd ed. (1990), table Aff 1; from memory
DUAL_COXETER = {"G2": 4, "F4": 9, "E6": 12, "E7": 18, "E8": 30}


@pytest.mark.parametrize("family", EXCEPTIONAL)
def test_exceptional_dual_coxeter_and_casimir_degrees(family):
    g = group(family)
    assert dual_coxeter(g) == DUAL_COXETER[family]
    # degrees of the basic invariants (Bourbaki, Groupes et algèbres de Lie ch. 4-6, 1968; from memory)
    degrees = {"G2": (2, 6), "F4": (2, 6, 8, 12), "E6": (2, 5, 6, 8, 9, 12),
               "E7": (2, 6, 8, 10, 12, 14, 18), "E8": (2, 8, 12, 14, 18, 20, 24, 30)}
    assert casimir_degrees(g) == degrees[family]


def test_classical_dual_coxeter_numbers():
    # h^vee = n for SU(n), n - 2 for SO(n), n + 1 for Sp(n) (Kac 1990; from memory)
    for n in (2, 3, 5, 8):
        assert dual_coxeter(group("SU", n)) == n
    for n in (5, 6, 7, 10, 32):
        assert dual_coxeter(group("SO", n)) == n - 2
    for n in (1, 2, 4):
        assert dual_coxeter(group("Sp", n)) == n + 1


# ---------------------------------------------------------------- exceptional trace identities

@pytest.mark.parametrize("family", EXCEPTIONAL)
def test_adjoint_quartic_okubo(family):
    # Okubo, J. Math. Phys. 20 (1979) 586: Tr X^4 = 5/(2(D+2)) (Tr X^2)^2 for the adjoint of every
    # exceptional algebra, D its dimension (from memory); no independent quartic Casimir.
    g = group(family)
    dim = dimension(g, representation(g, "adjoint"))
    assert rep_traces(g, "adjoint", 4) == {mono(2, 2, rep="adjoint"): Q(5, 2 * (dim + 2))}


def test_e8_adjoint_traces():
    # Green, Schwarz and Witten, Superstring Theory vol. 2 (1987), E8: Tr F^4 = (Tr F^2)^2/100,
    # Tr F^6 = (Tr F^2)^3/7200 in the adjoint normalisation
    e8 = group("E8")
    assert rep_traces(e8, "adjoint", 4) == {mono(2, 2, rep="adjoint"): Q(1, 100)}
    assert rep_traces(e8, "adjoint", 6) == {mono(2, 2, 2, rep="adjoint"): Q(1, 7200)}
    # odd traces vanish for a real representation (common practice, no source)
    assert rep_traces(e8, "adjoint", 5) == {}
    assert tr(8, "adjoint") in invariant_basis(e8)      # the degree-8 Casimir is independent


@pytest.mark.parametrize("family, quartic", [("G2", Q(1, 4)), ("F4", Q(1, 12)), ("E6", Q(1, 12)),
                                             ("E7", Q(1, 24))])
def test_smallest_representation_quartic(family, quartic):
    # Erler, J. Math. Phys. 35 (1994) 1819; van Ritbergen, Schellekens and Vermaseren,
    # Int. J. Mod. Phys. A14 (1999) 41: tr_R F^4 = c (tr_R F^2)^2 in the smallest representation
    # R = 7, 26, 27, 56 with c = 1/4, 1/12, 1/12, 1/24 (from memory)
    g = group(family)
    two = rep_traces(g, "fundamental", 2)[mono(2, rep="adjoint")]
    four = rep_traces(g, "fundamental", 4)[mono(2, 2, rep="adjoint")]
    assert four / two ** 2 == quartic


def test_e6_quintic_casimir_comes_from_the_27():
    # E6 has an independent Casimir of degree 5 (see the degrees above); the adjoint is real so
    # its odd traces vanish, and the basis takes tr_27 F^5 (common practice, no source)
    e6 = group("E6")
    assert tr(5, "fundamental") in invariant_basis(e6)
    assert rep_traces(e6, "antifundamental", 5) == {mono(5): -1}
    assert rep_traces(e6, "fundamental", 3) == {}         # E6 has no cubic anomaly


def test_e8_from_so16_adjoint_plus_spinor():
    # 248 = 120 + 128 under SO(16) (Green, Schwarz and Witten vol. 2, 1987): the E8 identities
    # restricted to SO(16) are identities of SO(16) vector traces, Tr F^2 = 30 tr F^2
    so16 = group("SO", 16)

    def restricted(k):
        total = dict(rep_traces(so16, "adjoint", k))
        for m, c in rep_traces(so16, "spinor+", k).items():
            total[m] = total.get(m, 0) + c
        return {m: c for m, c in total.items() if c}

    assert restricted(2) == {mono(2, rep="vector"): 30}
    assert restricted(4) == {mono(2, 2, rep="vector"): Q(30 ** 2, 100)}
    assert restricted(6) == {mono(2, 2, 2, rep="vector"): Q(30 ** 3, 7200)}


# ---------------------------------------------------------------- classical trace identities

def test_so32_adjoint_identities():
    # Green, Schwarz and Witten, Superstring Theory vol. 2 (1987), from memory: for SO(32),
    # Tr F^2 = 30 tr F^2, Tr F^4 = 24 tr F^4 + 3 (tr F^2)^2, Tr F^6 = 15 tr F^2 tr F^4 (no tr F^6
    # term: its coefficient N - 32 vanishes, which is what lets the anomaly factorize)
    so32 = group("SO", 32)
    assert rep_traces(so32, "adjoint", 2) == {mono(2, rep="vector"): 30}
    assert rep_traces(so32, "adjoint", 4) == {mono(4, rep="vector"): 24, mono(2, 2, rep="vector"): 3}
    assert rep_traces(so32, "adjoint", 6) == {mono(2, 4, rep="vector"): 15}
    symbolic = symbolic_traces(group("SO"), "adjoint", 6)
    assert {m: npoly_value(c, 32) for m, c in symbolic.items() if npoly_value(c, 32)} == {
        mono(2, 4, rep="vector"): 15}


def test_su_adjoint_identities_symbolic():
    # tr_adj F^2 = 2N tr F^2, tr_adj F^4 = 2N tr F^4 + 6 (tr F^2)^2 (common practice, no source);
    # tr_adj F^6 = 2N tr F^6 + 30 tr F^2 tr F^4 - 20 (tr F^3)^2 (van Ritbergen, Schellekens and
    # Vermaseren 1999, from memory)
    su = group("SU")
    assert symbolic_traces(su, "adjoint", 2) == {mono(2): (0, 2)}
    assert symbolic_traces(su, "adjoint", 4) == {mono(4): (0, 2), mono(2, 2): (6,)}
    assert symbolic_traces(su, "adjoint", 6) == {mono(6): (0, 2), mono(2, 4): (30,), mono(3, 3): (-20,)}
    assert symbolic_traces(su, "adjoint", 3) == {}


def test_two_index_tensors_symbolic():
    # Erler, J. Math. Phys. 35 (1994) 1819 (from memory): SU(N) antisymmetric / symmetric squares
    # tr F^2: N -+ 2, tr F^3: N -+ 4, tr F^4: (N -+ 8) tr F^4 + 3 (tr F^2)^2;
    # SO(N) symmetric traceless (N + 8) tr F^4 + 3 (tr F^2)^2; Sp(N) adjoint (2N + 8) tr F^4 + 3 (tr F^2)^2
    su, so, sp = group("SU"), group("SO"), group("Sp")
    assert symbolic_traces(su, "antisymmetric", 3) == {mono(3): (-4, 1)}
    assert symbolic_traces(su, "symmetric", 3) == {mono(3): (4, 1)}
    assert symbolic_traces(su, "antisymmetric", 4) == {mono(4): (-8, 1), mono(2, 2): (3,)}
    assert symbolic_traces(su, "symmetric", 4) == {mono(4): (8, 1), mono(2, 2): (3,)}
    assert symbolic_traces(so, "symmetric", 4) == {mono(4, rep="vector"): (8, 1), mono(2, 2, rep="vector"): (3,)}
    assert symbolic_traces(sp, "adjoint", 4) == {mono(4): (8, 2), mono(2, 2): (3,)}
    assert symbolic_traces(su, "antifundamental", 3) == {mono(3): (-1,)}


def test_adjoint_sextics_of_so_and_sp():
    # van Ritbergen, Schellekens and Vermaseren, Int. J. Mod. Phys. A14 (1999) 41 (from memory):
    # SO(N) Tr F^6 = (N - 32) tr F^6 + 15 tr F^2 tr F^4, Sp(N) Tr F^6 = (2N + 32) tr F^6 + 15 tr F^2 tr F^4
    so, sp = group("SO"), group("Sp")
    assert symbolic_traces(so, "adjoint", 6) == {mono(6, rep="vector"): (-32, 1), mono(2, 4, rep="vector"): (15,)}
    assert symbolic_traces(sp, "adjoint", 6) == {mono(6): (32, 2), mono(2, 4): (15,)}


def test_quadratic_trace_is_the_index_ratio():
    # tr_rho F^2 / tr_base F^2 = index(rho) / index(base): the weight sums against the quadratic
    # Casimir (Dynkin's index theorem; common practice, no source); odd traces of a real or
    # pseudo-real representation vanish and conjugation flips them (common practice, no source)
    cases = [(group("SU", 4), (1, 1, 0)), (group("SO", 7), (0, 0, 1)), (group("SO", 8), (0, 0, 1, 1)),
             (group("Sp", 2), (1, 1)), (group("G2"), (1, 1)), (group("F4"), (0, 0, 1, 0)),
             (group("E6"), (0, 0, 1, 0, 0, 0)), (group("E7"), (0, 0, 0, 0, 0, 1, 0))]
    for g, labels in cases:
        rep, base = representation(g, labels), representation(g, g.base)
        two = traces(g, rep, 2)
        assert two == {(tr(2, g.base),): index(g, rep) / index(g, base)}, g
        assert traces(g, rep, 1) == {}
    su4 = group("SU", 4)
    for k in (3, 5):
        plus, minus = traces(su4, representation(su4, (1, 1, 0)), k), traces(su4, representation(su4, (0, 1, 1)), k)
        assert plus and minus == {m: -c for m, c in plus.items()}


def test_spinor_traces_of_so10():
    # 16 of SO(10): tr F^2 = 2 tr F^2, tr F^4 = -tr F^4 + 3/4 (tr F^2)^2 (Erler 1994, from memory)
    so10 = group("SO", 10)
    assert rep_traces(so10, "spinor+", 2) == {mono(2, rep="vector"): 2}
    assert rep_traces(so10, "spinor+", 4) == {mono(4, rep="vector"): -1, mono(2, 2, rep="vector"): Q(3, 4)}
    # ch(S+) - ch(S-) = prod_i (e^{x_i/2} - e^{-x_i/2}) = e + ...: at degree 5 the difference of
    # the traces is 5! times the Pfaffian (common practice, no source)
    pf = (Invariant(5, "pf", "vector"),)
    assert rep_traces(so10, "spinor+", 5)[pf] - rep_traces(so10, "spinor-", 5)[pf] == 120
    # the two chiralities differ only by terms odd in the Pfaffian (common practice, no source)
    for k in range(2, 9):
        plus, minus = rep_traces(so10, "spinor+", k), rep_traces(so10, "spinor-", k)
        for m in set(plus) | set(minus):
            odd = sum(1 for i in m if i.kind == "pf") % 2
            assert plus.get(m, 0) == (-1) ** odd * minus.get(m, 0)


def _substitute(g: Group, symbolic, n):
    """A symbolic-rank trace at N = n, with each base trace replaced by its numeric expansion."""
    total: dict = {}
    for m, coeffs in symbolic.items():
        expansion = {(): npoly_value(coeffs, n)}
        for factor in m:
            part = traces(g, representation(g, g.base), factor.degree)
            expansion = {tuple(sorted(a + b)): x * y for a, x in expansion.items() for b, y in part.items()}
        for key, c in expansion.items():
            total[key] = total.get(key, 0) + c
    return {key: c for key, c in total.items() if c}


@pytest.mark.parametrize("family, ranks, names", [
    ("SU", (2, 3, 4, 6), ["fundamental", "antifundamental", "adjoint", ("antisymmetric", 2),
                          ("symmetric", 2), ("antisymmetric", 3), ("symmetric", 3)]),
    ("SO", (5, 6, 8, 9, 12), ["vector", "adjoint", ("symmetric", 2), ("antisymmetric", 2)]),
    ("Sp", (1, 2, 3, 4), ["fundamental", "adjoint", ("antisymmetric", 2), ("symmetric", 3)]),
])
def test_symbolic_rank_matches_weight_systems(family, ranks, names):
    # the Adams-operation formulas at symbolic N against the Freudenthal weight systems at
    # numeric N, including ranks too small for the base traces to be independent
    for n in ranks:
        g = group(family, n)
        for spec in names:
            name, power = spec if isinstance(spec, tuple) else (spec, None)
            if name == "antisymmetric" and power > g.series[1]:
                continue
            for k in (2, 3, 4, 5, 6, 8):
                symbolic = symbolic_traces(group(family), name, k, power)
                assert _substitute(g, symbolic, n) == rep_traces(g, name, k, power), (n, name, power, k)


def test_dimension_is_the_degree_zero_trace():
    g = group("SO", 11)
    for name in ("vector", "adjoint", "symmetric"):
        dim = dimension(g, representation(g, name))
        assert rep_traces(g, name, 0) == {(): dim}
        assert npoly_value(symbolic_traces(group("SO"), name, 0)[()], 11) == dim


# ---------------------------------------------------------------- normalisation

def test_normalisations():
    # Tr_adj F^2 = 2N tr F^2 (SU), (N-2) tr_v F^2 (SO), (2N+2) tr F^2 (Sp); the index of the
    # vector of SO(N) is 2 and of the fundamental of Sp(N) is 1 in the normalisation where the
    # fundamental of SU(N) has index 1; E8: Tr = 60 tr_norm, the trace Tr/(2 h^vee)
    # (Green, Schwarz and Witten vol. 2, 1987, define tr = Tr/30 for E8, which is 2 tr_norm; from memory)
    families = {"SU": ((0, 2), 1), "SO": ((-2, 1), 2), "Sp": ((2, 2), 1)}
    for family, (ratio, base_index) in families.items():
        sym = symbolic_normalisation(group(family))
        assert sym.adjoint_ratio == ratio and sym.base_index == base_index
        for n in {"SU": (3, 5), "SO": (7, 10), "Sp": (2, 3)}[family]:
            num = normalisation(group(family, n))
            assert num.adjoint_ratio == npoly_value(sym.adjoint_ratio, n)
            assert num.dual_coxeter == npoly_value(sym.dual_coxeter, n)
            assert num.base_index == base_index
    e8 = normalisation(group("E8"))
    assert (e8.base, e8.base_index, e8.adjoint_ratio, e8.dual_coxeter) == ("adjoint", 60, 1, 30)


# ---------------------------------------------------------------- bad input

@pytest.mark.parametrize("call, fragment", [
    (lambda: group("su", 3), "did you mean SU?"),
    (lambda: group("Spin", 3), "did you mean Sp?"),
    (lambda: group("SU", Q(5, 2)), "must be an integer"),
    (lambda: group("SO", 4), "not simple"),
    (lambda: group("SU", 1), "smallest is SU(2)"),
    (lambda: group("E", None), "fixed rank"),
    (lambda: group("E", 9), "unknown group 'E9'"),
    (lambda: representation(group("SU", 5), "spinor"), "spinors belong to SO(n)"),
    (lambda: representation(group("SO", 9), "spinor+"), "no chiral spinors"),
    (lambda: representation(group("SU", 5), "vector"), "use fundamental"),
    (lambda: representation(group("SU", 5), "adjiont"), "did you mean adjoint?"),
    (lambda: representation(group("SU", 5), (1, 0)), "give 4 non-negative integer Dynkin labels"),
    (lambda: representation(group("SU", 5), "antisymmetric", 5), "1 <= k <= 4"),
    (lambda: representation(group("E8"), "symmetric", 2), "give Dynkin labels"),
    (lambda: representation(group("E8"), "adjoint", 2), "a power goes with"),
    (lambda: representation(group("SU", 3), (1, True)), "non-negative integer"),
    (lambda: representation(group("SU"), "adjoint"), "symbolic rank"),
    (lambda: symbolic_traces(group("E8"), "adjoint", 2), "fixed rank"),
    (lambda: symbolic_traces(group("SO"), "spinor", 2), "needs a numeric rank"),
    (lambda: symbolic_traces(group("SU"), "symmetric", 2, 100), "from 1 to"),
    (lambda: rep_traces(group("SU", 3), "adjoint", MAX_DEGREE + 1), f"up to F^{MAX_DEGREE}"),
    (lambda: traces(group("E8"), Rep(((0, 1, 0, 0, 0, 0, 0, 0),)), 2), f"limit of {MAX_WEIGHTS} weights"),
    (lambda: traces(group("SU", 9), representation(group("SU", 9), "symmetric", 30), 2), "limit of"),
])
def test_errors_name_the_problem_and_a_way_out(call, fragment):
    with pytest.raises(GroupError) as info:
        call()
    assert fragment in str(info.value)
