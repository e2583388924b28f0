"""Fibers declared by fixed points (``fixed points`` and ``spindle``): parsing,
the engine's handler, localization in documents, and bad input."""
from __future__ import annotations

import pytest

from compiler.statements import nodes as n
from compiler.statements.parser import parse_block
from support import compile_text, parse_problem


def compile_doc(tmp_path, *lines: str):
    return compile_text(tmp_path / "doc.md", "```derive\n" + "\n".join(lines) + "\n```\n")


def step_at(report, line: int):
    """The step whose statement starts on file line ``line``."""
    found = [s for s in report.steps if s.line == line]
    assert len(found) == 1, [s.line for s in report.steps]
    return found[0]


def failures(report) -> list[tuple[int, str, str]]:
    return [(s.line, c.what, c.detail) for s in report.steps for c in s.checks
            if c.status not in ("proven", "sampled")]


SPINDLE = ("symbol n1, n2: integer, positive", "symbol epsilon: real", "bundle R: line",
           "fiber D: spindle n1, n2, rotation t = epsilon*c1(R), tangent TD",
           "  line O1: north = t/(n1*n2), south = 0")


# ---------------------------------------------------------------- parsing

def test_spindle_is_one_header_and_its_lines():
    fiber, = parse_block("fiber D: spindle n1, n2, rotation t = epsilon*c1(R), tangent TD\n"
                         "  line O1: north = t/(n1*n2), south = 0\n", 1, "doc.md")
    assert isinstance(fiber, n.FixedPointFiber)
    assert (fiber.dimension, fiber.parameters, fiber.tangent) == (2, ("t",), "TD")
    assert [p.label for p in fiber.points] == ["north", "south"]
    assert fiber.lines == ("O1",) and [v.label for v in fiber.line_values[0]] == ["north", "south"]
    assert fiber.end_line == 2


def test_fixed_points_with_a_torus_and_formal_parameters():
    fiber, = parse_block("fiber P: fixed points, dimension 4, rotation t1, t2\n"
                         "  point p0: weights t1, t2\n"
                         "  point p1: weights -t1, t2 - t1, order 1\n", 1, "doc.md")
    assert fiber.parameters == ("t1", "t2") and fiber.identified == (None, None)
    assert fiber.tangent is None and len(fiber.points[1].weights) == 2
    assert fiber.points[0].order is None and fiber.points[1].order is not None


@pytest.mark.parametrize("text, where, message", [
    ("fiber D: fixed points, dimension 3, rotation t", (1, 34), "even dimension"),
    ("fiber D: spindle 1, 2, rotation t, u", (1, 36), "one rotation parameter"),
    ("fiber D: spindle 1, 2", (1, 22), "expected ','"),
    ("fiber D: spindle 1, 2, rotation t\n  point p: weight t", (2, 3), "starts with line"),
    ("fiber D: fixed points, dimension 2, rotation t\n  point p: t", (2, 12), "'weights'"),
    ("fiber D: fixed points, dimension 2, rotation t\n  line L: p", (2, 12), "expected '='"),
    ("line L: p = 1", (1, 1), "belongs in the indented body of a fiber"),
])
def test_parse_errors(text, where, message):
    line, column, found = parse_problem(text)
    assert (line, column) == where
    assert message in found


# ---------------------------------------------------------------- integrals in documents

def test_spindle_euler_characteristic_and_degree(tmp_path):
    # χ(WCP^1[n1,n2]) = 1/n1 + 1/n2, deg O(1) = 1/(n1 n2) (common practice, no source;
    # the spindle data as in Ferrero, Gauntlett, Martelli and Sparks, "M5-branes
    # wrapped on a spindle", 2021)
    report = compile_doc(tmp_path, *SPINDLE,
                         "integrate e(TD) over D -> chi", "check chi == 1/n1 + 1/n2",
                         "integrate c1(O1) over D -> deg", "check deg == 1/(n1*n2)",
                         "integrate c1(O1)^2 over D -> sq", "check sq == epsilon/(n1*n2)^2*c1(R)")
    assert report.passed, failures(report)
    fiber = step_at(report, 5)
    assert "north (order n1), south (order n2)" in fiber.summary
    assert any("degree of c1(O1) over D is integral" in c.what for c in fiber.checks)
    assert any("no pole in t" in c.what for c in step_at(report, 7).checks)


def test_round_sphere_agrees_with_the_genus_zero_surface(tmp_path):
    # spindle 1, 1 is S^2; with the rotation switched off its integrals are those of
    # the genus-0 surface fiber (∫ e(TS) = 2, e(TS)^2 = 0) (common practice, no source).
    report = compile_doc(
        tmp_path, "symbol p: integer", "symbol epsilon: real", "bundle R, F: line",
        "fiber S2: spindle 1, 1, rotation u = epsilon*c1(R), tangent T2",
        "  line M: north = p/2*u, south = -p/2*u",
        "fiber Sigma: surface, genus 0, tangent TS",
        "let X = (c1(F) + c1(R))^3",
        "substitute X: c1(F) = c1(M) -> XS2", "substitute X: c1(F) = p/2*e(TS) -> XSigma",
        "integrate XS2 over S2 -> by_localization", "integrate XSigma over Sigma -> by_surface",
        "substitute by_localization: epsilon = 0 -> still",
        "check still == by_surface",
        "check by_localization == by_surface + p^3/4*epsilon^2*c1(R)^2")
    assert report.passed, failures(report)
    checks = [c.what for c in step_at(report, 11).checks]
    assert "at zero rotation, localization over S2 agrees with the genus-0 surface fiber" in checks


def test_projective_plane_by_a_torus(tmp_path):
    # ∫_{CP^2} H^2 = 1, χ = 3, ∫ p1 = 3 (signature 1 = p1/3, Hirzebruch, "Topological
    # methods in algebraic geometry", 1956), by localization (Atiyah and Bott, Topology
    # 23, 1984); H restricts to -λ_i at the fixed point p_i (common practice, no source).
    report = compile_doc(
        tmp_path, "fiber P: fixed points, dimension 4, rotation t1, t2, tangent TP",
        "  point p0: weights t1, t2", "  point p1: weights -t1, t2 - t1",
        "  point p2: weights -t2, t1 - t2", "  line H: p0 = 0, p1 = -t1, p2 = -t2",
        "integrate c1(H)^2 over P -> h2", "check h2 == 1",
        "integrate e(TP) over P -> chi", "check chi == 3",
        "integrate p1(TP) over P -> p1", "check p1 == 3",
        "integrate c1(H)^3 over P -> h3", "check h3 == -(t1 + t2)")
    assert report.passed, failures(report)


# ---------------------------------------------------------------- bad input

@pytest.mark.parametrize("header, body, message", [
    ("fiber D: fixed points, dimension 2, rotation t", ("  point a: weight 0", "  point b: weight -t"),
     "tangent weight at fixed point a of D is zero"),
    ("fiber D: spindle 0, 1, rotation t", (), "order of fixed point north of D must be a positive"),
    ("fiber D: spindle 1/2, 1, rotation t", (), "order of fixed point north of D must be a positive"),
    ("fiber D: fixed points, dimension 2, rotation t", ("  point a: weight t^2",),
     "combination of the rotation parameters t"),
    ("fiber D: fixed points, dimension 4, rotation t", ("  point a: weight t",),
     "1 tangent weights; a fiber of dimension 4 needs 2"),
    ("fiber D: spindle 1, 1, rotation t", ("  line L: north = t, pole = 0",),
     "pole is not a fixed point of D"),
    ("fiber D: spindle 1, 1, rotation t", ("  line L: north = t, north = 0",),
     "restriction of L to north is given twice"),
    ("fiber D: spindle 1, 1, rotation t", ("  line L: north = t",),
     "restriction of c1(L) to fixed point south of D is missing"),
    ("fiber D: spindle 1, 1, rotation t = t", (), "must stand for a base class"),
])
def test_bad_fixed_point_data_is_an_error_naming_the_point(tmp_path, header, body, message):
    report = compile_doc(tmp_path, header, *body)
    step = step_at(report, 2)
    assert step.status == "error"
    assert message in step.checks[-1].detail


def test_inconsistent_data_is_a_failed_check_naming_the_point(tmp_path):
    # Weights +1 at both poles are no rotation of a sphere: ∫ 1 = 2/t is left.
    report = compile_doc(tmp_path, "fiber D: fixed points, dimension 2, rotation t",
                         "  point a: weight t", "  point b: weight t",
                         "integrate 1 over D -> zero")
    assert not report.passed
    failed = failures(report)
    assert [(line, what) for line, what, _ in failed] == [
        (2, "∫ 1 over D vanishes (below its dimension)"),
        (5, "localization over D leaves no pole in t")]
    assert "a: (1) / (1 * (t))" in failed[1][2] and "b: (1) / (1 * (t))" in failed[1][2]
