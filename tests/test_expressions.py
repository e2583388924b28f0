"""The expression language as the spec defines it ("Definitions" and
"Precise rules → Lexing and grammar", "Classes, normal form, truncation").

Each case compiles a small document in-process and reads the printed value
or the claim's status, so the grammar and the class rules are tested through
the same path a document takes.
"""
from __future__ import annotations

import pytest

from compiler.errors import DocumentError
from support import compile_text

DECLS = ("symbol N, E, I, S, Q, pi, p",
         "bundle T: real, rank 5",
         "bundle T4: real, rank 4",
         "bundle P: real, rank 2",
         "bundle V: complex, rank 2",
         "bundle V3: complex, rank 3",
         "bundle Lb: line")


def derive(*lines: str, front: str = "") -> str:
    return front + "```derive\n" + "\n".join(DECLS + lines) + "\n```\n"


def compile_doc(tmp_path, text: str):
    return compile_text(tmp_path / "doc.md", text)


def value(tmp_path, expr: str, front: str = ""):
    report = compile_doc(tmp_path, derive(f"let v = {expr}", front=front))
    step = report.steps[-1]
    assert step.status == "proven", step.checks
    return report.values["v"]


def step_error(tmp_path, expr: str) -> str:
    """The message of an evaluation error (a step with status error)."""
    report = compile_doc(tmp_path, derive(f"let v = {expr}"))
    step = report.steps[-1]
    assert step.status == "error", step.checks
    return step.checks[-1].detail


def compile_error(tmp_path, expr: str) -> str:
    with pytest.raises(DocumentError) as info:
        compile_doc(tmp_path, derive(f"let v = {expr}"))
    return info.value.message


def claims(tmp_path, *claims_: str, front: str = "") -> list[str]:
    report = compile_doc(tmp_path, derive(*[f"check {c}" for c in claims_], front=front))
    return [s.status for s in report.steps[len(DECLS):]]


# ---------------------------------------------------------------- plain names

def test_letters_that_mean_something_elsewhere_are_plain_names(tmp_path):
    # spec: Statements: "N, E, I, S, Q, pi ... are ordinary names (N is a rank, not a numerical-
    # evaluation function; I is not the imaginary unit)"
    assert value(tmp_path, "N + E + I + S + Q + pi + p").degrees == [0]
    report = compile_doc(tmp_path, derive("check I^2 == -1", "check pi > 3", "check E == 0",
                                          "check N*2 == 2*N"))
    i_squared, pi_big, e_zero, n_twice = report.steps[len(DECLS):]
    # I is a real symbol: I^2 = -1 is false, with a witness point
    assert i_squared.status == "failed" and "I = " in i_squared.checks[0].detail
    # pi is a free real symbol, not 3.14159...: the inequality is not proven
    assert pi_big.status != "proven"
    assert e_zero.status == "failed" and n_twice.status == "proven"


def test_builtin_names_are_functions_only_in_call_position(tmp_path):
    # spec: Precise rules → Lexing and grammar: "a bundle may be called L and a symbol p or S"
    text = ("```derive\nsymbol p, S, e\nbundle L: real, rank 4\n"
            "let v = p*S*e + L(L)\n"
            # the degree-4 part of the L-genus is p1/3
            # (Hirzebruch, "Topological Methods in Algebraic Geometry", 1966)
            "check part(L(L), 4) == p1(L)/3\n"
            "check part(v, 0) == p*S*e + 1\n```\n")
    report = compile_doc(tmp_path, text)
    assert report.passed and [s.status for s in report.steps[-2:]] == ["proven", "proven"]


@pytest.mark.parametrize("call", ["N(2)", "foo(N)", "eval(N)", "x1(T)"])
def test_calling_a_name_that_is_not_a_builtin_is_an_error(tmp_path, call):
    # spec: Precise rules → Lexing and grammar: "Calling a name that is not a built-in function is an error"
    assert "built-in" in compile_error(tmp_path, call)


# ---------------------------------------------------------------- precedence

@pytest.mark.parametrize("claim", [
    "-N^2 == -(N^2)",          # ^ binds tighter than unary minus
    "-2^2 == -4",
    "N/2*E == (N*E)/2",        # * and / left-associative: (N/2)*E
    "N/2/E == N/(2*E)",
    "2^-1 == 1/2",             # a negative integer literal exponent
    "2^-2 == 1/4",
    "N**2 == N^2",             # ** is ^
    "N - 1 - 1 == N - 2",      # - is left-associative
    "(N + 1)^2 == N^2 + 2*N + 1",
    "N^1000 == N^1000",        # the limit itself is allowed
])
def test_grammar_rules_hold(tmp_path, claim):
    # spec: Precise rules → Lexing and grammar
    assert claims(tmp_path, claim) == ["proven"]


def test_precedence_is_not_the_other_way(tmp_path):
    # spec: Precise rules → Lexing and grammar: -x^2 is -(x^2), not (-x)^2; N/2*E is not N/(2*E)
    assert claims(tmp_path, "-N^2 == (-N)^2", "N/2*E == N/(2*E)") == ["failed", "failed"]


@pytest.mark.parametrize("expr, word", [
    ("0.5", "decimal"), ("1.", "decimal"), ("1e5", "scientific"),
    ("N^1001", "1001"), ("N^-1001", "1001"),
    ("2N", "implicit multiplication"), ("N N", "implicit multiplication"),
])
def test_lexical_errors_stop_the_build(tmp_path, expr, word):
    # spec: Definitions: "a decimal like 0.5 is an error"; Precise rules → Lexing and grammar:
    # "Exponents are integer literals with absolute value at most 1000"; "No implicit multiplication"
    assert word in compile_error(tmp_path, expr)


@pytest.mark.parametrize("expr, word", [
    ("p1(T)^-1", "class-free"), ("1/p1(T)", "class-free"),
    ("1/(N - N)", "zero"), ("(N - N)^-1", "zero"), ("1/0", "zero"),
])
def test_division_and_negative_powers_only_on_class_free_nonzero_values(tmp_path, expr, word):
    # spec: Precise rules → Lexing and grammar: "negative exponents and division only on
    # class-free, nonzero values"
    assert word in step_error(tmp_path, expr)


def test_division_by_a_class_free_symbolic_value_is_allowed(tmp_path):
    # spec: Precise rules → Lexing and grammar (class-free, nonzero divisor)
    assert claims(tmp_path, "p1(T)/(N + 1)*(N + 1) == p1(T)", "N^-2*N^2 == 1") == ["proven", "proven"]


# ---------------------------------------------------------------- classes

@pytest.mark.parametrize("expr, word", [
    ("p3(T)", "p3(T)"),         # rank 5: p1, p2 only
    ("c4(V3)", "c4(V3)"),       # complex rank 3: c1..c3
    ("e(T)", "odd rank"),       # odd rank: no Euler class
    ("c1(T)", "real"), ("c(T)", "real"), ("td(T)", "real"),
])
def test_classes_that_do_not_exist_are_errors(tmp_path, expr, word):
    # spec: Precise rules → Classes: "A class beyond the rank ... is an error"; "c and td of a real
    # bundle are errors"; Fibers/Declarations: odd rank, so no e
    assert word in step_error(tmp_path, expr)


@pytest.mark.parametrize("claim", [
    # underlying real bundle of a complex one: p1 = c1^2 - 2c2, p2 = c2^2 (rank 2), e = c_top
    # (Milnor and Stasheff, "Characteristic Classes", 1974, Corollary 15.5 and Property 14.5)
    "p1(V) == c1(V)^2 - 2*c2(V)",
    "p2(V) == c2(V)^2",
    "e(V) == c2(V)",
    "e(Lb) == c1(Lb)",
    "p1(Lb) == c1(Lb)^2",
    # Â and L of a complex bundle are those of its underlying real bundle; degree-4 parts
    # -p1/24 and p1/3 (Hirzebruch, "Topological Methods in Algebraic Geometry", 1966)
    "part(Ahat(V), 4) == -(c1(V)^2 - 2*c2(V))/24",
    "part(L(V), 4) == (c1(V)^2 - 2*c2(V))/3",
    "part(Ahat(T4), 8) == (7*p1(T4)^2 - 4*p2(T4))/5760",
    # e^2 = p_n for real rank 2n (Milnor and Stasheff, 1974, Corollary 15.8); a plane has p1 = e^2
    "e(T4)^2 == p2(T4)",
    "p1(P) == e(P)^2",
    "e(T4)^3 == p2(T4)*e(T4)",
    "p(T4) == 1 + p1(T4) + p2(T4)",
    "c(V) == 1 + c1(V) + c2(V)",
])
def test_class_identities(tmp_path, claim):
    # spec: Precise rules → Classes, normal form, truncation
    assert claims(tmp_path, claim) == ["proven"]


def test_euler_class_appears_at_most_to_the_first_power(tmp_path):
    # spec: Precise rules → Classes: "for a real bundle of even rank 2n, e^2 is rewritten as p_n,
    # so e appears at most to the first power"
    assert value(tmp_path, "e(T4)^3").text == "p2(T4)*e(T4)"
    assert value(tmp_path, "p1(P)").text == "e(P)^2"


def test_truncation_drops_higher_components_as_they_arise(tmp_path):
    # spec: Precise rules → Classes: "higher components are dropped as they arise (products of
    # truncated total classes included)"
    front = "---\ntruncate: 4\n---\n"
    assert value(tmp_path, "p(T4)*p(T4)", front).degrees == [0, 4]
    assert value(tmp_path, "p1(T4)^2", front).degrees == []
    assert value(tmp_path, "p(T4)*p(T4)", front).text == "2*p1(T4) + 1"
    # the default keeps degree 12: (1 + p1 + p2)^2 has 2 p1 p2 there
    assert claims(tmp_path, "part(p(T4)^2, 12) == 2*p1(T4)*p2(T4)", "p1(T4)^4 == 0") == ["proven"] * 2


def test_zero_has_no_degrees(tmp_path):
    # spec: Precise rules → Classes: "Zero passes every degree check and has degrees: []"
    report = compile_doc(tmp_path, derive("let v = p1(T) - p1(T)"))
    assert report.values["v"].degrees == [] and report.steps[-1].status == "proven"


# ---------------------------------------------------------------- built-in functions

def test_part_and_degree(tmp_path):
    # spec: Definitions table: part(X, k) is the degree-k component; degree(X) the form degree
    assert claims(tmp_path, "part(p(T), 4) == p1(T)", "part(p(T), 2) == 0",
                  "degree(p1(T)*p2(T)) == 12", "degree(c1(V)) == 2") == ["proven"] * 4


def test_degree_of_an_inhomogeneous_value_is_an_error(tmp_path):
    # spec: Definitions table: "degree(X) ... (error if X is not homogeneous)"
    assert "degree" in step_error(tmp_path, "degree(1 + p1(T))")


def test_sqrt(tmp_path):
    # spec: Definitions table: sqrt(x) is the square root
    assert claims(tmp_path, "sqrt(4) == 2", "sqrt(2)^2 == 2", "sqrt(1/4) == 1/2") == ["proven"] * 3
    assert "classes" in step_error(tmp_path, "sqrt(p1(T))")


def test_a_bundle_name_alone_is_not_a_value(tmp_path):
    # spec: Definitions table: classes of a bundle come through the functions; common practice, no source
    assert "bundle" in step_error(tmp_path, "T")
    assert "bundle" in step_error(tmp_path, "p1(N)")


def test_bundle_constructions_only_inside_ch(tmp_path):
    # spec: Definitions table: "ch(dual(V)), ch(V*W), ..." are Chern characters of constructions
    assert "ch(" in step_error(tmp_path, "dual(V)")
    # ch of a line bundle: 1 + c1 + c1^2/2 + ...; ch(L*dual(L)) = 1 (Hirzebruch, 1966, §10.1)
    assert claims(tmp_path, "part(ch(Lb), 4) == c1(Lb)^2/2", "ch(Lb*dual(Lb)) == 1",
                  "part(ch(V), 0) == 2") == ["proven"] * 3
