"""A stranger's document, record or folder, one test per class of harm in issue 10.

Injection into the HTML report, the LaTeX appendix and the reader's
terminal; work bombs, each stopped by a limit whose located message names
it (asserted through the message, never by timing); records that are not
records; outputs that would land on a file or on the document.  Forged
caches are in ``test_cache_trust.py``.  Everything runs in-process through
``compiler.cli.main``, except pdflatex, whose run is the point.  The limits
are anomark's own (DEVELOPERS.md, "Limits against runaway input"); common
practice, no source.
"""
from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys

import pytest

from support import ROOT, anomark

DERIVE = "```derive\n{}\n```\n"


def write(folder, text: str, name: str = "doc.md"):
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def outputs(folder) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.suffix in (".html", ".tex", ".json", ".pdf"))


# ---------------------------------------------------------------- HTML

def test_script_and_javascript_never_reach_the_html(tmp_path):
    doc = write(tmp_path, "---\ntitle: \"</title><script>alert(1)</script>\"\n---\n"
                          "Text <script>alert(2)</script> and <img src=x onerror=alert(3)>.\n\n"
                          "[click](javascript:alert(4)) and <a href=\"javascript:alert(5)\">x</a>\n\n"
                          + DERIVE.format("symbol N\nlet a = N + 1"))
    assert anomark("build", doc, "--quiet", "--no-cache").returncode == 0
    html = (tmp_path / "doc.html").read_text()
    assert "<script>alert" not in html and "<img" not in html
    assert 'href="javascript' not in html  # the link is shown as text, the tag escaped


def test_math_that_could_carry_a_link_or_a_style_is_refused(tmp_path):
    doc = write(tmp_path, "Math $\\href{javascript:alert(1)}{x}$ and $\\style{x}{y}$.\n")
    run = anomark("check", doc)
    assert run.returncode == 2
    assert f"{doc}:1:7: '\\href' is not an allowed math command" in run.stderr
    assert f"{doc}:1:43: '\\style' is not an allowed math command" in run.stderr


# ---------------------------------------------------------------- TeX

@pytest.mark.parametrize("math, command", [
    ("\\input{/etc/hostname}", "input"), ("\\immediate\\openout1=leak.tex", "immediate"),
    ("\\write18{touch pwned}", "write"), ("\\csname input\\endcsname{x}", "csname"),
    ("\\def\\x{y}", "def"), ("\\catcode`\\@=11", "catcode"), ("\\text{\\openin1=x}", "openin"),
])
def test_tex_primitives_in_prose_math_are_located_errors_and_nothing_is_written(tmp_path, math, command):
    doc = write(tmp_path, f"# Doc\n\nSee ${math}$ here.\n")
    run = anomark("build", doc, "--format", "tex", "--no-cache")
    assert run.returncode == 2
    assert f"{doc}:3:" in run.stderr and f"'\\{command}' is not an allowed math command" in run.stderr
    assert outputs(tmp_path) == []


def test_math_in_the_abstract_goes_through_the_same_whitelist(tmp_path):
    doc = write(tmp_path, "---\nabstract: 'Leaks $\\input{/etc/hostname}$.'\n---\ntext\n")
    run = anomark("check", doc)
    assert run.returncode == 2 and f"{doc}:2:" in run.stderr and "'\\input'" in run.stderr


def test_math_that_would_unbalance_the_appendix_is_refused(tmp_path):
    doc = write(tmp_path, "Close $x}\\end{document}$ early; comment $a % b$ out.\n")
    run = anomark("check", doc)
    assert run.returncode == 2
    assert "'}' closes a brace that was never opened" in run.stderr
    assert "'%' would start a TeX comment" in run.stderr


PLOT = DERIVE.format("symbol N\nsymbol eps\nlet a = N*eps^2\nplot a over eps in -1..1 for N = 3")


def test_a_document_name_cannot_inject_through_includegraphics(tmp_path):
    doc = write(tmp_path, PLOT, name="x}\\input{leak}{.md")
    assert anomark("build", doc, "--format", "tex", "--quiet", "--no-cache").returncode == 0
    tex = next(tmp_path.glob("*.tex")).read_text()
    assert "\\input{leak}" not in tex
    graphics = [line for line in tex.splitlines() if "\\includegraphics" in line]
    assert len(graphics) == 1 and "x__input_leak__-plot-1.pdf" in graphics[0]
    assert (tmp_path / "x__input_leak__-plot-1.pdf").is_file()


UNICODE_PROSE = ("---\ntitle: \"\u210f and \u2124\"\n---\n# Units with \u210f = 1\n\n"
                 "Charges in \u2124, a zero\u200bwidth space, d\u00e9j\u00e0 vu, \u03b5 \u2264 1 \u2014 "
                 "and $x \u2208 \u2124$.\n\n" + DERIVE.format("symbol N\nlet a = N + 1"))


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex is not installed")
def test_unicode_in_prose_typesets(tmp_path):
    doc = write(tmp_path, UNICODE_PROSE)
    assert anomark("build", doc, "--format", "tex", "--standalone", "--quiet", "--no-cache").returncode == 0
    run = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape",
                          "doc.tex"], cwd=tmp_path, capture_output=True, timeout=120)
    assert run.returncode == 0, run.stdout[-2000:].decode("latin-1")


def test_a_character_that_cannot_be_typeset_is_a_located_error(tmp_path):
    doc = write(tmp_path, "# Doc\n\nGreat \U0001F600 result.\n")
    run = anomark("check", doc)
    assert run.returncode == 2
    assert f"{doc}:3:7: the character U+1F600 (GRINNING FACE) cannot be typeset" in run.stderr


# ------------------------------------------------------------ terminal

ESCAPES = "\x1b]0;owned\x07\x1b[2J\x9b1m"


def test_control_characters_in_a_file_name_are_escaped_in_every_line(tmp_path):
    doc = write(tmp_path, DERIVE.format("symbol N\ncheck N == N + 1"), name=f"a{ESCAPES}.md")
    run = anomark("check", doc, "--no-cache")
    assert run.returncode == 1 and run.stderr
    assert not any(ch in run.stderr for ch in "\x1b\x07\x9b")
    assert "a\\x1b]0;owned\\x07\\x1b[2J\\x9b1m.md" in run.stderr


def test_control_characters_in_a_document_are_located_errors(tmp_path):
    doc = write(tmp_path, f"# Doc\n\nText {ESCAPES}\n")
    run = anomark("check", doc)
    assert run.returncode == 2 and f"{doc}:3:6: the character U+001B" in run.stderr
    assert not any(ch in run.stderr for ch in "\x1b\x07\x9b")


def record(value_name: str, text: str, passed: bool = True) -> str:
    return json.dumps({"passed": passed, "conventions": {}, "values": {value_name: {"text": text}},
                       "steps": [{"source": f"let {ESCAPES}", "kind": "let", "line": 3,
                                  "checks": [{"what": ESCAPES, "status": "proven" if passed else "failed"}]}]})


@pytest.mark.parametrize("as_json", [False, True])
def test_diff_shows_names_and_texts_escaped(tmp_path, as_json):
    old = write(tmp_path, record(f"a{ESCAPES}", f"1{ESCAPES}"), "old.json")
    new = write(tmp_path, record(f"a{ESCAPES}", "2", passed=False), "new.json")
    run = anomark("diff", old, new, *(["--json"] if as_json else []))
    assert run.returncode == 1 and "owned" in run.stdout
    assert not any(ch in run.stdout for ch in "\x1b\x07\x9b")
    if as_json:
        assert json.loads(run.stdout)["values"][0]["old"] == f"1{ESCAPES}"  # escaped, not lost


@pytest.mark.parametrize("content, words", [
    ("[" * 100_000 + "]" * 100_000, "nested too deeply"),
    ('{"passed": true, "n": ' + "9" * 5000 + "}", "a number has more than 4300 digits"),
])
def test_a_diff_input_that_is_a_bomb_is_refused_naming_the_file(tmp_path, content, words):
    bomb = write(tmp_path, content, "bomb.json")
    run = anomark("diff", bomb, bomb)
    assert run.returncode == 2 and f"{bomb}:1:1: not an anomark JSON record: {words}" in run.stderr
    assert "set_int_max_str_digits" not in run.stderr


# --------------------------------------------------------------- bombs

BIG = "9" * 4000
BOMBS = {
    "tower of powers": ("", "let a = ((9^1000)^1000)^1000", 2,
                        "would hold a number about 953964 digits long (the limit is 4000 digits)"),
    "huge numbers": ("", f"symbol x\nlet a = {BIG}*x\nlet b = a*a", 4,
                     "a number in the value is about 7999 digits long (the limit is 4000 digits)"),
    "degree-heavy maximize": ("", "symbol x\nmaximize -x^100 + x over x -> x0, f0", 3,
                              "have degree 99 in x; at most 8 is solved (the extremization degree limit)"),
    "huge truncate with genera": ("---\ntruncate: 40\n---\n",
                                  "bundle T: real, rank 64\nbundle N: real, rank 64\n"
                                  "bundle M: real, rank 64\nbundle K: real, rank 64\n"
                                  "let a = Ahat(T)*L(N)*Ahat(M)*L(K)", 9,
                                  "would pass 100000 characters of text (the limit on report size"),
    "long product": ("", "symbol x, y\nlet c = (x + 1)^500*(y + 1)^500", 3,
                     "grew beyond 200000 terms (the term limit)"),
    "large symmetric power": ("---\ntruncate: 40\n---\n",
                              "bundle V: complex, rank 64\nlet a = ch(sym(V, 100))", 6,
                              "sym(V, 100) would multiply about 37197269800 term pairs (the limit is"),
    "report size": ("", "symbol x, y\nlet a = (x + y + 1)^60\nlet b = a + 1", 4,
                    "the values shown would pass 100000 characters of text (the limit on report size"),
    "sphere of a line": ("", "bundle B: real, rank 1\nfiber S: sphere of B, angular e0", 3,
                         "the sphere bundle of B (rank 1) needs rank 3 or more"),
}


@pytest.mark.parametrize("name", list(BOMBS))
def test_a_bomb_is_stopped_by_a_limit_that_its_message_names(tmp_path, name):
    front, body, line, words = BOMBS[name]
    doc = write(tmp_path, front + DERIVE.format(body))
    run = anomark("check", doc, "--no-cache")
    assert run.returncode == 2, run.stderr
    assert f"{doc}:{line}:" in run.stderr and words in run.stderr
    assert "p0(" not in run.stderr and "sys.set_int_max_str_digits" not in run.stderr


# ---------------------------------------------------------- filesystem

def test_plotting_writes_nothing_outside_the_output_folder(tmp_path):
    """A fresh process with its home, cache and temporary folders empty: after
    a build with plots they still are."""
    home, temp, key, out = (tmp_path / name for name in ("home", "tmp", "key", "out"))
    for folder in (home, temp, key):
        folder.mkdir()
    doc = write(tmp_path, PLOT)
    env = {k: v for k, v in os.environ.items() if not k.startswith("XDG_")}
    env.update(HOME=str(home), TMPDIR=str(temp), ANOMARK_KEY_DIR=str(key), PYTHONPATH=str(ROOT))
    run = subprocess.run([sys.executable, "-m", "compiler", "build", str(doc), "-o", str(out),
                          "--format", "html,tex", "--quiet"], env=env, capture_output=True, text=True,
                         timeout=300)
    assert run.returncode == 0, run.stderr
    assert list(home.iterdir()) == [] and list(temp.iterdir()) == []
    assert sorted(p.name for p in out.iterdir()) == ["doc-plot-1.pdf", "doc.html", "doc.tex"]


def test_an_existing_file_as_the_output_folder_is_refused(tmp_path):
    doc = write(tmp_path, DERIVE.format("symbol N"))
    target = write(tmp_path, "keep me", "out")
    run = anomark("build", doc, "-o", target, "--no-cache")
    assert run.returncode == 2 and f"{target}: not a folder" in run.stderr
    assert target.read_text() == "keep me"


def test_the_document_itself_is_never_an_output(tmp_path):
    doc = write(tmp_path, DERIVE.format("symbol N"), name="notes.html")
    run = anomark("build", doc, "--no-cache")
    assert run.returncode == 2 and "the output would overwrite the document itself" in run.stderr
    assert doc.read_text() == DERIVE.format("symbol N")


@pytest.mark.parametrize("digits, words", [(4200, "the limit is 4000 digits"), (5000, "more than 4300 digits")])
def test_a_huge_number_on_the_command_line_is_refused(tmp_path, digits, words):
    doc = write(tmp_path, DERIVE.format("convention k = 3\nlet a = k + 1"))
    run = anomark("check", doc, "--no-cache", "--set", "k=" + "9" * digits)
    assert run.returncode == 2 and f"{doc}:1:1:" in run.stderr and words in run.stderr
    assert "set_int_max_str_digits" not in run.stderr
