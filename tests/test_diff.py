"""``diff`` between two JSON records: what changed, and nothing when nothing did
(format spec, "Command line": diff exits 0 same, 1 different, 2 unreadable)."""
from __future__ import annotations

import copy
import json

import pytest

from compiler.diff import Change, CheckChange, diff_to_json, diff_records, format_diff, load_record
from compiler.errors import DocumentError
from compiler.render.json import to_json, to_record
from support import make_report


def _pair():
    old = to_record(make_report())
    return old, copy.deepcopy(old)


def _step(record, kind):
    return next(s for s in record["steps"] if s["kind"] == kind)


def test_identical_records_are_the_same():
    old, new = _pair()
    d = diff_records(old, new)
    assert d.empty
    assert format_diff(d) == "no differences"
    assert json.loads(diff_to_json(d)) == {"same": True, "passed": None, "conventions": [], "values": [], "checks": []}


def test_moved_steps_are_not_changes():
    old, new = _pair()
    for s in new["steps"]:
        s["line"] += 7
        s["index"] += 1
    assert diff_records(old, new).empty


def test_changed_added_removed_values():
    old, new = _pair()
    new["values"]["kR"]["text"] = "(N^3 - N)/6"
    del new["values"]["I8"]
    new["values"]["c_star"] = {"text": "5/3", "latex": r"\frac{5}{3}", "degrees": [0]}
    d = diff_records(old, new)
    assert d.values == [Change("I8", old["values"]["I8"]["text"], None),
                        Change("kR", "(N^3 - N)/12", "(N^3 - N)/6"),
                        Change("c_star", None, "5/3")]
    assert [c.kind for c in d.values] == ["removed", "changed", "added"]
    text = format_diff(d)
    assert "value kR: (N^3 - N)/12 -> (N^3 - N)/6" in text
    assert "value c_star added: 5/3" in text and "value I8 removed: " in text


def test_latex_only_change_is_not_a_value_change():
    old, new = _pair()
    new["values"]["kR"]["latex"] = r"\tfrac{N^3-N}{12}"
    assert diff_records(old, new).values == []


def test_check_status_changes_with_lines():
    old, new = _pair()
    for s in new["steps"]:
        s["line"] += 2
    _step(new, "coefficients")["checks"][0]["status"] = "failed"
    new["passed"] = True  # pretend the other failures were fixed
    d = diff_records(old, new)
    assert d.checks == [CheckChange("coefficients I8 of c1(R)*p1(T4) -> kR", "coefficients",
                                    "coefficients are class-free", "proven", "failed", 12, 14)]
    assert d.passed == (False, True)
    text = format_diff(d)
    assert "passed: false -> true" in text
    assert "check line 12 / line 14: 'coefficients I8 of c1(R)*p1(T4) -> kR' [coefficients are class-free]: proven -> failed" in text


def test_added_and_removed_checks():
    old, new = _pair()
    new["steps"].append({"index": 9, "line": 30, "column": 1, "end_line": 30, "source": "check k > 0",
                         "kind": "check", "outputs": [], "checks": [{"what": "claim holds", "status": "proven",
                                                                       "detail": ""}]})
    _step(new, "let")["checks"] = []
    d = diff_records(old, new)
    assert [(c.source, c.old_status, c.new_status, c.old_line, c.new_line) for c in d.checks] == [
        (_step(old, "let")["source"], "proven", None, 11, None),
        ("check k > 0", None, "proven", None, 30)]
    text = format_diff(d)
    assert "removed (was proven)" in text and "added, proven" in text


def test_repeated_statements_pair_in_order():
    old, new = _pair()
    twice = {"index": 9, "line": 40, "column": 1, "end_line": 40, "source": "check kR == N", "kind": "check",
             "outputs": [], "checks": [{"what": "claim holds", "status": "proven", "detail": ""}]}
    old["steps"] += [copy.deepcopy(twice), dict(copy.deepcopy(twice), line=41)]
    new["steps"] += [copy.deepcopy(twice), dict(copy.deepcopy(twice), line=41)]
    new["steps"][-1]["checks"][0]["status"] = "failed"
    d = diff_records(old, new)
    assert [(c.old_line, c.new_line, c.new_status) for c in d.checks] == [(41, 41, "failed")]


def test_conventions_differ():
    old, new = _pair()
    new["conventions"]["angular_integral"] = "1"
    new["conventions"]["eps0"] = "1/3"
    d = diff_records(old, new)
    assert d.conventions == [Change("angular_integral", "2", "1"), Change("eps0", None, "1/3")]
    assert "convention angular_integral: 2 -> 1" in format_diff(d)
    as_json = json.loads(diff_to_json(d))
    assert as_json["same"] is False
    assert as_json["conventions"][0] == {"name": "angular_integral", "old": "2", "new": "1", "change": "changed"}


def test_load_record_round_trip(tmp_path):
    path = tmp_path / "a.json"
    path.write_text(to_json(make_report()), encoding="utf-8")
    assert load_record(path) == to_record(make_report())


@pytest.mark.parametrize("content, line, fragment", [
    ('{"passed": true,\n  "steps": [}', 2, "not valid JSON"),
    ("[1, 2]", 1, "top level is not an object"),
    ('{"passed": true, "conventions": {}, "values": {}}', 1, "'steps' is missing"),
    ('{"passed": true, "conventions": {}, "values": {}, "steps": [{"source": "x", "kind": "let", "line": 1,'
     ' "checks": [{"what": "w", "status": "great"}]}]}', 1, "known 'status'"),
])
def test_load_record_rejects_bad_input(tmp_path, content, line, fragment):
    path = tmp_path / "bad.json"
    path.write_text(content, encoding="utf-8")
    with pytest.raises(DocumentError) as err:
        load_record(path)
    assert err.value.location.path == str(path) and err.value.location.line == line
    assert fragment in err.value.message


def test_load_record_missing_file(tmp_path):
    with pytest.raises(DocumentError) as err:
        load_record(tmp_path / "nope.json")
    assert err.value.location.line == 1 and "cannot read" in err.value.message
