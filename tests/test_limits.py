"""Runaway input stops with a clear, located error instead of running on.

spec: Precise rules -> "Exponents are integer literals with absolute value at
most 1000 (an error beyond)"; a step that could not run is an *error*.  The
size limits are anomark's own (DEVELOPERS.md); common practice, no source.
"""
from __future__ import annotations

from compiler.algebra.element import MAX_TERMS
from compiler.errors import DocumentError
from support import compile_text

import pytest


def run(tmp_path, body: str):
    return compile_text(tmp_path / "runaway.md", "```derive\n" + body + "\n```\n", time_limit=60)


def test_a_huge_power_of_a_symbolic_polynomial_is_refused_at_its_line(tmp_path):
    report = run(tmp_path, "symbol x, y, z\nlet a = (x + y + z + 1)^200\nlet b = (x + 1)^20")
    a, b = report.steps[1], report.steps[2]
    assert a.status == "error" and "would have up to" in a.checks[0].detail
    assert str(MAX_TERMS) in a.checks[0].detail
    assert b.status == "proven"  # a modest power still works
    assert f"{report.diagnostics[0]}".startswith(f"{tmp_path / 'runaway.md'}:3:")


def test_an_exponent_beyond_1000_is_a_syntax_error(tmp_path):
    with pytest.raises(DocumentError) as err:
        run(tmp_path, "bundle T: real, rank 4\nlet a = (p1(T) + 1)^100000")
    assert err.value.location.line == 3


def test_a_truncated_power_of_classes_stays_cheap(tmp_path):
    # (p1 + 1)^1000 is exact up to degree 12: 1 + 1000 p1 + C(1000,2) p1^2 + C(1000,3) p1^3.
    report = run(tmp_path, "bundle T: real, rank 4\nlet a = (p1(T) + 1)^1000\n"
                           "check a == 1 + 1000*p1(T) + 499500*p1(T)^2 + 166167000*p1(T)^3")
    assert [s.status for s in report.steps] == ["proven", "proven", "proven"]
