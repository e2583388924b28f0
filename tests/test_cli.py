"""The ``anomark`` command (spec, "Command line" and "Precise rules → Checks
and exit status", "→ JSON and command line").  Only exit status, standard
error and the files written are looked at: the command's contract, not its
internals.

The command runs in-process (conftest.py's ``anomark`` calls ``cli.main``),
except for one real process per command at the end, which runs it the way a
user does.
"""
from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from support import LOCATION, visible

GOOD = "# Good\n\n```derive\nsymbol N\nlet a = N\ncheck a == N\n```\n"
FAILS = "```derive\nsymbol N\ncheck N == 2\n```\n"
BROKEN = "```derive\nsymbol N\nlet a = zz\nlet b = N + yy\n```\n"
ERRS = "```derive\nlet a = 1/0\n```\n"


def write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.write_text(text)
    return path


# ---------------------------------------------------------------- exit status

@pytest.mark.parametrize("text, code", [(GOOD, 0), (FAILS, 1), (BROKEN, 2), (ERRS, 2)])
def test_exit_status(anomark, tmp_path, text, code):
    # spec: Command line: "Exit status: 0 passed, 1 some check failed, 2 the document could not be
    # compiled"; Precise rules: exit 2 also "when any step has status error"
    doc = write(tmp_path, "doc.md", text)
    assert anomark("check", str(doc), "--no-cache").returncode == code


def test_problems_are_file_line_col_messages_without_traceback(anomark, tmp_path):
    # spec: Command line: "with FILE:LINE:COL: message on standard error for each problem"
    doc = write(tmp_path, "doc.md", BROKEN)
    proc = anomark("build", str(doc), "--no-cache")
    lines = [line for line in proc.stderr.splitlines() if line.strip()]
    assert "Traceback" not in proc.stderr
    found = [LOCATION.match(line) for line in lines]
    assert all(found), lines
    assert [(m["file"], m["line"], m["col"]) for m in found] == [(str(doc), "3", "9"), (str(doc), "4", "13")]


def test_failed_checks_and_step_errors_are_located_too(anomark, tmp_path):
    # spec: Command line: FILE:LINE:COL: message for each problem
    doc = write(tmp_path, "doc.md", FAILS)
    proc = anomark("check", str(doc), "--no-cache")
    assert LOCATION.match(proc.stderr.splitlines()[0])["line"] == "3"
    doc = write(tmp_path, "err.md", ERRS)
    proc = anomark("check", str(doc), "--no-cache")
    assert "Traceback" not in proc.stderr and LOCATION.match(proc.stderr.splitlines()[0])["line"] == "2"


def test_an_unreadable_document_is_exit_2_with_a_location(anomark, tmp_path):
    # spec: Command line: exit 2 when the document could not be compiled
    proc = anomark("build", str(tmp_path / "missing.md"))
    assert proc.returncode == 2 and LOCATION.match(proc.stderr.splitlines()[0])
    assert "Traceback" not in proc.stderr


def test_unknown_set_name_and_decimal_set_value_are_exit_2(anomark, tmp_path):
    # spec: Precise rules → Names and order: --set of an unknown name "is an error"; values are exact
    doc = write(tmp_path, "doc.md", GOOD)
    for item in ("nope=1", "angular_integral=0.5"):
        proc = anomark("build", str(doc), "--set", item, "--no-cache")
        assert proc.returncode == 2 and "Traceback" not in proc.stderr, item
        assert not (tmp_path / "doc.json").exists()


def test_set_overrides_a_declared_convention(anomark, tmp_path):
    # spec: Front matter: "named constants; overridable with --set NAME=VALUE"
    doc = write(tmp_path, "doc.md", "```derive\nconvention kappa = 2\ncheck kappa == 3\n```\n")
    assert anomark("check", str(doc), "--no-cache").returncode == 1
    assert anomark("check", str(doc), "--no-cache", "--set", "kappa=3").returncode == 0
    assert anomark("build", str(doc), "--no-cache", "--set", "kappa=3/1", "--format", "json").returncode == 0
    assert json.loads((tmp_path / "doc.json").read_text())["conventions"]["kappa"] == "3"


# ---------------------------------------------------------------- output files

def test_output_defaults_to_the_documents_folder_and_is_named_after_it(anomark, tmp_path):
    # spec: Command line: "Output files are named after the document: build twisted.md -o out writes
    # out/twisted.html and out/twisted.json (the default formats)"; Precise rules: "-o defaults to the
    # document's own folder"
    sub = tmp_path / "papers"
    sub.mkdir()
    doc = write(sub, "twisted.md", GOOD)
    assert anomark("build", str(doc), "--no-cache", cwd=tmp_path).returncode == 0
    assert visible(sub) == ["twisted.html", "twisted.json", "twisted.md"]
    assert visible(tmp_path) == ["papers"]


def test_output_folder_and_format_subsets(anomark, tmp_path):
    # spec: Command line: "-o DIR", "--format html,tex,json"; "with tex in --format, out/twisted.tex"
    doc = write(tmp_path, "twisted.md", GOOD)
    for formats, expected in (("tex", ["twisted.tex"]), ("json", ["twisted.json"]),
                              ("html,json,tex", ["twisted.html", "twisted.json", "twisted.tex"])):
        out = tmp_path / formats.replace(",", "_")
        assert anomark("build", str(doc), "-o", str(out), "--format", formats,
                       "--no-cache").returncode == 0
        assert visible(out) == expected


def test_an_unknown_format_is_refused(anomark, tmp_path):
    # spec: Command line: formats are html, tex, json
    doc = write(tmp_path, "doc.md", GOOD)
    proc = anomark("build", str(doc), "--format", "pdf", "--no-cache")
    assert proc.returncode == 2 and visible(tmp_path) == ["doc.md"]


def test_output_names_keep_inner_dots(anomark, tmp_path):
    # spec: Command line: "Output files are named after the document"
    doc = write(tmp_path, "v1.2.md", GOOD)
    assert anomark("build", str(doc), "--format", "json", "--no-cache").returncode == 0
    assert (tmp_path / "v1.2.json").is_file()


def test_a_build_with_failed_or_error_steps_still_writes_files(anomark, tmp_path):
    # spec: Precise rules → Checks and exit status: "A document that could not be parsed writes no
    # output files; any other build writes them"
    for name, text, code in (("fails.md", FAILS, 1), ("errs.md", ERRS, 2)):
        write(tmp_path, name, text)
        assert anomark("build", str(tmp_path / name), "--no-cache").returncode == code
    assert visible(tmp_path) == ["errs.html", "errs.json", "errs.md",
                                 "fails.html", "fails.json", "fails.md"]
    assert json.loads((tmp_path / "fails.json").read_text())["passed"] is False


def test_an_unparsable_document_writes_nothing_and_keeps_old_outputs(anomark, tmp_path):
    # spec: Command line: "Each file is written whole or not at all"; Precise rules: a document that
    # could not be parsed writes no output files
    doc = write(tmp_path, "doc.md", GOOD)
    anomark("build", str(doc), "--no-cache")
    before = (tmp_path / "doc.json").read_bytes()
    write(tmp_path, "doc.md", BROKEN)
    assert anomark("build", str(doc), "--no-cache").returncode == 2
    assert (tmp_path / "doc.json").read_bytes() == before


def test_files_are_whole_and_no_temporaries_are_left(anomark, tmp_path):
    # spec: Command line: "Each file is written whole or not at all"
    doc = write(tmp_path, "doc.md", GOOD)
    assert anomark("build", str(doc), "--no-cache", "--format", "html,json,tex").returncode == 0
    record = json.loads((tmp_path / "doc.json").read_text())
    assert record["document"] == str(doc) and record["passed"] is True
    assert (tmp_path / "doc.html").read_text().rstrip().endswith("</html>")
    assert not [p for p in tmp_path.iterdir() if p.name.startswith(".doc.")]


def test_an_unwritable_output_folder_is_a_clean_failure(anomark, tmp_path):
    # spec: Command line: "Each file is written whole or not at all"
    doc = write(tmp_path, "doc.md", GOOD)
    blocker = write(tmp_path, "out", "a file, not a folder")
    proc = anomark("build", str(doc), "-o", str(blocker / "sub"), "--no-cache")
    assert proc.returncode != 0
    assert visible(tmp_path) == ["doc.md", "out"]


# ---------------------------------------------------------------- check and diff

def test_check_writes_nothing_and_exits_with_the_worst(anomark, tmp_path):
    # spec: Command line: "anomark check FILE.md ... # no output files; exit status only";
    # Precise rules: "check with several files exits with the worst status"
    good, fails, broken = (write(tmp_path, n, t) for n, t in
                           (("good.md", GOOD), ("fails.md", FAILS), ("broken.md", BROKEN)))
    assert anomark("check", str(good), str(fails), "--no-cache").returncode == 1
    assert anomark("check", str(broken), str(good), "--no-cache").returncode == 2
    assert anomark("check", str(good), str(broken), str(fails), "--no-cache").returncode == 2
    assert anomark("check", str(good), str(good), "--no-cache").returncode == 0
    assert visible(tmp_path) == ["broken.md", "fails.md", "good.md"]


def test_check_reports_every_file_even_after_a_broken_one(anomark, tmp_path):
    # spec: Precise rules: "check with several files exits with the worst status" (all are checked)
    broken, fails = write(tmp_path, "broken.md", BROKEN), write(tmp_path, "fails.md", FAILS)
    proc = anomark("check", str(broken), str(fails), "--no-cache")
    assert str(broken) + ":3:9:" in proc.stderr and str(fails) + ":3:1:" in proc.stderr


def test_diff_exit_status(anomark, tmp_path):
    # spec: Precise rules → JSON and command line: "diff exits 0 same, 1 different, 2 unreadable input"
    write(tmp_path, "a.md", GOOD)
    write(tmp_path, "b.md", FAILS)
    for name in ("a", "b"):
        anomark("build", str(tmp_path / f"{name}.md"), "--format", "json", "--no-cache")
    a, b = str(tmp_path / "a.json"), str(tmp_path / "b.json")
    assert anomark("diff", a, a).returncode == 0
    assert anomark("diff", a, b).returncode == 1
    write(tmp_path, "junk.json", "{")
    for bad in (str(tmp_path / "junk.json"), str(tmp_path / "absent.json"), str(tmp_path / "a.md")):
        proc = anomark("diff", a, bad)
        assert proc.returncode == 2 and "Traceback" not in proc.stderr


def test_diff_sees_a_convention_change(anomark, tmp_path):
    # spec: JSON record: "for diffs and regeneration"; Front matter: conventions overridable with --set
    doc = write(tmp_path, "doc.md", "```derive\nconvention kappa = 2\nlet k = kappa\n```\n")
    anomark("build", str(doc), "--format", "json", "-o", str(tmp_path / "one"), "--no-cache")
    anomark("build", str(doc), "--format", "json", "-o", str(tmp_path / "two"), "--no-cache",
            "--set", "kappa=5")
    proc = anomark("diff", str(tmp_path / "one" / "doc.json"), str(tmp_path / "two" / "doc.json"))
    assert proc.returncode == 1 and "5" in proc.stdout


def test_help_names_the_commands(anomark):
    # spec: Command line: the commands are build, check and diff
    run = anomark("--help")
    assert run.returncode == 0 and all(word in run.stdout for word in ("build", "check", "diff"))


# ---------------------------------------------------------------- as a user runs it

def console(*args: str, cwd: Path) -> subprocess.CompletedProcess:
    """The installed ``anomark`` script when there is one beside this Python
    (the README's editable install), else ``python -m compiler``."""
    script = Path(sys.executable).with_name("anomark")
    command = [str(script)] if script.is_file() else [sys.executable, "-m", "compiler"]
    return subprocess.run([*command, *args], capture_output=True, text=True, cwd=cwd, timeout=300)


def python_m(*args: str, cwd: Path) -> subprocess.CompletedProcess:
    # spec: Command line: "The command is anomark (the Python package lives in compiler/)"
    return subprocess.run([sys.executable, "-m", "compiler", *args], capture_output=True, text=True,
                          cwd=cwd, timeout=300)


def test_build_in_a_process_of_its_own(tmp_path):
    write(tmp_path, "fails.md", FAILS)
    proc = console("build", "fails.md", "--no-cache", "--format", "json", cwd=tmp_path)
    assert proc.returncode == 1 and "Traceback" not in proc.stderr, proc.stderr
    assert LOCATION.match(proc.stderr.splitlines()[0])["line"] == "3"
    assert json.loads((tmp_path / "fails.json").read_text())["passed"] is False


def test_check_in_a_process_of_its_own(tmp_path):
    write(tmp_path, "good.md", GOOD)
    write(tmp_path, "broken.md", BROKEN)
    proc = python_m("check", "good.md", "broken.md", "--no-cache", cwd=tmp_path)
    assert proc.returncode == 2 and "broken.md:3:9:" in proc.stderr and "Traceback" not in proc.stderr
    assert visible(tmp_path) == ["broken.md", "good.md"]


def test_diff_in_a_process_of_its_own(anomark, tmp_path):
    for name, text in (("a.md", GOOD), ("b.md", FAILS)):
        write(tmp_path, name, text)
        anomark("build", tmp_path / name, "--format", "json", "--no-cache")
    proc = python_m("diff", "a.json", "b.json", cwd=tmp_path)
    assert proc.returncode == 1 and proc.stdout.strip() and "Traceback" not in proc.stderr
