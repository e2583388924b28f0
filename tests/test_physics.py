"""Physically wrong or malformed derivations must be caught, at the right line.

Each case is a small document written into a temporary folder and built
through the command line, run in-process.  What matters to an author: the
exit status the format prescribes (1 for a failed check, 2 for a document
that cannot be compiled or has a step in error), a ``FILE:LINE:COL: message``
line on standard error pointing at the offending statement, and never a
Python traceback.
"""
from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from support import anomark


def document(body: str) -> str:
    return "# A bad derivation\n\nSome prose with $x^2$.\n\n```derive\n" + body.strip("\n") + "\n```\n"


def line_of(text: str, marker: str) -> int:
    """1-based line of the only line of ``text`` containing ``marker``."""
    lines = [i for i, line in enumerate(text.splitlines(), 1) if marker in line]
    assert len(lines) == 1, (marker, lines)
    return lines[0]


def build(tmp_path: Path, body: str):
    """Write the document, build it, and return (process, text, path, JSON or None)."""
    text = document(body)
    path = tmp_path / "bad.md"
    path.write_text(text)
    out = tmp_path / "out"
    proc = anomark("build", path, "-o", out, "--format", "html,json", "--no-cache")
    record_path = out / "bad.json"
    record = json.loads(record_path.read_text()) if record_path.exists() else None
    return proc, text, path, record


def located_lines(proc, path: Path) -> list[int]:
    """Line numbers of the ``FILE:LINE:COL: message`` diagnostics on stderr."""
    pattern = re.compile(rf"^{re.escape(str(path))}:(\d+):(\d+): \S", re.MULTILINE)
    return [int(m.group(1)) for m in pattern.finditer(proc.stderr)]


def assert_located(proc, path: Path, *lines: int) -> None:
    assert "Traceback" not in proc.stderr, proc.stderr
    found = located_lines(proc, path)
    assert found, f"no FILE:LINE:COL diagnostic on stderr:\n{proc.stderr}"
    assert set(found) & set(lines), f"diagnostics at {found}, expected one of {lines}:\n{proc.stderr}"


def step_at(record: dict, line: int) -> dict:
    steps = [s for s in record["steps"] if s["line"] == line]
    assert len(steps) == 1, [(s["line"], s["source"]) for s in record["steps"]]
    return steps[0]


def failed_checks(step: dict) -> list[dict]:
    return [c for c in step["checks"] if c["status"] == "failed"]


# ------------------------------------------------------------ failed checks (exit 1)


def test_false_claim_shows_the_counterexample(tmp_path):
    body = """
symbol k: integer
check k^2 == k for k = 0..3
"""
    proc, text, path, record = build(tmp_path, body)
    line = line_of(text, "check k^2")
    assert proc.returncode == 1, proc.stderr
    assert_located(proc, path, line)
    assert record is not None and record["passed"] is False
    (check,) = failed_checks(step_at(record, line))
    # k = 0 and k = 1 hold; the first point that fails is k = 2, where 4 != 2
    assert re.search(r"k\s*=\s*2", check["detail"]), check
    assert "4" in check["detail"], check
    html = (tmp_path / "out" / "bad.html").read_text()
    assert re.search(r"k\s*=\s*2", html)


def test_false_identity_of_classes_fails(tmp_path):
    # L-genus in degree 4 is p1/3 (Hirzebruch); claiming p1/6 must fail
    body = """
bundle T4: real, rank 4
let L4 = part(L(T4), 4)
check L4 == p1(T4)/6
"""
    proc, text, path, record = build(tmp_path, body)
    line = line_of(text, "check L4")
    assert proc.returncode == 1, proc.stderr
    assert_located(proc, path, line)
    (check,) = failed_checks(step_at(record, line))
    assert check["detail"], check


@pytest.mark.parametrize("body, marker", [
    # a degree-2 class replaced by a degree-4 one: the substitution's check fails
    ("""
bundle L1, R: line
let X = c1(L1)^2
substitute X: c1(L1) = c1(R)^2 -> Y
""", "substitute X"),
    # x^2 has one critical point, a minimum: nothing to maximize
    ("""
symbol x: real
maximize x^2 over x -> x0, f0
""", "maximize"),
])
def test_failed_step_is_located(tmp_path, body, marker):
    proc, text, path, record = build(tmp_path, body)
    line = line_of(text, marker)
    assert proc.returncode == 1, proc.stderr
    assert_located(proc, path, line)
    assert failed_checks(step_at(record, line))


def test_ambiguous_root_asks_for_a_range(tmp_path):
    # b*(x^3/3 - x): the maximum is at x = -1 for b > 0 and at x = +1 for b < 0
    body = """
symbol b: real, nonzero
symbol x: real
maximize b*(x^3/3 - x) over x -> x0, f0
"""
    proc, text, path, record = build(tmp_path, body)
    line = line_of(text, "maximize")
    assert proc.returncode == 1, proc.stderr
    assert_located(proc, path, line)
    step = step_at(record, line)
    assert failed_checks(step)
    said = proc.stderr + " ".join(c["detail"] for c in step["checks"]) + step.get("summary", "")
    assert "range" in said.lower(), said


def test_range_settles_the_ambiguous_root(tmp_path):
    # the same function with the parameter's sign fixed has one maximum, at x = -1
    body = """
symbol b: real, b > 0
symbol x: real
maximize b*(x^3/3 - x) over x -> x0, f0
check x0 == -1
check f0 == 2/3*b
"""
    proc, text, path, record = build(tmp_path, body)
    assert proc.returncode == 0, proc.stderr
    assert record["passed"] is True


# ------------------------------------------------ documents that cannot compile (exit 2)


@pytest.mark.parametrize("body, marker", [
    # class beyond the rank
    ("""
bundle NW: real, rank 5
let X = p3(NW)
""", "p3(NW)"),
    # exponent beyond the limit
    ("""
bundle T: real, rank 4
let X = (p1(T) + 1)^100000
""", "100000"),
    # integrating over an undeclared fiber
    ("""
bundle NW: real, rank 5
integrate p2(NW) over S4 -> m
""", "over S4"),
    # sphere of an even rank bundle
    ("""
bundle T4: real, rank 4
fiber S3: sphere of T4, angular e3
""", "sphere of T4"),
    # split whose ranks do not add up:
    # a real rank-5 bundle is not two planes (rank 4); spec, Declarations:
    # "a rank that does not add up is an error"
    ("""
bundle NW: real, rank 5
bundle L1, L2: line
split NW = L1 + L2
""", "split NW"),
    # fiber class left in a maximization:
    # the author forgot to integrate over the surface: e(TS) is still there; spec,
    # Operations: extremization acts on class-free expressions ("a polynomial with
    # classes left in it is an error")
    ("""
symbol g: integer, g >= 2
symbol eps: real
bundle R: line
fiber Sigma: surface, genus g, tangent TS
let a = (1 - eps^2)*e(TS)*c1(R)^2
maximize a over eps -> eps0, a0
""", "maximize"),
])
def test_uncompilable_document_is_located(tmp_path, body, marker):
    proc, text, path, record = build(tmp_path, body)
    assert proc.returncode == 2, proc.stderr
    assert_located(proc, path, line_of(text, marker))


def test_decimal_is_a_parse_error_and_writes_nothing(tmp_path):
    body = """
symbol x: real
let y = 0.5*x
"""
    proc, text, path, record = build(tmp_path, body)
    assert proc.returncode == 2, proc.stderr
    assert_located(proc, path, line_of(text, "0.5"))
    assert record is None
    assert not (tmp_path / "out" / "bad.html").exists()


def test_general_fiber_missing_an_integral(tmp_path):
    # S^2 x S^2 without the integral of the top monomial a*b
    body = """
fiber Q: dimension 4
  class a: 2
  class b: 2
  relation a^2 = 0
  relation b^2 = 0
"""
    proc, text, path, record = build(tmp_path, body)
    assert proc.returncode == 2, proc.stderr
    first = line_of(text, "fiber Q")
    assert_located(proc, path, *range(first, first + 5))


def test_later_uses_of_a_failed_value_are_reported_once(tmp_path):
    # the spec: after a failing statement the compiler goes on, and reports
    # each later use of its outputs once
    body = """
bundle NW: real, rank 5
let X = p3(NW)
let Y = X^2
let Z = Y + p1(NW)
symbol k: integer
check k^2 == k for k = 0..3
"""
    proc, text, path, record = build(tmp_path, body)
    assert proc.returncode == 2, proc.stderr
    lines = located_lines(proc, path)
    assert line_of(text, "p3(NW)") in lines
    # the unrelated false claim further down is still evaluated
    assert line_of(text, "check k^2") in lines or (
        record is not None and failed_checks(step_at(record, line_of(text, "check k^2")))
    )
    assert len(lines) == len(set(lines)), proc.stderr
