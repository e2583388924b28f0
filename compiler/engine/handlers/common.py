"""Small pieces several handler families share: typed evaluation and the degree check."""
from __future__ import annotations

from ... import notation
from ...algebra.graded import Element
from ...expressions import Value
from ...precision import Known, Precision, unknown_above
from ...results import CheckResult
from ...statements import expr_nodes as en


def element(scope, node, what: str) -> Element:
    """Evaluate ``node``; a located error unless it is a ring element."""
    return known_element(scope, node, what).value


def known_element(scope, node, what: str) -> Known:
    """``element`` with the degree up to which it is exact."""
    known = scope.known(node)
    if not isinstance(known.value, Element):
        raise scope.fail(node, f"{what} needs a polynomial in the classes, not {notation.text(known.value)}")
    return known


def relation(scope, eq: en.Equation) -> Element:
    """``lhs == rhs`` (or a bare ``lhs``, meaning ``lhs == 0``) as ``lhs - rhs``."""
    sides = [scope.read(side) for side in (eq.lhs, eq.rhs) if side is not None]
    if not all(isinstance(side, Element) for side in sides):
        raise scope.fail(eq, "a relation must be a polynomial in the classes with "
                             "rational-function coefficients")
    return sides[0] - sides[1] if len(sides) == 2 else sides[0]


def degree_check(value: Value, exact_to: Precision = None, truncate: int = 0) -> CheckResult:
    """The automatic check every computed value carries: its form degrees
    (only up to the degree where it stops being exact, if it does)."""
    degrees = value.degrees() if isinstance(value, Element) else ([] if value == 0 else [0])
    unknown = unknown_above(exact_to, truncate)
    if unknown is not None:
        known = ", ".join(map(str, degrees)) or "none"
        return CheckResult(f"exact up to degree {exact_to}, unknown from degree {unknown} "
                           f"(nonzero degrees known: {known})", "proven")
    if not degrees:
        return CheckResult("zero (passes every degree check)", "proven")
    if len(degrees) == 1:
        return CheckResult(f"homogeneous of degree {degrees[0]}", "proven")
    return CheckResult("form degrees " + ", ".join(map(str, degrees)), "proven")
