"""The two documents that complete the bundled derivations' use of the format.

gauge-traces.md and free-chirals.md exist so that every statement and
built-in function of the format runs in some real derivation; the last test
keeps it that way, so a feature cannot silently drop out of every document.
Each document is built once per session by ``anomark build`` (conftest.py's
``bundled``) and the tests read the JSON record.
"""
from __future__ import annotations

import re

import pytest

from compiler.statements.words import BUILTIN_FUNCTIONS, STATEMENT_WORDS
from support import DERIVATIONS, SETTLED, assert_proven, check_statuses as statuses, find_step


def assert_passed(built) -> None:
    assert "Traceback" not in built.stderr, built.stderr
    assert built.returncode == 0, built.stderr
    for ext in ("html", "json", "tex"):
        assert built.file(ext).stat().st_size > 0, ext
    assert built.record["passed"] is True
    for step in built.record["steps"]:
        for check in step["checks"]:
            assert check["status"] in SETTLED, (step["line"], step["source"], check)


# -- gauge-traces.md ---------------------------------------------------------

TRACE_IDENTITIES = (
    # Newton's identities for the formal roots (common practice, no source)
    "check tr2 == -2*F_scale^2*c2(V4)",
    "check tr3 == 3*F_scale^3*c3(V4)",
    "check tr4 == F_scale^4*(2*c2(V4)^2 - 4*c4(V4))",
    # Erler, "Anomaly cancellation in six dimensions" (1994), from memory;
    # re-derived from the formal roots before the document was written
    "check tradj2 == 2*4*tr2",
    "check tradj4 == 2*4*tr4 + 6*tr2^2",
    "check trA2_2 == (4 - 2)*tr2",
    "check trS2_2 == (4 + 2)*tr2",
    "check trA2_4 == (4 - 8)*tr4 + 3*tr2^2",
    "check trS2_4 == (4 + 8)*tr4 + 3*tr2^2",
    # bifundamental of SU(4) x SU(5) (common practice, no source)
    "check 24*F_scale^4*part(ch_bif, 8) == 5*tr4 + 4*tr5_4 + 6*tr2*tr5_2",
    # six-dimensional quartic condition: n_f = 2n, or n + 8 with one antisymmetric
    "check k_c4 == 0 for nf = 8, na = 0",
    "check k_c4 == 0 for nf = 12, na = 1",
    "check k_c4 != 0 for nf = 0..11, na = 1",
    "check I_12_1 == 3*tr2^2",
    # Georgi, Glashow, "Unity of all elementary-particle forces" (1974): the
    # 5bar + 10 has no cubic anomaly (common practice, no source)
    "check 6*F_scale^3*part(ch_10, 6) == (5 - 4)*tr5_3",
    "check part(gen, 6) == 0",
)


def test_gauge_traces_builds_and_proves_the_identities(bundled):
    built = bundled("gauge-traces")
    record = built.record
    assert_passed(built)
    for claim in TRACE_IDENTITIES:
        assert_proven(record, claim)
    # the determinant line of an SU(n) bundle is trivial (common practice, no source)
    assert_proven(record, "check ch_det == 1")
    # Chern characters add over direct sums (common practice, no source)
    assert_proven(record, "check ch(dual(V5) + wedge(V5, 2)) == ch(dual(V5)) + ch(wedge(V5, 2))")
    assert_proven(record, "check ch(V4 + V5) == ch(V4) + ch(V5)")
    # Hirzebruch, "Neue topologische Methoden in der algebraischen Geometrie" (1956)
    assert_proven(record, "check L8 == (7*p2(T8) - p1(T8)^2)/45")
    assert_proven(record, "check L8 == trR2^2/72 - 7/180*trR4")
    # Borel, Hirzebruch (1958), from memory: p(HP^2) = (1 + u)^6/(1 + 4u);
    # signature 1, and A-hat 0 by Lichnerowicz (1963)
    assert_proven(record, "check p_HP2*(1 + 4*u) == (1 + u)^6")
    assert_proven(record, "check sigma_HP2 == 1")
    assert_proven(record, "check Ahat_HP2 == 0")
    assert record["values"]["tradj4"]["degrees"] == [8]
    assert record["values"]["ch_adj"]["degrees"] == [0, 4, 8]


def test_gauge_traces_reduce_removes_c1(bundled):
    record = bundled("gauge-traces").record
    for name in ("ch4", "ch_adj", "ch_A2", "ch_S2", "ch5", "ch_bif", "ch_10", "gen"):
        assert "c1(" not in record["values"][name]["text"], name
    step = find_step(record, "reduce ch(V4*dual(V5)) modulo c1(V4) = 0, c1(V5) = 0 -> ch_bif")
    assert step["kind"] == "reduce" and step["outputs"] == ["ch_bif"]


def test_gauge_traces_rebinding_keeps_earlier_checks(bundled):
    record = bundled("gauge-traces").record
    rebind = find_step(record, "let! gen = gen + 1")
    assert rebind["kind"] == "let" and rebind.get("rebind") is True
    # the check before the rebinding saw fifteen fermions, the ones after see sixteen
    assert_proven(record, "check part(gen, 0) == 15")
    assert_proven(record, "check part(gen, 0) == 16")
    # the 16 of SO(10) has SU(5) index 2 (common practice, no source)
    assert_proven(record, "check 2*F_scale^2*part(gen, 4) == 4*tr5_2")
    assert record["values"]["gen"]["text"].endswith("+ 16")


@pytest.mark.parametrize("value", ["2", "-3/2"])
def test_gauge_traces_identities_do_not_depend_on_the_normalisation(value, bundled):
    reference = bundled("gauge-traces").record
    built = bundled("gauge-traces", "--set", f"F_scale={value}")
    record = built.record
    assert_passed(built)
    assert reference["conventions"]["F_scale"] == "1"
    assert record["conventions"]["F_scale"] == value
    for claim in TRACE_IDENTITIES:
        assert_proven(record, claim)
    # Chern characters do not see the normalisation of F; the traces do
    for name in ("ch4", "ch_adj", "ch_bif", "gen", "L8", "sigma_HP2"):
        assert record["values"][name]["text"] == reference["values"][name]["text"], name
    for name in ("tr2", "tr4", "tradj4", "k_c4", "I_12_1"):
        assert record["values"][name]["text"] != reference["values"][name]["text"], name
    # the sentence quoting tr F^2 is recomputed with the convention
    tex = built.file("tex").read_text()
    sentence = next(line for line in tex.splitlines() if "For the fundamental of" in line)

    def bare(latex: str) -> str:  # prose sets a leading sign apart with a space; the math is the same
        return "".join(latex.split())
    assert bare(record["values"]["tr2"]["latex"]) in bare(sentence)
    assert bare(reference["values"]["tr2"]["latex"]) not in bare(sentence)


def test_gauge_traces_rejects_an_undeclared_convention(bundled):
    built = bundled("gauge-traces", "--set", "F_scal=2")
    assert built.returncode == 2, built.stderr
    assert "F_scal" in built.stderr and "Traceback" not in built.stderr
    assert not built.record  # nothing is written


# -- free-chirals.md ---------------------------------------------------------

def test_free_chirals_builds_and_maximizes(bundled):
    built = bundled("free-chirals")
    record = built.record
    assert_passed(built)
    # Intriligator, Wecht, "The exact superconformal R-symmetry maximizes a" (2003);
    # a = 1/48, c = 1/24 for a free chiral (common practice, no source)
    for claim in (
        "check r_star == 2/3", "check a_star == 1/48", "check c_star == 1/24",
        "check r_min == r_star", "check minus_a_min == -a_star", "check a_star > 0",
        # cubic Wess-Zumino model: three chirals at the free value
        "check rX_star == 2/3", "check rY_star == 2/3", "check aXYZ_star == 3*a_star",
        # Shapere, Tachikawa (2008), from memory: a = (5 n_v + n_h)/24, c = (2 n_v + n_h)/12
        "check r_N == 2/3", "check a_N == (7*N^2 - 5)/24", "check c_N == (2*N^2 - 1)/6",
        "check 4*(2*a_N - c_N) == N^2 - 1", "check 4*(5*c_N - 4*a_N) == 2*N^2",
    ):
        assert_proven(record, claim)
    for source in ("maximize a over r -> r_star, a_star",
                   "minimize -a over r -> r_min, minus_a_min",
                   "maximize aXYZ over rX, rY -> (rX_star, rY_star), aXYZ_star"):
        assert statuses(record, source) == {"proven"}, source


def test_free_chirals_extremize_two_variables_in_a_window(bundled):
    record = bundled("free-chirals").record
    step = find_step(record, "extremize a2 over r1 in (0, 1), r2 in (0, 1) -> (r1_0, r2_0), a2_0")
    assert step["kind"] == "extremize"
    assert step["outputs"] == ["r1_0", "r2_0", "a2_0"]
    assert {c["status"] for c in step["checks"]} == {"proven"}
    values = {v["name"]: v["text"] for v in step["values"]}
    # two free chirals: r = 2/3 each, a = 2/48 (common practice, no source)
    assert values == {"r1_0": "2/3", "r2_0": "2/3", "a2_0": "1/24"}
    assert_proven(record, "check a2_0 > 0")
    assert_proven(record, "check a2_0 == 2*a_star")
    # maximize without a window lands on the same point
    two = find_step(record, "maximize a2 over r1, r2 -> (r1_max, r2_max), a2_max")
    assert two["kind"] == "maximize" and two["outputs"] == ["r1_max", "r2_max", "a2_max"]
    assert_proven(record, "check a2_max == a2_0")


def test_free_chirals_square_root(bundled):
    record = bundled("free-chirals").record
    # Intriligator, Wecht (2003), from memory; re-derived independently: the adjoint
    # R-charge of large-N adjoint SQCD, y = (3 - sqrt(20x^2 - 1))/(3(1 - 2x^2))
    assert statuses(record, "maximize a_adj over y -> y_star, a_adj_star") <= SETTLED
    for claim in (
        "check y_star == (3 - sqrt(20*x^2 - 1))/(3*(1 - 2*x^2))",
        "check y_star == 10/(3*(3 + sqrt(20*x^2 - 1)))",
        "check a_adj_star == ((20*x^2 - 1)*sqrt(20*x^2 - 1) - 90*x^2 + 18)/(48*(2*x^2 - 1)^2)",
    ):
        assert statuses(record, claim) <= SETTLED, claim
    assert "sqrt(" in record["values"]["y_star"]["text"]
    # free at the edge of asymptotic freedom; Komargodski, Schwimmer, "On
    # renormalization group flows in four dimensions" (2011): a decreases
    assert_proven(record, "check y_star == 2/3 for x = 1/2")
    assert_proven(record, "check a_adj_star == a_UV for x = 1/2")
    # inequalities are decided exactly, with the square root in them
    assert_proven(record, "check a_adj_star < a_UV for x = 3/4")
    assert_proven(record, "check a_adj_star < a_UV for x = 1")


def test_free_chirals_table(bundled):
    record = bundled("free-chirals").record
    step = find_step(record, "table r_N, a_N, c_N for N = 2..5")
    table = step["table"]
    assert len(table["rows"]) == 4
    # (7N^2 - 5)/24 and (2N^2 - 1)/6 at N = 2 (derived above from Shapere, Tachikawa)
    first = table["text_rows"][0]
    assert first == ["2", "2/3", "23/24", "7/6"]


# -- every statement and built-in appears in some document --------------------

SPEC_STATEMENTS = {
    "symbol", "convention", "bundle", "split", "fiber", "let", "let!", "substitute",
    "reduce", "integrate", "coefficients", "maximize", "minimize", "extremize",
    "check", "show", "table", "plot",
}
SPEC_FUNCTIONS = {
    "p", "c", "e", "Ahat", "L", "td", "ch", "S", "dual", "wedge", "sym", "part",
    "degree", "sqrt", "trivial",
}
#: Forms of the format beyond a single word, each as a pattern on one statement.
SPEC_FORMS = {
    "indexed Pontryagin class": r"(?<![\w])p[1-9][0-9]*\(",
    "indexed Chern class": r"(?<![\w])c[1-9][0-9]*\(",
    "ch of a tensor product": r"\bch\(\s*\w+(\([^()]*\))?\s*\*",
    "ch of a direct sum": r"\bch\(\s*\w+(\([^()]*\))?\s*\+",
    "ch of a dual": r"\bch\(\s*dual\(",
    "ch of an exterior power": r"\bch\(\s*wedge\(",
    "ch of a symmetric power": r"\bch\(\s*sym\(",
    "ch of a spinor bundle": r"\bch\(\s*S\(",
    "reduce modulo": r"^reduce\b.*\bmodulo\b",
    "extremization window": r"^(maximize|minimize|extremize)\b.*\bover\s+\w+\s+in\s*\(",
    "two-variable extremization": r"^(maximize|minimize|extremize)\b.*->\s*\(",
    "surface fiber": r"^fiber\s+\w+\s*:\s*surface\b",
    "sphere fiber": r"^fiber\s+\w+\s*:\s*sphere\s+of\b",
    "general fiber": r"^fiber\s+\w+\s*:\s*dimension\b",
    "fixed-point fiber": r"^fiber\s+\w+\s*:\s*fixed\s+points\b",
    "spindle fiber": r"^fiber\s+\w+\s*:\s*spindle\b",
    "fixed point": r"^point\b",
    "line bundle by its restrictions": r"^line\b",
    "fixed-point fiber checked against a model": r"^fiber\s+\w+\s*:\s*fixed\s+points\b.*\bmodel\b",
    "line standing for a model class": r"^line\s+\w+\s*=\s*\w+\s*:",
    "fiber class": r"^class\b",
    "fiber relation": r"^relation\b",
    "fiber integral": r"^integral\b",
    "real bundle": r"^bundle\b.*:\s*real\b",
    "complex bundle": r"^bundle\b.*:\s*complex\b",
    "line bundle": r"^bundle\b.*:\s*line\b",
    "symbol bound": r"^symbol\b.*(<|>)",
    "check over an integer range": r"^check\b.*\bfor\s+\w+\s*=\s*-?\d+\s*\.\.",
    "inequality check": r"^check\b.*(<|>|!=)",
    "plot interval": r"^plot\b.*\bover\s+\w+\s+in\b",
    "use of a document in the folder": r'^use\s+"',
    "use of a bundled library document": r'^use\s+library\s+"',
    "sum with symbolic bounds": r"\bsum\(.*=\s*\d+\s*\.\.\s*[A-Za-z]",
    "series at a point": r"\b(series|leading)\(\s*\w+\s*,\s*\w+\s*=",
    "show in a chosen form": r"^show\b.*\b(as\s+(expanded|factored)|collected\s+in)\b",
}

_FENCE = re.compile(r"^(`{3,}|~{3,})(.*)$")


def derive_statements(text: str) -> list[str]:
    """Statements of the derive blocks of a Markdown text: backslash continuations
    joined, comments dropped, blanks collapsed, so one pattern sees one statement."""
    statements: list[str] = []
    fence = None
    pending = ""
    for line in text.splitlines():
        opened = _FENCE.match(line)
        if fence is None:
            if opened:
                fence = opened.group(1)
                in_derive = opened.group(2).split()[:1] == ["derive"]
            continue
        if line.strip().startswith(fence[0] * len(fence)) and not line.strip().strip(fence[0]):
            fence = None
            continue
        if not in_derive:
            continue
        code = line.split("#", 1)[0].rstrip()
        if code.endswith("\\"):
            pending += code[:-1] + " "
            continue
        joined = " ".join((pending + code).split())
        pending = ""
        if joined:
            statements.append(joined)
    return statements


def test_every_statement_and_function_is_used_by_some_document():
    statements = [s for doc in sorted(DERIVATIONS.glob("*.md"))
                  for s in derive_statements(doc.read_text())]
    assert statements, "no derive blocks found"
    words = {s.split()[0] for s in statements}
    missing_words = (SPEC_STATEMENTS | STATEMENT_WORDS) - words
    assert not missing_words, f"statements no document uses: {sorted(missing_words)}"
    called = {m.group(1) for s in statements
              for m in re.finditer(r"(?<![\w])([A-Za-z][A-Za-z0-9_]*)\s*\(", s)}
    missing_functions = (SPEC_FUNCTIONS | BUILTIN_FUNCTIONS) - called
    assert not missing_functions, f"built-ins no document calls: {sorted(missing_functions)}"
    missing_forms = [name for name, pattern in SPEC_FORMS.items()
                     if not any(re.search(pattern, s) for s in statements)]
    assert not missing_forms, f"forms no document uses: {missing_forms}"


def test_statement_reader_sees_only_derive_blocks():
    text = "\n".join([
        "```python", "let x = 1", "```",
        "```derive {.wide}", "let y = 1 + \\", "  2   # a comment", "check y == 3", "```",
        "prose mentions minimize(", "~~~derive", "show y", "~~~",
    ])
    assert derive_statements(text) == ["let y = 1 + 2", "check y == 3", "show y"]
