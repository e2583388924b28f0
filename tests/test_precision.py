"""Known precision (issue 12, item 1): values carry the degree up to which they
are exact, and reading beyond it is an error that names the truncate to use."""
from __future__ import annotations

import pytest

from compiler.algebra.graded import Ring
from compiler.precision import Known, integrated, power, product
from tests.support import compile_text

# The shape of the reduction in Maldacena, Strominger and Witten, "Black hole
# entropy in M-theory" (JHEP 1997): an eight-form on the M5-brane times a
# two-form, integrated over the four-dimensional divisor P, with
# c_R = 6D + c2.P/2 = P^3 + c2.P/2 (from memory).  The eight-form here is a
# stand-in chosen so that its coefficient reproduces that combination
# (common practice, no source): D6 is P^3 = ∫ x^2, c2P is c2.P = ∫ y.
MSW = """---
title: MSW central charge
truncate: {truncate}
---

```derive
symbol D6, c2P
bundle R: real, rank 3
bundle L: line
fiber P: dimension 4
  class x: 2
  class y: 4
  integral x^2 = D6
  integral y = c2P
let I8 = x^2*p1(R) + y*p1(R)/2
let J = I8*c1(L)
integrate J over P -> I6
coefficients I6 of c1(L)*p1(R) -> c_R
check c_R == D6 + c2P/2
```

The right-moving central charge is @{{c_R}}.
"""


def msw(tmp_path, truncate: int, **options):
    return compile_text(tmp_path / "msw.md", MSW.format(truncate=truncate), **options)


def step(report, source_start: str):
    found = [s for s in report.steps if s.source.startswith(source_start)]
    assert len(found) == 1
    return found[0]


def test_msw_with_truncate_8_stops_at_the_unknown_six_form(tmp_path):
    report = msw(tmp_path, 8)
    assert "c_R" not in report.values  # never a silent c_R = 0
    shown = step(report, "integrate").values[0]
    assert shown.text == "0" and shown.unknown_from == 5  # text reads back; the order term is display only
    read = step(report, "coefficients")
    assert read.status == "error"
    assert ("the coefficient of p1(R)*c1(L) reads degree 6 of a value that is exact only up to "
            "degree 4 (truncate: 8 dropped the rest); truncate: 10 would make it exact there"
            ) in read.checks[-1].detail
    assert not report.passed


def test_msw_with_enough_truncation_gives_the_central_charge(tmp_path):
    report = msw(tmp_path, 10)
    assert report.passed
    assert step(report, "check").checks[0].status == "proven"


def test_precision_survives_the_cache(tmp_path):
    first = msw(tmp_path, 8, use_cache=True)
    again = msw(tmp_path, 8, use_cache=True)
    assert again.cached_steps > 0 and step(again, "integrate").cached
    assert step(again, "integrate").values[0].unknown_from == 5
    assert step(again, "coefficients").checks[-1].detail == step(first, "coefficients").checks[-1].detail


def derive(tmp_path, *lines, front="truncate: 8"):
    text = f"---\ntitle: t\n{front}\n---\n\n```derive\n" + "\n".join(lines) + "\n```\n"
    return compile_text(tmp_path / "doc.md", text)


DECLS = ("bundle V: complex, rank 4", "bundle L: line", "bundle M: line", "fiber F: dimension 2", "  class u: 2",
         "  integral u = 1")


def test_part_and_checks_beyond_the_precision_are_errors(tmp_path):
    report = derive(tmp_path, *DECLS, "let X = c(V)*c1(M)*u", "integrate X over F -> Y",
                    "let low = part(Y, 6)", "let high = part(Y, 8)", "check Y == 0")
    assert step(report, "integrate").checks[-1].what.startswith("exact up to degree 6")
    assert step(report, "let low").status == "proven"
    assert "truncate: 10 would make it exact" in step(report, "let high").checks[-1].detail
    assert "reads degree 8" in step(report, "check").checks[-1].detail


def test_prose_that_shows_an_unknown_degree_is_an_error(tmp_path):
    text = ("---\ntitle: t\ntruncate: 8\n---\n\n```derive\n" + "\n".join(DECLS)
            + "\nlet X = c(V)*c1(M)*u\nintegrate X over F -> Y\n```\n\nThen @{Y}.\n")
    report = compile_text(tmp_path / "doc.md", text)
    assert any(":17:6: @{Y} reads degree 8" in d for d in report.diagnostics), report.diagnostics
    assert report.prose_errors == 1 and not report.passed


def test_substituting_a_value_not_known_in_its_degree_is_an_error(tmp_path):
    report = derive(tmp_path, *DECLS, "let X = c(V)*c1(M)*u", "integrate X over F -> Y",
                    "let Q = c4(V) + c1(M)^4",
                    "substitute Q: c1(M) = part(Y, 2) + c1(L) -> Z",
                    "substitute Q: c4(V) = Y -> Z2")
    assert step(report, "substitute Q: c1(M)").status == "proven"
    assert "reads degree 8" in step(report, "substitute Q: c4(V)").checks[-1].detail


def test_integrand_without_a_fiber_class_is_a_failed_check(tmp_path):
    report = derive(tmp_path, *DECLS, "let X = c1(L)^2", "integrate X over F -> Y")
    check = step(report, "integrate").checks[-1]
    assert check.status == "failed" and "has no class of F, so its integral is 0" in check.detail
    assert "Y" not in report.values


# ---------------------------------------------------------------- the rules
# Power-series arithmetic (common practice, no source): if A is exact up to
# degree a with lowest degree dA, and B likewise, A*B is exact up to
# min(a + dB, b + dA); the ring's truncation caps it; integration lowers it.

@pytest.fixture()
def ring():
    r = Ring([], 12)
    return r, r.generator("x", 2), r.generator("y", 4)


def test_product_rule(ring):
    r, x, y = ring
    assert product(Known(x, 4), Known(y, 6), 12) == min(4 + 4, 6 + 2)
    assert product(Known(x), Known(y, 6), 12) == 8
    assert product(Known(x), Known(y), 12) is None
    assert product(Known(x ** 4), Known(y ** 2), 12) == 12  # degree 16 dropped
    assert product(Known(r.zero(), 4), Known(y), 12) == 8  # unknown part starts at degree 5


def test_power_and_integration(ring):
    r, x, _ = ring
    assert power(Known(r.one() + x, 8), 3, 12) == 8
    assert power(Known(x, 6), 2, 12) == 8
    assert power(Known(x), 7, 12) == 12
    assert integrated(8, 4) == 4 and integrated(None, 4) is None


def test_coefficients_of_an_exact_zero_are_zero(tmp_path):
    # an anomaly that cancels exactly: every coefficient is 0, which is the point
    report = derive(tmp_path, *DECLS, "let I = c1(L)^3 - c1(L)^3", "coefficients I of c1(L)^3 -> k",
                    "check k == 0")
    assert report.passed


def test_the_json_record_says_where_a_value_stops_being_known(tmp_path):
    from compiler.render.json import to_json
    import json
    record = json.loads(to_json(msw(tmp_path, 8)))
    shown = record["steps"][[s["kind"] for s in record["steps"]].index("integrate")]
    value = record["values"][shown["outputs"][0]]
    assert value["text"] == "0" and value["unknown_from"] == 5
    assert value["display"].endswith("O(degree >= 5)")
