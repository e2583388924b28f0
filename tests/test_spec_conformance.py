"""Acceptance-style probes of the derivation format specification, sentence by
sentence, through the command line as a reader of the spec would use it.

Each test quotes the sentence it checks.  Tests marked xfail(strict=True) are
disagreements between anomark and the specification, written as they should
pass; they turn into failures (strict) the moment the bug is fixed, so the
marker must then be removed.  The command runs in-process (``cli.main``, as
conftest.py's ``anomark`` runs it) to keep the file fast; it is the same code
path as ``python -m compiler``.
"""
from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from support import LOCATION, SPEC_DECLARATIONS


class Built:
    """Exit status, standard error lines and the JSON record (if written)."""

    def __init__(self, rc: int, err: str, record: dict | None, out: Path):
        self.rc, self.err, self.record, self.out = rc, err, record, out

    @property
    def problems(self) -> list[re.Match]:
        return [m for m in map(LOCATION.match, self.err.splitlines()) if m]

    def value(self, name: str) -> str:
        return self.record["values"][name]["text"]

    def step(self, line: int) -> dict:
        return next(s for s in self.record["steps"] if s["line"] == line)

    def statuses(self, line: int) -> list[str]:
        return [c["status"] for c in self.step(line)["checks"]]


@pytest.fixture
def run(tmp_path, anomark):
    """Build a document (text) with extra command-line arguments."""
    def build(text: str, *args: str, name: str = "doc", fmt: str = "json") -> Built:
        path = tmp_path / f"{name}.md"
        path.write_text(text, encoding="utf-8")
        out = tmp_path / f"out-{name}"
        done = anomark("build", path, "-o", out, "--format", fmt, "--no-cache", *args)
        rc, err = done.returncode, done.stderr
        record_path = out / f"{name}.json"
        record = json.loads(record_path.read_text()) if record_path.exists() else None
        return Built(rc, err, record, out)
    return build


def doc(body: str, front: str = "") -> str:
    """A document whose only derive block starts on line 4 (without front matter)."""
    return (front + "\n" if front else "") + "# t\n\n```derive\n" + body.strip("\n") + "\n```\n"


# ------------------------------------------------------------ spec examples


def test_spec_declarations_definitions_and_operations_verbatim(run):
    # spec, Declarations/Definitions/Operations: the example lines, assembled with the
    # declarations they need ("TS declared earlier, e.g. by a surface fiber"; R and p, q added).
    body = SPEC_DECLARATIONS + """\
bundle R: line
symbol p, q: integer
let I8_free = 1/48*(p2(NW) - p2(T6) + 1/4*(p1(T6) - p1(NW))^2)
let I8 = (N - 1)*I8_free + (N^3 - N)/24*p2(NW)
check I8 == (N - 1)*I8_free + (N^3 - N)/24*p2(NW)
substitute I8: c1(L1) = (1 + eps)*c1(R) - p/(2*g - 2)*e(TS), \\
               c1(L2) = (1 - eps)*c1(R) - q/(2*g - 2)*e(TS)  -> I8tw
integrate I8tw over Sigma -> I6
coefficients I6 of c1(R)^3, c1(R)*p1(T4) -> kRRR, kR
check degree(I6) == 6
"""
    b = run(doc(body))
    assert b.rc == 0, b.err
    assert b.record["passed"] is True
    sub = next(s for s in b.record["steps"] if s["kind"] == "substitute")
    # "Physical lines are joined first (a final `\`...)": one step spanning two lines
    assert sub["end_line"] == sub["line"] + 1 and sub["outputs"] == ["I8tw"]
    coeff = next(s for s in b.record["steps"] if s["kind"] == "coefficients")
    # "the rest of the polynomial goes into the step's `remainder` field"
    assert "remainder" in coeff and coeff["outputs"] == ["kRRR", "kR"]
    assert b.record["values"]["I6"]["degrees"] == [6]


def test_split_rewrites_total_class_as_in_the_spec(run):
    # spec: "After `split`, every class of the left side is rewritten in terms of the right
    # side wherever it appears (p(NW) = (1 + c1(L1)^2)(1 + c1(L2)^2) here)"
    b = run(doc(SPEC_DECLARATIONS + "let P = p(NW)\ncheck P == (1 + c1(L1)^2)*(1 + c1(L2)^2)\n"
                "let E6 = e(T6)\ncheck E6 == e(T4)*e(TS)"))
    assert b.rc == 0, b.err
    assert "NW" not in b.value("P")


def test_spec_fiber_examples_verbatim(run):
    # spec, Fibers: the three example headers; "with the default ∫ e^{2s+1} = 2 p_n(B)^s";
    # a surface makes "∫ e(TS) = 2 − 2g"; a general fiber lists classes, relations, integrals.
    body = """\
symbol g: integer, g >= 2
bundle NW: real, rank 5
bundle T4: real, rank 4
fiber Sigma: surface, genus g, tangent TS
fiber S4: sphere of NW, angular e4
fiber F: dimension 2
  class x: 2
  relation x^2 = 0
  integral x = 1
integrate e4^3 over S4 -> m
integrate e4^5 over S4 -> m5
check m == 2*p2(NW)
integrate e(TS) over Sigma -> chi
check chi == 2 - 2*g
integrate x*p1(T4) + 3 over F -> ix
check ix == p1(T4)
let t = p1(TS)
check t == 0
"""
    b = run(doc(body))
    assert b.rc == 0, b.err
    fiber_f = b.step(9)
    assert fiber_f["kind"] == "fiber" and fiber_f["end_line"] == 12  # body lines belong to it


def test_angular_integral_convention_scales_the_sphere_integrals(run):
    # spec: the angular form "integrates to the convention `angular_integral` ... and satisfies
    # e^2 = (angular_integral/2)^2 · p_n(B)"; so with A = 4: ∫e = 4, e^2 = 4 p2, ∫e^3 = 16 p2.
    body = """\
bundle NW: real, rank 5
fiber S4: sphere of NW, angular e4
integrate e4 over S4 -> vol
let sq = e4^2
integrate e4^3 over S4 -> m3
check vol == angular_integral
check sq == (angular_integral/2)^2*p2(NW)
check m3 == angular_integral^3/4*p2(NW)
"""
    b = run(doc(body), "--set", "angular_integral=4")
    assert b.rc == 0, b.err
    assert b.value("m3") == "16*p2(NW)"
    assert b.record["conventions"]["angular_integral"] == "4"


def test_localization_cross_check_runs_on_split_sphere(run):
    # spec: "Where B has been split into planes, the compiler also computes the same integral
    # by equivariant localization at the poles and checks that the two agree."
    b = run(doc("bundle NW: real, rank 5\nbundle L1, L2: line\nsplit NW = L1 + L2 + trivial(1)\n"
                "fiber S4: sphere of NW, angular e4\nintegrate e4^3 over S4 -> m\n"
                "check m == 2*c1(L1)^2*c1(L2)^2"))
    assert b.rc == 0, b.err
    whats = [c["what"] for c in b.step(8)["checks"]]
    assert any("locali" in w for w in whats), whats


def test_spec_check_examples_verbatim(run):
    # spec, Checks: "check degree(I6) == 6", "check k > 0 for N = 2..8", "for z = 1";
    # "several clauses separated by commas take every combination".
    body = """\
symbol N, k: integer, positive
symbol g: integer, g >= 2
symbol z: real, z > 0
let a_star = (g - 1)*(8*N^3 - 3*N - 5)/24*z
check a_star == (g - 1)*(8*N^3 - 3*N - 5)/24 for z = 1
check k > 0 for N = 2..8
check N^2 > N for N = 2..5, g = 2..3
"""
    b = run(doc(body))
    assert b.rc == 0, b.err
    assert "8 points" in b.step(10)["checks"][0]["what"] + b.step(10)["checks"][0]["detail"]


# ------------------------------------------------------------ names

def test_author_names_that_look_like_builtins(run):
    # spec: "`N`, `E`, `I`, `S`, `Q`, `pi` and the like are ordinary names (N is a rank, not a
    # numerical-evaluation function; I is not the imaginary unit)"; "a bundle may be called `L`
    # and a symbol `p` or `S`".
    body = """\
symbol N, E, I, S, Q, pi, p: integer, positive
bundle L: real, rank 4
bundle T: real, rank 4
let x = I^2 + pi*E + S*Q + N + p
check I^2 == -1 for I = 1
check sqrt(I^2) == I
let y = L(T) + p1(L) + p(T)
"""
    b = run(doc(body))
    assert b.rc == 1, b.err  # I^2 == -1 is false: I is the author's positive integer
    assert b.statuses(8) == ["failed"]
    assert b.statuses(9) == ["proven"]
    assert "p1(L)" in b.value("y")


def test_calling_a_non_function_is_an_error(run):
    # spec: "Calling a name that is not a built-in function is an error."
    b = run(doc("symbol x: real\nlet a = x\nlet b = a(x)"))
    assert b.rc == 2 and b.record is None
    assert [(m["line"], m["col"]) for m in b.problems] == [("6", "9")]


def test_rebinding_rules(run):
    # spec: "rebinding without `!` is an error"; "`let!` rebinds a name bound by `let` or by an
    # operation; on a fresh name it is an error. Earlier values keep what they were computed
    # from."; JSON: "`let!` gives "let" with "rebind": true"; "values hold each name's final binding".
    b = run(doc("symbol x: real\nlet f = (x - 1)^2\nlet a = x\nlet b = a + 1\n"
                "minimize f over x -> x0, f0\nlet! a = 2*x\nlet! f0 = f0 + 1\n"
                "check b == x + 1\ncheck f0 == 1"))
    assert b.rc == 0, b.err
    step = b.step(9)
    assert step["kind"] == "let" and step["rebind"] is True
    assert b.value("a") == "2*x"
    assert run(doc("symbol x: real\nlet a = x\nlet a = 2*x"), name="r2").rc == 2
    assert run(doc("symbol x: real\nlet! a = x"), name="r3").rc == 2


def test_every_name_declared_on_an_earlier_line(run):
    # spec: "Every name is declared on an earlier line before use: the parts of a `split` too
    # (except `trivial(k)`)."
    b = run(doc("bundle NW: real, rank 5\nsplit NW = L1 + L2 + trivial(1)\nbundle L1, L2: line"))
    assert b.rc == 2 and b.record is None
    assert {m["line"] for m in b.problems} == {"5"}


def test_split_after_use_names_both_lines(run):
    # spec: "`split` must come before any value mentions the split bundle's classes (otherwise
    # an error naming both lines)"
    b = run(doc("bundle NW: real, rank 5\nbundle L1, L2: line\nlet a = p1(NW)\n"
                "split NW = L1 + L2 + trivial(1)"))
    assert b.rc == 2
    assert "6" in b.problems[0]["message"] and b.problems[0]["line"] == "7"


# ------------------------------------------------------------ lexing and grammar

def test_precedence_rules(run):
    # spec: "`^` and `**` ... bind tighter than unary minus (`-x^2` is `-(x^2)`); `*` and `/`
    # are left-associative (`N/2*e4` is `(N/2)*e4`)."
    body = """\
symbol x, N: real
bundle NW: real, rank 5
fiber S4: sphere of NW, angular e4
let a = -x^2
check a == -(x^2)
let c = N/2*e4
check c == (N/2)*e4
let d = 1/2/3
check d == 1/6
let m = x ** 2
check m == x^2
check -2^2 == -4
"""
    b = run(doc(body))
    assert b.rc == 0, b.err
    assert b.value("c") == "N/2*e4"


@pytest.mark.parametrize("expr, code", [("x^1000", 0), ("x^-1000", 0), ("x^1001", 2),
                                        ("0.5*x", 2), ("2x", 2), ("x^x", 2)])
def test_exponent_limit_decimals_and_no_implicit_multiplication(run, expr, code):
    # spec: "Exponents are integer literals with absolute value at most 1000 (an error beyond)";
    # "a decimal like `0.5` is an error"; "No implicit multiplication."
    b = run(doc(f"symbol x: real\nlet a = {expr}"))
    assert b.rc == code, b.err
    if code == 2:
        assert b.record is None and b.problems[0]["line"] == "5"


def test_negative_power_and_division_need_class_free_nonzero(run):
    # spec: "negative exponents and division only on class-free, nonzero values."
    for i, expr in enumerate(["p1(T)^-1", "1/p1(T)", "1/0", "(x - x)^-1"]):
        b = run(doc(f"symbol x: real\nbundle T: real, rank 4\nlet a = {expr}"), name=f"n{i}")
        assert b.rc == 2, (expr, b.err)


def test_continuation_comments_and_indentation(run):
    # spec: "`#` starts a comment; a line ending in `\\`, or inside an open bracket, continues";
    # "After joining, an indented line is legal only in a `fiber` body; blank lines are
    # ignored and end a fiber body."
    b = run(doc("symbol x, y: real   # two\n# full line\nlet a = x + \\\n  y\nlet b = (x +\ny)\n"
                "let c = x # ( not open\ncheck a == b"))
    assert b.rc == 0, b.err
    assert b.step(6)["end_line"] == 7
    stray = run(doc("symbol x: real\nlet a = x\n  let b = x"), name="stray")
    assert stray.rc == 2 and stray.problems[0]["line"] == "6"
    ended = run(doc("fiber F: dimension 2\n  class u: 2\n\n  integral u = 1"), name="ended")
    assert ended.rc == 2 and ended.problems[0]["line"] == "7"


def test_derive_block_is_first_word_of_info_string(run):
    # spec: "A block is a `derive` block when the first word of its fence's info string is
    # `derive`."
    text = ("# t\n\n```derive extra\nsymbol x: real\nlet a = x\n```\n\n```python\nlet b = zz\n```\n\n"
            "```derived\nlet c = zz\n```\n\n~~~derive\nlet d = a\n~~~\n")
    b = run(text)
    assert b.rc == 0, b.err
    assert set(b.record["values"]) == {"a", "d"}


def test_blocks_share_one_namespace_and_later_failures_continue(run):
    # spec: "Blocks run top to bottom in one namespace."; "After a failing statement the
    # compiler goes on with the next one, and reports each later use of its outputs once"
    text = ("# t\n\n```derive\nsymbol x: real\nbundle T: real, rank 4\nbundle L: line\n"
            "let X = x*c1(L)\n```\n\ntext\n\n```derive\nsubstitute X: c1(L) = p1(T) -> Y\n"
            "let Z = Y + 1\nlet W = X + 1\n```\n")
    b = run(text)
    assert b.rc == 2  # the later use of Y cannot run: error
    assert b.statuses(13) == ["failed"]
    assert b.statuses(14) == ["error"]
    assert b.value("W") == "x*c1(L) + 1"
    assert [m["line"] for m in b.problems] == ["13", "14"]


# ------------------------------------------------------------ conventions and front matter

def test_convention_precedence(run):
    # spec: "Precedence: `--set`, then front matter, then the statement's default. Values are
    # exact rationals"; "`--set` overrides a declared one (an unknown name is an error)".
    text = doc("convention kappa = 3\nlet a = kappa*2 + foo",
               front="---\nconventions:\n  foo: 1/2\n  kappa: 7\n---")
    assert run(text, name="c1").value("a") == "29/2"
    b = run(text, "--set", "kappa=5", "--set", "foo=-1/3", name="c2")
    assert b.value("a") == "29/3"
    assert b.record["conventions"] == {"angular_integral": "2", "foo": "-1/3", "kappa": "5"}
    assert run(text, "--set", "bar=1", name="c3").rc == 2
    assert run(text, "--set", "kappa=0.5", name="c4").rc == 2


def test_front_matter_keys(run):
    # spec: "Unknown keys are an error with the key's line number"; "`truncate` (even integer)"
    b = run(doc("symbol x: real", front="---\ntitle: T\n\nauthor: [A]\n---"))
    assert b.rc == 2 and b.problems[0]["line"] == "4"
    ok = run(doc("symbol x: real", front="---\ntitle: T\nauthors: [A. Writer]\ndate: 2024-01-02\n"
                 "abstract: short\ntruncate: 8\nconventions:\n  kappa: -3/2\n---"), name="ok")
    assert ok.rc == 0, ok.err
    odd = run(doc("symbol x: real", front="---\ntruncate: 7\n---"), name="odd")
    assert odd.rc == 2 and odd.problems[0]["line"] == "2"


def test_front_matter_convention_clash_names_a_real_line(run):
    # spec: "Lines and columns are 1-based positions in the Markdown file."
    b = run(doc("let kappa = 3", front="---\nconventions:\n  kappa: 1\n---"))
    assert b.rc == 2
    assert "line 0" not in b.err and "line 3" in b.err


def test_truncation_drops_higher_components(run):
    # spec: "Every value lives in degrees up to `truncate`; higher components are dropped as
    # they arise"; "Zero passes every degree check and has `degrees: []`."
    b = run(doc("bundle T: real, rank 8\nlet x = p(T)\nlet y = p1(T)^3\nlet z = p(T)*p(T)",
                front="---\ntruncate: 8\n---"))
    assert b.rc == 0, b.err
    assert b.record["values"]["x"]["degrees"] == [0, 4, 8]
    assert b.record["values"]["y"] == {**b.record["values"]["y"], "text": "0", "degrees": []}
    assert b.record["values"]["z"]["degrees"] == [0, 4, 8]


# ------------------------------------------------------------ classes

@pytest.mark.parametrize("expr", ["p3(NW)", "c4(V)", "c(T)", "td(T)", "e(NW)", "c1(T)"])
def test_classes_that_do_not_exist(run, expr):
    # spec: "A class beyond the rank (p3 of a rank-5 bundle, c4 of a rank-3 bundle) is an
    # error."; "`c` and `td` of a real bundle are errors."
    b = run(doc(f"bundle NW: real, rank 5\nbundle V: complex, rank 3\nbundle T: real, rank 4\n"
                f"let a = {expr}"))
    assert b.rc == 2
    assert b.problems[0]["line"] == "7"


def test_real_classes_of_a_complex_bundle(run):
    # spec: "`p`, `e`, `Ahat`, `L` of a complex bundle are those of its underlying real bundle"
    # p1 = c1^2 - 2c2 (Milnor and Stasheff, "Characteristic classes", 1974, Corollary 15.5);
    # e of the underlying real bundle is the top Chern class (ibid., Property 14.5)
    b = run(doc("bundle V: complex, rank 3\ncheck p1(V) == c1(V)^2 - 2*c2(V)\ncheck e(V) == c3(V)\n"
                "let A = Ahat(V)"))
    assert b.rc == 0, b.err


def test_plane_euler_class_at_most_first_power(run):
    # spec: "For a real bundle of even rank 2n, e^2 is rewritten as p_n, so e appears at most to
    # the first power. For an oriented plane p1 = e^2."
    # The plane's generator is e(P) (anomark's reading, DEVELOPERS.md): p1(P) is written
    # e(P)^2, and a monomial may be named either way.
    b = run(doc("bundle P: real, rank 2\nlet w = 3*e(P)^3 + p1(P)\n"
                "coefficients w of e(P)*p1(P), p1(P) -> k, m\ncheck p1(P) == e(P)^2"))
    assert b.rc == 0, b.err
    assert (b.value("k"), b.value("m")) == ("3", "1")


def test_spinor_and_constructions(run):
    # spec: "`ch(S(B))` is the Dirac spinor bundle: the product over the formal roots of
    # 2cosh(x_i/2)"; "Bundle constructions nest (`ch(V*dual(V))`); a real bundle inside a
    # construction is complexified."  2cosh(x/2) = 2 + x^2/4 + ...: rank 4, p1/2 for m = 2
    # roots (common practice, no source).
    b = run(doc("bundle T: real, rank 4\nbundle V: complex, rank 2\nlet j = ch(S(T))\n"
                "check part(j, 0) == 4\ncheck part(j, 4) == p1(T)/2\n"
                "check ch(V*dual(V)) == ch(V)*ch(dual(V))\ncheck ch(T*V) == ch(T)*ch(V)\n"
                "check part(ch(sym(V, 2)), 4) == 5/2*c1(V)^2 - 4*c2(V)\n"
                "check ch(wedge(V, 2)) == 1 + c1(V) + part(ch(wedge(V, 2)), 4) "
                "+ part(ch(wedge(V, 2)), 6) + part(ch(wedge(V, 2)), 8) + part(ch(wedge(V, 2)), 10)"
                " + part(ch(wedge(V, 2)), 12)"))
    assert b.rc == 0, b.err


def test_degree_of_inhomogeneous_is_an_error(run):
    # spec: "`degree(X)` the form degree of a homogeneous X (error if X is not homogeneous)"
    b = run(doc("bundle T: real, rank 4\nlet q = degree(p(T))"))
    assert b.rc == 2 and b.problems[0]["line"] == "5"


# ------------------------------------------------------------ operations

def test_substitute_rules(run):
    # spec: "all pairs apply at once; a left side that does not occur is an error"; "the right
    # sides must have the degree of what they replace ... checked"; "A wrong-degree
    # substitution ... [is] *failed*."
    b = run(doc("symbol x, y: real\nbundle L1, L2: line\nlet X = x*c1(L1)^2 + y*c1(L2)\n"
                "substitute X: c1(L1) = c1(L2), c1(L2) = c1(L1) -> Y\n"
                "check Y == x*c1(L2)^2 + y*c1(L1)\nsubstitute X: x = y, y = x -> Z\n"
                "check Z == y*c1(L1)^2 + x*c1(L2)"))
    assert b.rc == 0, b.err
    wrong = run(doc("symbol x: real\nbundle L1, L2: line\nlet X = x*c1(L1)^2\n"
                    "substitute X: x = c1(L2) -> Y"), name="wrong")
    assert wrong.rc == 1 and "failed" in wrong.statuses(7)
    absent = run(doc("symbol x, w: real\nbundle L1: line\nlet X = x*c1(L1)^2\n"
                     "substitute X: w = 2 -> Y"), name="absent")
    assert absent.rc == 2 and absent.problems[0]["line"] == "7"


def test_reduce_is_order_independent(run):
    # spec: "`reduce ... modulo` takes the normal form modulo polynomial relations (a Gröbner
    # basis), so the result is unique whatever the order written"; "a bare expression means it
    # vanishes"; later-declared classes are larger, so c1(L2) is the leading term.
    b = run(doc("symbol x: real\nbundle L1, L2: line\n"
                "let X = c1(L1)^2 + 3*c1(L1)*c1(L2) + x*c1(L2)^2\n"
                "reduce X modulo c1(L1) + c1(L2) = 0 -> A\nreduce X modulo c1(L2) = -c1(L1) -> B\n"
                "reduce X modulo c1(L1) + c1(L2) -> C\ncheck A == B\ncheck B == C\n"
                "reduce X modulo c1(L1)^2 = c1(L2)^2, c1(L1)*c1(L2) = 0 -> D\n"
                "reduce X modulo c1(L1)*c1(L2) = 0, c1(L1)^2 = c1(L2)^2 -> E\ncheck D == E"))
    assert b.rc == 0, b.err
    assert b.value("A") == "(x - 2)*c1(L1)^2"


def test_coefficients_rules(run):
    # spec: "the coefficient of each exact monomial of the normal form, free of classes; a
    # monomial not in normal form is an error; the rest ... goes into the step's `remainder`"
    b = run(doc("symbol N: integer, positive\nbundle R: line\nbundle T4: real, rank 4\n"
                "let I6 = N^2*c1(R)^3 - N/24*c1(R)*p1(T4) + 5*c1(R)*p2(T4)\n"
                "coefficients I6 of c1(R)^3, c1(R)*p1(T4) -> kRRR, kR\n"
                "check kRRR == N^2\ncheck kR == -N/24"))
    assert b.rc == 0, b.err
    assert b.step(8)["remainder"]["text"] == "5*c1(R)*p2(T4)"
    bad = run(doc("bundle R: line\nbundle T4: real, rank 4\nlet I6 = c1(R)*p2(T4)\n"
                  "coefficients I6 of e(T4)^2*c1(R) -> k"), name="bad")
    assert bad.rc == 2


def test_integrate_checks_degree_and_lower_components_vanish(run):
    # spec: "Checked: the result has degree deg(X) − dim F, and no fiber class is left";
    # "components of lower fiber degree integrate to zero."
    b = run(doc("bundle NW: real, rank 5\nfiber S4: sphere of NW, angular e4\n"
                "integrate e4^2 + p1(NW) over S4 -> m\ncheck m == 0"))
    assert b.rc == 0, b.err
    assert b.record["values"]["m"]["degrees"] == []


def test_extremization_output_shapes(run):
    # spec: "outputs in parentheses exactly when there are two or more variables"
    ok = run(doc("symbol x, y: real\nlet h = x^2 + x*y + y^2 - x\n"
                 "extremize h over x, y -> (x1, y1), h0\ncheck h0 == -1/3"))
    assert ok.rc == 0, ok.err
    assert ok.step(6)["outputs"] == ["x1", "y1", "h0"]
    assert run(doc("symbol x, y: real\nlet f = x^2 + y^2\nminimize f over x, y -> x0, y0, f0"),
               name="noparen").rc == 2
    assert run(doc("symbol x: real\nlet f = x^2\nminimize f over x -> (x0), f0"),
               name="paren").rc == 2


def test_extremization_root_choice(run):
    # spec: "exactly one admissible interior critical point must remain at every sample, or the
    # step fails and asks for a range"; "a degenerate Hessian or a complex critical point is an
    # error"; "`maximize a over eps in (-1, 1) -> ...`".
    body = ("symbol x: real\nlet f = -(x^2 - 1)^2\nmaximize f over x -> x0, f0\n"
            "maximize f over x in (0, 2) -> x1, f1\ncheck x1 == 1")
    b = run(doc(body))
    assert b.rc == 1
    assert b.statuses(6) == ["failed"] and "range" in b.step(6)["checks"][0]["detail"]
    assert b.statuses(8) == ["proven"]
    degenerate = run(doc("symbol x: real\nlet f = x^4\nminimize f over x -> x0, f0"), name="deg")
    assert degenerate.rc == 2
    complex_only = run(doc("symbol x: real\nlet f = x^3/3 + x\nmaximize f over x -> x0, f0"),
                       name="cplx")
    assert complex_only.rc == 2
    classes = run(doc("symbol x: real\nbundle T: real, rank 4\nlet f = x^2*p1(T) - x\n"
                      "minimize f over x -> x0, f0"), name="cls")
    assert classes.rc == 2


def test_a_maximization_with_sqrt(run):
    # a-maximization of a cubic trial function: a = -N eps^3 + 3 z eps has its maximum at
    # eps = sqrt(z/N) with a = 2 z^(3/2)/sqrt(N) (elementary calculus, common practice, no source)
    b = run(doc("symbol N: integer, positive\nsymbol z: real, z > 0\nsymbol eps: real\n"
                "let a = -N*eps^3 + 3*z*eps\nmaximize a over eps -> eps_star, a_star\n"
                "check a_star == 2*z*sqrt(z)/sqrt(N)\ncheck eps_star > 0"))
    assert b.rc == 0, b.err


# ------------------------------------------------------------ checks

def test_for_breaking_assumptions_is_an_error(run):
    # spec: "A substitution that breaks a symbol's declared assumptions is an error."
    for i, clause in enumerate(["N = 0", "g = 1..3", "z = -1/2", "N = 1/2"]):
        b = run(doc(f"symbol N: integer, positive\nsymbol g: integer, g >= 2\n"
                    f"symbol z: real, z > 0\ncheck N + g + z > 0 for {clause}"), name=f"b{i}")
        assert b.rc == 2, clause


def test_inequalities_on_classes_error_and_failing_point_is_first(run):
    # spec: "inequalities apply to class-free values"; "One step per check, whose status is the
    # weakest over the points, with the first failing point in `detail`."
    b = run(doc("symbol N: integer, positive\nbundle T: real, rank 4\ncheck p1(T) > 0\n"
                "check N < 2 for N = 1..3"))
    assert b.statuses(6) == ["error"]
    assert b.statuses(7) == ["failed"] and "N = 2" in b.step(7)["checks"][0]["detail"]
    assert b.rc == 2


def test_sampled_status_states_the_count(run):
    # spec: "Sampling is deterministic: a fixed count (at least 20) of points ... `detail`
    # states the count."
    b = run(doc("symbol x: real, x > 0\ncheck sqrt(x + 2*sqrt(x) + 1) == sqrt(x) + 1"))
    assert b.rc == 0, b.err
    check = b.step(5)["checks"][0]
    if check["status"] == "sampled":
        count = int(re.search(r"(\d+)", check["detail"]).group(1))
        assert count >= 20
    again = run(doc("symbol x: real, x > 0\ncheck sqrt(x + 2*sqrt(x) + 1) == sqrt(x) + 1"))
    assert again.step(5)["checks"] == b.step(5)["checks"]


def test_false_claim_with_sqrt_of_symbol_fails_cleanly(run):
    # spec: "failed: a point where the two sides differ is shown, with both values"
    b = run(doc("symbol z: real, z > 0\ncheck sqrt(z) + 1 == sqrt(z)"))
    assert b.rc == 1, b.err
    assert b.statuses(5) == ["failed"]


def test_degree_clash_in_check_is_error(run):
    # spec, Checks table: "error | the check could not run (undefined name, degree clash,
    # time limit)"
    b = run(doc("bundle T: real, rank 4\ncheck p1(T) == p2(T)"))
    assert b.statuses(5) == ["error"]
    assert b.rc == 2


def test_split_rank_mismatch_is_an_error(run):
    # spec: "a rank that does not add up is an error" (anomark's reading, DEVELOPERS.md: an
    # error step, exit 2, since nothing after a wrong split can be trusted)
    b = run(doc("bundle NW: real, rank 5\nbundle L1, L2: line\nsplit NW = L1 + L2"))
    assert b.statuses(6) == ["error"]
    assert b.rc == 2


# ------------------------------------------------------------ expressions that must not crash

def test_long_flat_sum_compiles(run):
    # spec: "Expressions: exact integers and fractions, names, `+ - * /`, ..." -- no length
    # limit; a long pasted polynomial is ordinary input.
    terms = " + ".join(f"{i}*x^{i % 7}" for i in range(1, 1001))
    b = run(doc("symbol x: real\nlet a = " + terms))
    assert b.rc == 0, b.err


def test_value_text_reads_back_with_the_same_parser(run):
    # spec: "`text` is written in this format's own expression syntax, so it reads back in with
    # the same parser"; "I is not the imaginary unit".
    # (sqrt of a negative number is an error, so the imaginary unit never appears.)
    lets = "symbol x: real\nsymbol I: real\nlet a = sqrt(x^2)\nlet b = sqrt((I + x)^2) - I"
    b = run(doc(lets))
    texts = {k: v["text"] for k, v in b.record["values"].items()}
    back = run(doc(lets + "\n" + "\n".join(f"check {k} == {t}" for k, t in texts.items())),
               name="back")
    assert back.rc == 0, (texts, back.err)


# ------------------------------------------------------------ positions

def test_columns_are_file_positions_in_indented_blocks(run):
    # spec: "Lines and columns are 1-based positions in the Markdown file."
    b = run("# t\n\n- item\n\n  ```derive\n  symbol x: real\n  let a = x + y\n  ```\n")
    assert b.rc == 2
    assert (b.problems[0]["line"], b.problems[0]["col"]) == ("7", "15")
    ok = run("# t\n\n> ```derive\n> symbol x: real\n> let a = x\n> ```\n", name="quote")
    assert ok.step(5)["column"] == 3


def test_json_step_positions_and_declarations_are_steps(run):
    # spec: "Each step also has `column` and `end_line`; `kind` is the statement word ...;
    # declarations are steps too."
    b = run(doc("symbol x: real\nbundle T: real, rank 4\nconvention kappa = 2\nlet a = x"))
    kinds = [s["kind"] for s in b.record["steps"]]
    assert kinds == ["symbol", "bundle", "convention", "let"]
    for s in b.record["steps"]:
        assert {"index", "line", "column", "end_line", "source", "kind", "outputs", "checks"} <= set(s)
    assert list(b.record)[:6] == ["tool", "document", "passed", "conventions", "steps", "values"]


# ------------------------------------------------------------ prose

def test_prose_value_insertion(run):
    # spec: "`@{NAME}` works anywhere in prose except code spans and code blocks; it shows the
    # binding in force at that point ... (a name bound only further down shows its first
    # binding); an unknown name is an error at that line."
    text = ("# t\n\nBefore @{a} and `@{a}`.\n\n```derive\nsymbol x: real\nlet a = x + 1\n```\n\n"
            "- item @{a}\n\n```derive\nlet! a = 2*x\n```\n\nAfter @{a}.\n")
    b = run(text, fmt="html,json")
    assert b.rc == 0, b.err
    html = (b.out / "doc.html").read_text()
    assert "<code>@{a}</code>" in html
    assert html.count("@{a}") == 1
    unknown = run("# t\n\ntext\n\nsee @{nope}\n", name="unknown")
    assert unknown.rc == 2 and unknown.problems[0]["line"] == "5"


def test_prose_value_inside_math(run):
    # spec: "`@{NAME}` works anywhere in prose except code spans and code blocks"
    b = run("# t\n\n```derive\nsymbol x: real\nlet a = x + 1\n```\n\nmath $I = @{a}$ here\n",
            fmt="html")
    html = (b.out / "doc.html").read_text()
    assert "<mi>@</mi>" not in html and "@{a}" not in html


def test_raw_html_escaped_unless_allowed(run):
    # spec: "Raw HTML in prose is escaped and shown as text (exit 0) unless `--allow-html` is
    # given."
    text = "# t\n\n<b>bold</b> <script>alert(1)</script>\n"
    b = run(text, fmt="html")
    html = (b.out / "doc.html").read_text()
    assert b.rc == 0 and "<script>alert" not in html and "&lt;script&gt;" in html
    allowed = run(text, "--allow-html", fmt="html", name="allowed")
    assert "<b>bold</b>" in (allowed.out / "allowed.html").read_text()


# ------------------------------------------------------------ command line

def test_build_outputs_and_check_worst_status(tmp_path, anomark):
    # spec: "`build twisted.md -o out` writes `out/twisted.html` and `out/twisted.json` (the
    # default formats)"; "`-o` defaults to the document's own folder"; "A document that could
    # not be parsed writes no output files; any other build writes them."; "`check` with
    # several files exits with the worst status".
    ok = tmp_path / "twisted.md"
    ok.write_text(doc("symbol x: real\nlet a = x\ncheck a == x"))
    fails = tmp_path / "fails.md"
    fails.write_text(doc("symbol x: real\ncheck x == 2*x"))
    broken = tmp_path / "broken.md"
    broken.write_text(doc("let a = zz"))
    errs = tmp_path / "errs.md"
    errs.write_text(doc("let a = 1/0"))
    assert anomark("build", str(ok), "-o", str(tmp_path / "out")).returncode == 0
    assert sorted(p.name for p in (tmp_path / "out").iterdir()) == ["twisted.html", "twisted.json"]
    assert anomark("build", str(ok), "--no-cache").returncode == 0
    assert (tmp_path / "twisted.html").exists() and (tmp_path / "twisted.json").exists()
    assert anomark("build", str(broken), "-o", str(tmp_path / "b")).returncode == 2
    assert not (tmp_path / "b").exists()
    assert anomark("build", str(errs), "-o", str(tmp_path / "e")).returncode == 2
    assert (tmp_path / "e" / "errs.json").exists()
    assert anomark("check", str(ok), str(fails)).returncode == 1
    assert anomark("check", str(fails), str(broken), str(ok)).returncode == 2


def test_diff_after_a_convention_change(tmp_path, anomark):
    # spec: "`diff` exits 0 same, 1 different, 2 unreadable input"; conventions "overridable
    # with --set NAME=VALUE".
    src = tmp_path / "conv.md"
    src.write_text(doc("symbol N: integer, positive\nlet a = kappa*N",
                       front="---\nconventions:\n  kappa: 2\n---"))
    assert anomark("build", str(src), "-o", str(tmp_path / "d1"), "--format", "json").returncode == 0
    assert anomark("build", str(src), "-o", str(tmp_path / "d2"), "--format", "json",
                   "--set", "kappa=3").returncode == 0
    one, two = str(tmp_path / "d1" / "conv.json"), str(tmp_path / "d2" / "conv.json")
    assert anomark("diff", one, one).returncode == 0
    changed = anomark("diff", one, two)
    assert changed.returncode == 1 and "3*N" in changed.stdout
    (tmp_path / "bad.json").write_text("{")
    assert anomark("diff", one, str(tmp_path / "bad.json")).returncode == 2
    assert anomark("diff", one, str(tmp_path / "missing.json")).returncode == 2
