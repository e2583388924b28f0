"""Fibers declared by fixed points (``fixed points`` and ``spindle``): parsing,
the engine's handler, localization in documents, and bad input."""
from __future__ import annotations

import pytest

from compiler.errors import DocumentError
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


# ---------------------------------------------------------------- agreement with a model

CP2_MODEL = ("fiber CP2: dimension 4", "  class x: 2", "  relation x^3 = 0",
             "  integral x^2 = 1")


def cp2_by_points(h_at_p1: str = "-t1", h_at_p2: str = "-t2"):
    return ("fiber P: fixed points, dimension 4, rotation t1, t2, tangent TP, model CP2",
            "  point p0: weights t1, t2", "  point p1: weights -t1, t2 - t1",
            "  point p2: weights -t2, t1 - t2",
            f"  line H = x: p0 = 0, p1 = {h_at_p1}, p2 = {h_at_p2}")


def test_model_and_line_classes_are_parsed():
    (fiber,) = parse_block("fiber P: fixed points, dimension 2, rotation t, model S, "
                           "tangent TP\n  point a: weight t\n  point b: weight -t\n"
                           "  line L = x: a = t, b = 0\n  line M: a = 0, b = -t\n", 1, "doc.md")
    assert fiber.model == "S" and fiber.tangent == "TP"
    assert fiber.lines == ("L", "M") and fiber.line_models == ("x", None)


def test_projective_plane_agrees_with_its_classes_and_relations(tmp_path):
    # H^*(CP^2) = Q[x]/(x^3) with ∫ x^2 = 1, and the hyperplane class restricts to
    # -λ_i at the fixed point p_i (Atiyah and Bott, Topology 23, 1984; common practice).
    report = compile_doc(tmp_path, *CP2_MODEL, *cp2_by_points())
    assert report.passed, failures(report)
    assert "localization over P agrees with CP2 on x^2" in [c.what for c in
                                                           step_at(report, 6).checks]


def hirzebruch_f1(tmp_path, fiber_class: str = "x", section: str = "y"):
    """F_1 by classes and relations and by the fixed points of a torus, the lines
    of rays 1 and 2 standing for ``fiber_class`` and ``section``."""
    return compile_doc(
        tmp_path, "fiber F1: dimension 4", "  class x, y: 2",
        "  relation x^2 = 0, y^2 = -x*y", "  integral x*y = 1",
        "fiber T: fixed points, dimension 4, rotation t1, t2, model F1",
        "  point P12: weights t1, t2", "  point P23: weights t1 + t2, -t1",
        "  point P34: weights -t1, -t1 - t2", "  point P41: weights -t2, t1",
        f"  line D1 = {fiber_class}: P12 = t1, P23 = 0, P34 = 0, P41 = t1",
        f"  line D2 = {section}: P12 = t2, P23 = t1 + t2, P34 = 0, P41 = 0",
        "integrate (2*c1(D2) + 3*c1(D1))^2 over T -> c1squared", "check c1squared == 8")


def test_hirzebruch_surface_agrees_with_its_classes_and_relations(tmp_path):
    # F_1 with fiber class x and section y: x^2 = 0, y^2 = -x y, ∫ x y = 1, and
    # c1(T) = 2y + 3x with ∫ c1^2 = 8 (Griffiths and Harris, Principles of Algebraic
    # Geometry, 1978, ch. 4 §3, from memory).  As a toric surface with rays (1,0),
    # (0,1), (-1,1), (0,-1) the divisors of rays 1 and 2 are the fiber and the
    # section and restrict to the dual vectors of those rays (common practice, no source).
    report = hirzebruch_f1(tmp_path)
    assert report.passed, failures(report)
    assert "localization over T agrees with F1 on x^2, x*y, y^2" in [
        c.what for c in step_at(report, 6).checks]


def test_swapped_classes_fail_on_the_relation(tmp_path):
    # With the section standing for the fiber class, x^2 = 0 of F1 is broken: the
    # section squares to -1 on F_1 (Griffiths and Harris 1978, from memory).
    report = hirzebruch_f1(tmp_path, fiber_class="y", section="x")
    assert failures(report)[0] == (6, "localization over T agrees with F1",
                                   "on x^2: ∫ over F1 = 0, by localization -1")


def test_a_wrong_restriction_fails_naming_the_monomial(tmp_path):
    # Twice the hyperplane class has consistent data (no pole) but ∫ (2H)^2 = 4 ≠ 1.
    report = compile_doc(tmp_path, *CP2_MODEL, *cp2_by_points("-2*t1", "-2*t2"))
    assert failures(report) == [(6, "localization over P agrees with CP2",
                                 "on x^2: ∫ over CP2 = 1, by localization 4")]


@pytest.mark.parametrize("header, line, message", [
    ("model CP2", "  line H = y: p0 = 0, p1 = -t1, p2 = -t2", "y is not a class of the fiber CP2"),
    ("model CP2", "  line H: p0 = 0, p1 = -t1, p2 = -t2",
     "no line of P stands for the class x of CP2"),
    ("tangent TP", "  line H = x: p0 = 0, p1 = -t1, p2 = -t2", "the header names none"),
    ("model G4", "  line H = z: p0 = 0, p1 = -t1, p2 = -t2", "z has degree 4"),
    ("model CP2", "  line H = x: p0 = 0, p1 = -t1, p2 = -t2\n  line K = x: p0 = 0, "
     "p1 = -t1, p2 = -t2", "two lines of P stand for x"),
    ("model S", "  line H = x: p0 = 0, p1 = -t1, p2 = -t2", "S has dimension 2, P has 4"),
    ("model D", "  line H = x: p0 = 0, p1 = -t1, p2 = -t2",
     "D is not a fiber given by classes, relations and integrals"),
])
def test_bad_model_is_an_error(tmp_path, header, line, message):
    report = compile_doc(tmp_path, *CP2_MODEL, "fiber S: surface, genus 0, tangent TS",
                         "fiber D: spindle 1, 1, rotation u",
                         "fiber G: dimension 2", "  class y: 2", "  integral y = 1",
                         "fiber G4: dimension 4", "  class z: 4", "  integral z = 1",
                         f"fiber P: fixed points, dimension 4, rotation t1, t2, {header}",
                         "  point p0: weights t1, t2", "  point p1: weights -t1, t2 - t1",
                         "  point p2: weights -t2, t1 - t2", line)
    step = step_at(report, 14)
    assert step.status == "error"
    assert message in step.checks[-1].detail


def test_a_model_that_is_not_declared_is_an_unknown_name(tmp_path):
    with pytest.raises(DocumentError, match="unknown name 'Q'"):
        compile_doc(tmp_path, "fiber P: fixed points, dimension 2, rotation t, model Q",
                    "  point a: weight t", "  point b: weight -t")


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
