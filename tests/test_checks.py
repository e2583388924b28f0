"""Claims: proven, sampled, failed or error (spec, "Checks" and "Precise rules
→ Checks and exit status", "Operations → Sampling is deterministic").

The failing points a check reports are read back and verified here with
exact arithmetic, so a test passes only if the witness really breaks the
claim and really satisfies the declared assumptions.
"""
from __future__ import annotations

import re
from fractions import Fraction

import pytest

from support import compile_text

DECLS = ("symbol N, k: integer, positive",
         "symbol g: integer, g >= 2",
         "symbol z: real, z > 0",
         "symbol x: real, 0 < x < 1",
         "symbol y")


def compile_doc(tmp_path, *lines: str, name: str = "doc.md"):
    return compile_text(tmp_path / name, "```derive\n" + "\n".join(DECLS + lines) + "\n```\n")


def check_steps(tmp_path, *claims: str):
    report = compile_doc(tmp_path, *[f"check {c}" for c in claims])
    return report.steps[len(DECLS):]


def one(tmp_path, claim: str):
    step, = check_steps(tmp_path, claim)
    assert len(step.checks) == 1, "one step per check"
    return step.checks[0]


def point_of(detail: str) -> dict[str, Fraction]:
    """The ``at a = 1, b = -2/3`` part of a detail, as exact numbers."""
    found = re.match(r"at ((?:[A-Za-z]\w* = -?\d+(?:/\d+)?(?:, )?)+)", detail)
    assert found, detail
    return {name: Fraction(v) for name, v in re.findall(r"([A-Za-z]\w*) = (-?\d+(?:/\d+)?)", found.group(1))}


# ---------------------------------------------------------------- the four statuses

def test_proven_when_the_difference_is_exactly_zero(tmp_path):
    # spec: Checks table: "proven: the difference simplifies to exactly zero"
    assert one(tmp_path, "N^3 - N == N*(N - 1)*(N + 1)").status == "proven"


def test_failed_shows_a_point_and_both_sides(tmp_path):
    # spec: Checks table: "failed: a point where the two sides differ is shown, with both values"
    check = one(tmp_path, "N^3 - N == N^3")
    assert check.status == "failed"
    point = point_of(check.detail)
    n = point["N"]
    assert n.denominator == 1 and n > 0  # an admissible point: integer, positive
    left = re.search(r"left = (-?\d+(?:/\d+)?)", check.detail).group(1)
    right = re.search(r"right = (-?\d+(?:/\d+)?)", check.detail).group(1)
    assert Fraction(left) == n**3 - n and Fraction(right) == n**3 and Fraction(left) != Fraction(right)


def test_failed_without_symbols_shows_both_values(tmp_path):
    # spec: Checks table: failed ... "with both values"
    check = one(tmp_path, "2 + 2 == 5")
    assert check.status == "failed" and "4" in check.detail and "5" in check.detail


def test_sampled_when_radicals_defeat_simplification(tmp_path):
    # spec: Checks table: "sampled: not settled symbolically; equal at a stated number of random
    # exact or 50-digit points satisfying the assumptions". sqrt(z + 2 sqrt(z) + 1) = sqrt(z) + 1
    # holds only for z >= 0, so points outside the assumptions would fail it.
    check = one(tmp_path, "sqrt(z + 2*sqrt(z) + 1) == sqrt(z) + 1")
    assert check.status == "sampled"
    count = int(re.search(r"(\d+) random", check.detail).group(1))
    assert count >= 20  # spec: Precise rules → Operations: "a fixed count (at least 20)"


def test_sampling_is_deterministic(tmp_path):
    # spec: Precise rules → Operations: "Sampling is deterministic: ... seeded from the document's
    # path and the statement's line"
    claims = ("sqrt(z + 2*sqrt(z) + 1) == sqrt(z) + 1", "y^3 + z == y^2", "sqrt(y^2 + 1) == y + 1")
    first = [s.checks[0].detail for s in check_steps(tmp_path, *claims)]
    second = [s.checks[0].detail for s in check_steps(tmp_path, *claims)]
    assert first == second and all(first)


def test_sampled_equality_that_is_false_fails(tmp_path):
    # spec: Checks table: failed ... a point where the two sides differ
    check = one(tmp_path, "sqrt(z)*sqrt(z + 1) == sqrt(z^2 + 2*z)")
    assert check.status == "failed" and "z = " in check.detail


def test_an_exact_nonzero_difference_is_failed_not_sampled(tmp_path):
    # spec: Checks table: sampled means "not settled symbolically"; a difference of exactly
    # -1/10^45 is settled, and nonzero
    assert one(tmp_path, "sqrt(2) == sqrt(2) + 1/10^45").status == "failed"


def test_a_difference_visible_at_50_digits_fails(tmp_path):
    # spec: Checks table: sampled means equal at "50-digit points"; z/10^45 with z ~ 1 differs
    # in the 45th digit
    check = one(tmp_path, "sqrt(z + 2*sqrt(z) + 1) == sqrt(z) + 1 + z/10^45")
    assert check.status == "failed"


def test_error_when_the_check_cannot_run(tmp_path):
    # spec: Checks table: "error: the check could not run (undefined name, degree clash, ...)"
    report = compile_doc(tmp_path, "let a = 1/0", "check a == 1")
    assert [s.status for s in report.steps[-2:]] == ["error", "error"]
    assert "line %d" % report.steps[-2].line in report.steps[-1].checks[-1].detail


# ---------------------------------------------------------------- for clauses

def test_for_range_visits_every_integer_inclusive(tmp_path):
    # spec: Checks: "for N = 2..8 every integer in the range"; Precise rules: "a..b is inclusive"
    inside, low_edge, high_edge, middle = check_steps(
        tmp_path,
        "(N - 1)*(N - 9) < 0 for N = 2..8",   # true exactly on 2..8
        "(N - 1)*(N - 9) < 0 for N = 1..8",   # false at the lower end point only
        "(N - 1)*(N - 9) < 0 for N = 2..9",   # false at the upper end point only
        "(N - 5)^2 > 0 for N = 2..8")          # false at an interior point only
    assert inside.status == "proven"
    assert low_edge.status == "failed" and point_of(low_edge.checks[0].detail) == {"N": 1}
    assert high_edge.status == "failed" and point_of(high_edge.checks[0].detail) == {"N": 9}
    assert middle.status == "failed" and point_of(middle.checks[0].detail) == {"N": 5}


def test_for_reports_the_first_failing_point(tmp_path):
    # spec: Precise rules → Checks: "the weakest over the points, with the first failing point in detail"
    check = one(tmp_path, "N < 5 for N = 1..8")
    assert check.status == "failed" and point_of(check.detail) == {"N": 5}


def test_several_clauses_take_every_combination(tmp_path):
    # spec: Checks: "several clauses separated by commas take every combination". The claim is false
    # only at (N, g) = (3, 2), which pairing the ranges, (1, 2), (2, 3), (3, 4), would never reach.
    check = one(tmp_path, "(N - 3)^2 + (g - 2)^2 > 0 for N = 1..3, g = 2..4")
    assert check.status == "failed" and point_of(check.detail) == {"N": 3, "g": 2}
    assert one(tmp_path, "N*g >= 2 for N = 1..3, g = 2..4").status == "proven"


def test_a_single_value_substitutes_before_comparing(tmp_path):
    # spec: Checks: "for z = 1 one value"
    assert one(tmp_path, "z^2 == z for z = 1").status == "proven"
    assert one(tmp_path, "x == 1/2 for x = 1/2").status == "proven"


@pytest.mark.parametrize("claim", ["N == 1 for N = 0", "N == 1 for N = 1/2", "g == 1 for g = 1",
                                   "z > 0 for z = -1", "x > 0 for x = 1", "N > 0 for N = 0..3"])
def test_a_value_that_breaks_the_assumptions_is_an_error(tmp_path, claim):
    # spec: Precise rules → Checks and exit status: "a value that breaks the symbol's assumptions is an error"
    step, = check_steps(tmp_path, claim)
    assert step.status == "error" and "breaks" in step.checks[-1].detail


# ---------------------------------------------------------------- inequalities

@pytest.mark.parametrize("claim, status", [
    ("y^2 >= 0", "proven"),
    ("y^2 + 1 > 0", "proven"),
    ("z^2 + z > 0", "proven"),          # from z > 0
    ("g - 2 >= 0", "proven"),           # from the bound g >= 2
    ("sqrt(2) > 1", "proven"),
    ("sqrt(N) > 1 for N = 2..4", "proven"),
    ("N^2 - 7 > 0 for N = 2..8", "failed"),
    ("3 < 2", "failed"),
    ("y^3 > 0", "failed"),
])
def test_inequalities_are_decided_exactly(tmp_path, claim, status):
    # spec: Precise rules → Checks: "inequalities apply to class-free values and are decided exactly,
    # at each point of a for range or by proof, never by sampling"
    assert one(tmp_path, claim).status == status


def test_a_failed_inequality_witness_is_admissible_and_real(tmp_path):
    # spec: Checks table: failed shows a point; it must satisfy the declarations and break the claim
    check = one(tmp_path, "N > k")
    point = point_of(check.detail)
    assert check.status == "failed"
    assert all(v.denominator == 1 and v > 0 for v in point.values())
    assert not point["N"] > point["k"]


@pytest.mark.parametrize("claim", ["x*(1 - x) > 0", "sqrt(z + 1) > sqrt(z)", "y^2 - 2*y + 2 > 1/2",
                                   "sqrt(z)*sqrt(z + 1) > z"])
def test_inequalities_are_never_sampled(tmp_path, claim):
    # spec: Precise rules → Checks: "never by sampling" (undecidable → error, true → proven)
    assert one(tmp_path, claim).status in ("proven", "error")


def test_an_undecidable_inequality_is_an_error(tmp_path):
    # spec: Precise rules → Checks: decided "by proof" or not at all; x^2 - x + 13/50 > 0 on
    # 0 < x < 1 is true (negative discriminant, common practice, no source) but the sign rules
    # see terms of both signs, and the error asks for a range
    check = one(tmp_path, "x^2 - x + 13/50 > 0")
    assert check.status == "error" and "for" in check.detail


@pytest.mark.parametrize("claim", ["x < 1", "x > 0", "x*(1 - x) > 0", "1 - x^2 > 0", "x <= 1",
                                   "g*x < g", "N + x > 1"])
def test_the_declared_interval_proves_inequalities(tmp_path, claim):
    # Issue 12: with 0 < x < 1, "x < 1" must be proven (it used to be an error); x = t/(1 + t)
    # with t > 0 makes each of these a sum of positive terms (common practice, no source)
    assert one(tmp_path, claim).status == "proven"


@pytest.mark.parametrize("claim", ["x > 1", "x >= 1", "g*x > g"])
def test_the_declared_interval_disproves_inequalities(tmp_path, claim):
    check = one(tmp_path, claim)
    assert check.status == "failed"


def test_inequalities_with_classes_are_errors(tmp_path):
    # spec: Precise rules → Checks: "inequalities apply to class-free values"
    report = compile_doc(tmp_path, "bundle T: real, rank 4", "check p1(T) > 0")
    assert report.steps[-1].status == "error"


def test_not_equal(tmp_path):
    # spec: Precise rules → Checks: operators == != < <= > >=
    assert [one(tmp_path, c).status for c in ("N != N + 1", "N != N", "sqrt(2) != 1")] == \
        ["proven", "failed", "proven"]


def test_classes_compare_exactly(tmp_path):
    # spec: Checks table: proven when the difference is exactly zero, also for classes
    report = compile_doc(tmp_path, "bundle T: real, rank 4",
                         "check (1 + p1(T))^2 == 1 + 2*p1(T) + p1(T)^2",
                         "check p1(T)*N == p1(T)*k")
    proven, failed = report.steps[-2:]
    assert proven.status == "proven"
    assert failed.status == "failed" and "N = " in failed.checks[0].detail
