"""What the command line says to its author (issue 8, "a tool that talks"):
one summary line per document, --quiet, --help with defaults, exit statuses
and examples, located warnings, and a closed pipe that ends quietly.

Driven in-process through ``compiler.cli.main``, except the closed pipe,
which is about the process itself.
"""
from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path
from types import SimpleNamespace

import pytest

from compiler import cli
from compiler.errors import Location, Problem

ROOT = Path(__file__).resolve().parent.parent
GOOD = "# Good\n\n```derive\nsymbol N\nlet a = N\ncheck a == N\n```\n"
FAILS = "```derive\nsymbol N\ncheck N == 2\ncheck N == N\n```\n"
SUMMARY = re.compile(r"^(?P<doc>\S+): (?P<verdict>passed|FAILED|ERRORS) \u2014 (?P<checks>\d+) checks?"
                     r"(?::(?P<counts>[^(]*))? \((?P<steps>\d+) steps?\)(?:; wrote (?P<wrote>.+))?$")


def run(capsys, *args: str) -> tuple[int, str, str]:
    status = cli.main(list(args))
    out, err = capsys.readouterr()
    return status, out, err


def write(folder: Path, name: str, text: str) -> Path:
    path = folder / name
    path.write_text(text)
    return path


def test_a_build_ends_with_one_summary_line_naming_counts_and_files(tmp_path, capsys):
    # common practice, no source: a compiler says what it did and where it wrote
    doc = write(tmp_path, "doc.md", GOOD)
    status, out, err = run(capsys, "build", str(doc), "-o", str(tmp_path / "out"), "--no-cache")
    assert status == 0 and out == ""
    [line] = err.splitlines()
    m = SUMMARY.match(line)
    assert m, line
    # symbol, let (degree check), check (the claim): 3 steps, 2 checks, both proven
    assert (m["doc"], m["verdict"], m["checks"], m["steps"]) == (str(doc), "passed", "2", "3")
    assert m["counts"].strip() == "2 proven"
    assert m["wrote"].split(", ") == [str(tmp_path / "out" / "doc.html"), str(tmp_path / "out" / "doc.json")]


def test_check_counts_failures_per_document(tmp_path, capsys):
    good, bad = write(tmp_path, "good.md", GOOD), write(tmp_path, "bad.md", FAILS)
    status, _, err = run(capsys, "check", str(good), str(bad), "--no-cache")
    assert status == 1
    summaries = [SUMMARY.match(line) for line in err.splitlines() if SUMMARY.match(line)]
    assert [(m["doc"], m["verdict"]) for m in summaries] == [(str(good), "passed"), (str(bad), "FAILED")]
    assert summaries[1]["counts"].strip() == "1 proven, 1 failed" and summaries[1]["wrote"] is None
    # the failed check is still located, above its summary
    assert err.splitlines()[-2].startswith(f"{bad}:3:1: ")


def test_quiet_silences_the_summary_but_not_the_problems(tmp_path, capsys):
    good, bad = write(tmp_path, "good.md", GOOD), write(tmp_path, "bad.md", FAILS)
    assert run(capsys, "build", str(good), "--quiet", "--no-cache") == (0, "", "")
    status, out, err = run(capsys, "check", str(bad), "--quiet", "--no-cache")
    assert status == 1 and out == "" and err.splitlines() and not SUMMARY.match(err.splitlines()[-1])
    assert all(line.startswith(f"{bad}:") for line in err.splitlines())


@pytest.mark.parametrize("command", ["build", "check", "diff", "watch"])
def test_each_command_has_help_with_defaults_exit_statuses_and_an_example(capsys, command):
    with pytest.raises(SystemExit) as exit_:
        cli.main([command, "--help"])
    out = capsys.readouterr().out
    assert exit_.value.code == 0
    assert "exit status:" in out and re.search(r"^  0  ", out, re.M) and re.search(r"^  2  ", out, re.M)
    assert re.search(rf"^example:\n  anomark {command} ", out, re.M), out
    options = [line for line in out.splitlines() if line.startswith("  --") and "--help" not in line]
    assert "(default" in out or command == "diff"  # diff's only options are switches
    assert options


def test_top_level_help_lists_every_command_with_an_example(capsys):
    with pytest.raises(SystemExit):
        cli.main(["--help"])
    out = capsys.readouterr().out
    for command in cli.COMMANDS:
        assert re.search(rf"^    {command} ", out, re.M) and f"  anomark {command} " in out


def test_warnings_a_build_carries_print_located(capsys):
    # Reports gain ``warnings`` (near-miss derive fences); read defensively.
    warned = SimpleNamespace(warnings=[Problem(Location("doc.md", 3, 1), "fence 'Derive' is not a derive block")])
    cli.print_warnings(warned)
    cli.print_warnings(SimpleNamespace())  # no warnings attribute at all
    assert capsys.readouterr().err == "doc.md:3:1: warning: fence 'Derive' is not a derive block\n"


def test_a_near_miss_fence_is_a_located_warning_before_the_error_it_explains(tmp_path, capsys):
    doc = write(tmp_path, "doc.md", "# T\n\n```Derive\nsymbol N\n```\n\n```derive\nlet a = N\n```\n")
    status, _, err = run(capsys, "check", str(doc), "--no-cache")
    assert status == 2
    assert err.splitlines() == [f"{doc}:3:4: warning: the fence 'Derive' is shown as code, not compiled; "
                                "did you mean 'derive'?", f"{doc}:8:9: unknown name 'N'"]


def test_a_warning_leaves_a_passing_document_passing(tmp_path, capsys):
    doc = write(tmp_path, "doc.md", "```drive\nsymbol N\n```\n\n" + GOOD)
    status, _, err = run(capsys, "build", str(doc), "--no-cache")
    assert status == 0
    warning, summary_line = err.splitlines()
    assert warning.startswith(f"{doc}:1:4: warning: the fence 'drive'")
    assert SUMMARY.match(summary_line)["verdict"] == "passed"


def test_a_closed_pipe_ends_quietly(tmp_path, capsys):
    # common practice, no source: `anomark diff a b | head -1` ends like `cat` would, by SIGPIPE's status
    old, new = tmp_path / "old", tmp_path / "new"
    doc = write(tmp_path, "doc.md", "```derive\nconvention k = 1\nsymbol N\nlet a = k*N\n```\n")
    assert run(capsys, "build", str(doc), "-o", str(old), "--format", "json", "--no-cache")[0] == 0
    assert run(capsys, "build", str(doc), "-o", str(new), "--format", "json", "--set", "k=2")[0] == 0
    proc = subprocess.Popen([sys.executable, "-m", "compiler", "diff", str(old / "doc.json"), str(new / "doc.json")],
                            cwd=ROOT, stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    proc.stdout.close()  # the reader is gone before the interpreter has even started
    err = proc.stderr.read().decode()
    assert proc.wait(timeout=120) == 141, err
    assert err == ""
