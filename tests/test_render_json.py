"""The JSON record follows the spec's schema ("The JSON record" and "JSON and
command line" in the format spec) and is byte-for-byte reproducible."""
from __future__ import annotations

import json

from compiler.render.json import to_json
from compiler.results import STATUSES, CheckResult, PlotData, Report, Step, ValueRecord
from support import I8_DISPLAY, I8_LATEX, I8_TEXT, a_star, make_report


def _record(report=None) -> dict:
    return json.loads(to_json(report or make_report()))


def test_top_level_keys_in_spec_order():
    rec = _record()
    assert list(rec) == ["tool", "document", "passed", "conventions", "steps", "values", "cached_steps",
                         "results", "counts"]
    assert rec["tool"] == {"name": "anomark", "version": "0.1.0"}
    assert rec["document"] == "derivations/twisted.md"
    assert rec["conventions"] == {"angular_integral": "2"}


def test_passed_follows_the_checks():
    assert _record()["passed"] is False  # the fixture has a failed and an errored check
    ok = Report("anomark", "0.1.0", "d.md", "", [], "", "", {}, 12,
                [Step(1, 3, 1, 3, "check 1 == 1", "check", [], [CheckResult("claim holds", "proven")])], {})
    assert _record(ok)["passed"] is True


def test_step_keys_and_values():
    steps = _record()["steps"]
    assert [s["index"] for s in steps] == list(range(1, 9))
    let = steps[1]
    assert list(let) == ["index", "line", "column", "end_line", "source", "kind", "outputs",
                         "checks", "values", "summary"]
    assert let["source"] == f"let I8 = {I8_TEXT}"
    assert let["checks"] == [{"what": "homogeneous of degree 8", "status": "proven", "detail": ""}]
    assert let["values"] == [{"name": "I8", "text": I8_TEXT, "display": I8_DISPLAY, "latex": I8_LATEX,
                              "degrees": [8]}]
    assert {c["status"] for s in steps for c in s["checks"]} == set(STATUSES)


def test_rebind_only_on_let_bang():
    steps = _record()["steps"]
    rebinds = [s for s in steps if "rebind" in s]
    assert [(s["kind"], s["rebind"], s["end_line"]) for s in rebinds] == [("let", True, 16)]


def test_remainder_table_and_plot_as_plain_data():
    steps = {s["kind"]: s for s in _record()["steps"]}
    assert steps["coefficients"]["remainder"] == {
        "text": "1/24*p1(T4)^2", "display": "1/24*p1(T4)^2", "latex": r"\frac{1}{24} {p_{1}(T_{4})}^{2}",
        "degrees": [8]}
    table = steps["table"]["table"]
    assert table["names"] == ["N", "g", "a_star"]
    assert table["rows"][0][:2] == ["2", "2"] and table["rows"][0][2] == table["text_rows"][0][2]
    assert [r[2] for r in table["text_rows"]] == [str(a_star(n, g)) for n in (2, 3) for g in (2, 3)]
    plot = steps["plot"]["plot"]
    assert (plot["variable"], plot["low"], plot["high"], plot["fixed"]) == ("z", "1/2", "3", {"N": "4", "g": "3"})
    assert plot["curves"]["a_star"][0] == [0.5, float(a_star(4, 3)) * 0.5]
    assert "remainder" not in steps["let"] and "table" not in steps["let"] and "plot" not in steps["let"]


def test_undefined_plot_points_become_null():
    plot = PlotData("x", "0", "1", {}, {"f": [(0.0, float("nan")), (1.0, float("inf")), (0.5, 2.0)]})
    report = Report("anomark", "0.1.0", "d.md", "", [], "", "", {}, 12,
                    [Step(1, 2, 1, 2, "plot f over x in 0..1", "plot", [], plot=plot)], {})
    assert _record(report)["steps"][0]["plot"]["curves"]["f"] == [[0.0, None], [1.0, None], [0.5, 2.0]]


def test_final_values():
    values = _record()["values"]
    assert values["I8"] == {"text": I8_TEXT, "display": I8_DISPLAY, "latex": I8_LATEX, "degrees": [8]}
    assert list(values) == ["I8", "kR"]


def test_headline_results_and_counts():
    report = make_report()
    report.headline = ["kR", "I8"]
    rec = _record(report)
    assert list(rec["results"]) == ["kR", "I8"]
    assert rec["results"]["kR"]["display"] == "(N^3 - N)/12"
    # steps are counted as steps, checks as checks
    assert rec["counts"] == {"steps": 8, "checks": 5, "proven": 2, "sampled": 1, "failed": 1, "error": 1}


def test_deterministic_text():
    text = to_json(make_report())
    assert text == to_json(make_report())
    assert text.startswith('{\n  "tool": {\n    "name": "anomark"')
    assert text.endswith("}\n")


def test_unicode_kept_readable():
    v = ValueRecord("x", "1", [0])
    report = Report("anomark", "0.1.0", "d.md", "", [], "", "", {}, 12,
                    [Step(1, 2, 1, 2, "let x = 1  # Â-genus", "let", ["x"], values=[v])], {"x": v})
    assert "# Â-genus" in to_json(report)
