"""Complex bundles of symbolic rank N: classes up to the truncation, constructions exact in N."""
from __future__ import annotations

import pytest

from support import build_snippet

HEAD = "symbol N: integer, N >= 1\nbundle V: complex, rank N\nbundle W: complex, rank 2\nbundle L: line\n"


def test_constructions_are_exact_in_the_rank(tmp_path, capsys):
    claims = [
        # rank of wedge^2 and the first Chern classes of wedge^2, sym^2 and tensor products
        # (Fulton, Intersection Theory, 1984, example 3.2.2 and remark 3.2.3)
        "check part(ch(wedge(V, 2)), 0) == N*(N - 1)/2",
        "check c1(wedge(V, 2)) == (N - 1)*c1(V)",
        "check c1(sym(V, 2)) == (N + 1)*c1(V)",
        "check c1(V*W) == 2*c1(V) + N*c1(W)",
        "check c(V + W) == c(V)*c(W)",
        "check c4(V*L) == c4(V) + (N - 3)*c3(V)*c1(L) + (N - 2)*(N - 3)/2*c2(V)*c1(L)^2"
        " + (N - 1)*(N - 2)*(N - 3)/6*c1(V)*c1(L)^3 + N*(N - 1)*(N - 2)*(N - 3)/24*c1(L)^4",
        # the adjoint of U(N): tr_adj F^2 = 2N tr F^2 - 2 (tr F)^2, with tr F^k = k! ch_k
        # (common practice, no source)
        "check 2*part(ch(V*dual(V)), 4) == 2*N*2*part(ch(V), 4) - 2*c1(V)^2",
        "check p1(V) == c1(V)^2 - 2*c2(V)",
    ]
    status, err, record = build_snippet(tmp_path, capsys, HEAD + "\n".join(claims))
    assert status == 0, err
    assert "V: complex bundle, rank N" in record["steps"][1]["summary"]


@pytest.mark.parametrize("body, message", [
    ("show e(V)", "it has no fixed degree"),
    ("show ch(S(V))", "its rank is symbolic"),
    ("bundle U: complex, rank 3\nsplit U = V + L", "symbolic rank cannot be split"),
    ("symbol x: real\nbundle X: complex, rank x", "must be a symbol declared integer"),
])
def test_what_a_symbolic_rank_cannot_do_is_an_error(tmp_path, capsys, body, message):
    status, err, _ = build_snippet(tmp_path, capsys, HEAD + body)
    assert status == 2 and message in err, err


def test_a_symbolic_rank_is_for_complex_bundles(tmp_path, capsys):
    status, err, record = build_snippet(tmp_path, capsys, "symbol N: integer\nbundle B: real, rank N")
    assert status == 2 and "a symbolic rank is for complex bundles" in err and record is None, err
